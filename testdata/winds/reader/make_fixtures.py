#!/usr/bin/python3
"""Write the reader fixtures of levelpath/winds with ecCodes 2.28 (python3-eccodes).

Run from this directory:  /usr/bin/python3 make_fixtures.py && sh dump.sh
"""
import random
import shutil
import subprocess

import eccodes
import numpy as np

S1 = "regular_ll_pl_grib1"
S2 = "regular_ll_pl_grib2"
rng = random.Random(20261202)


def values(h, kind):
    n = eccodes.codes_get(h, "Ni") * eccodes.codes_get(h, "Nj")
    eccodes.codes_set_values(h, np.zeros(n))
    lats = np.radians(eccodes.codes_get_array(h, "latitudes"))
    lons = np.radians(eccodes.codes_get_array(h, "longitudes"))
    base, amp = [(20.0, 30.0), (-5.0, 12.0), (230.0, 25.0)][kind]
    eccodes.codes_set(h, "bitsPerValue", 16)
    eccodes.codes_set_values(h, base + amp * np.cos(lats) * np.sin(lons + 0.5 + kind) + 0.05 * np.degrees(lats))


def area_message(sample, kind, level):
    """A message on a random regular lat/lon area (size, increment, corner)."""
    h = eccodes.codes_grib_new_from_samples(sample)
    d = rng.choice([0.25, 0.5, 1.0, 1.5, 2.5])
    ni, nj = rng.randint(5, 30), rng.randint(4, 20)
    lat1 = rng.randint(int(-90 + (nj - 1) * d) + 1, 90) if (nj - 1) * d < 179 else 90
    lat1 = min(lat1, 90)
    lon1 = rng.randint(-180, 179)
    eccodes.codes_set(h, "Ni", ni)
    eccodes.codes_set(h, "Nj", nj)
    if eccodes.codes_get(h, "edition") == 2:
        eccodes.codes_set(h, "numberOfDataPoints", ni * nj)
    eccodes.codes_set(h, "latitudeOfFirstGridPointInDegrees", lat1)
    eccodes.codes_set(h, "longitudeOfFirstGridPointInDegrees", lon1)
    eccodes.codes_set(h, "latitudeOfLastGridPointInDegrees", lat1 - (nj - 1) * d)
    eccodes.codes_set(h, "longitudeOfLastGridPointInDegrees", lon1 + (ni - 1) * d)
    eccodes.codes_set(h, "iDirectionIncrementInDegrees", d)
    eccodes.codes_set(h, "jDirectionIncrementInDegrees", d)
    if eccodes.codes_get(h, "edition") == 1:
        eccodes.codes_set(h, "table2Version", 3)
        eccodes.codes_set(h, "indicatorOfParameter", [33, 34, 11][kind])
    else:
        cat, num = [(2, 2), (2, 3), (0, 0)][kind]
        eccodes.codes_set(h, "parameterCategory", cat)
        eccodes.codes_set(h, "parameterNumber", num)
    eccodes.codes_set(h, "level", level)
    values(h, kind)
    return h


def write(name, handles):
    with open(name, "wb") as f:
        for h in handles:
            eccodes.codes_write(h, f)
            eccodes.codes_release(h)


# Six GRIB1 files of three messages (u, v, t) each on its own random area,
# so that consecutive messages differ in size.
for k in range(1, 7):
    write(f"g1_area{k}.grib1", [area_message(S1, kind, rng.choice([200, 250, 300])) for kind in range(3)])
# One GRIB2 file likewise (simple packing).
write("g2_area.grib2", [area_message(S2, kind, 250) for kind in range(3)])

# GRIB1 with second-order packing (for the repack remedy).
subprocess.run(["grib_set", "-r", "-s", "packingType=grid_second_order", "g1_area1.grib1", "g1_second_order.grib1"], check=True)
# GRIB1 on grids levelpath does not read: polar stereographic and reduced Gaussian, listed by grid info.
shutil.copy("/usr/share/eccodes/samples/polar_stereographic_pl_grib1.tmpl", "g1_polar.grib1")
subprocess.run(["grib_set", "-s", "indicatorOfParameter=33,table2Version=3", "/usr/share/eccodes/samples/reduced_gg_pl_32_grib1.tmpl", "g1_gaussian.grib1"], check=True)

# Product templates other than 4.0/4.1, and a forecast time that
# overflows a 64-bit nanosecond duration (3,000,000 hours, about 342 years).
def product(tmpl, keys):
    h = eccodes.codes_grib_new_from_samples(S2)
    eccodes.codes_set(h, "productDefinitionTemplateNumber", tmpl)
    for k, v in keys:
        eccodes.codes_set(h, k, v)
    return h


write("g2_products.grib2", [
    product(8, [("typeOfStatisticalProcessing", 0), ("stepUnits", 1), ("stepRange", "6-12"), ("level", 300)]),
    product(11, [("typeOfStatisticalProcessing", 2), ("stepUnits", 1), ("stepRange", "12-24"), ("perturbationNumber", 4), ("level", 200)]),
    product(15, [("parameterCategory", 19), ("parameterNumber", 30), ("forecastTime", 9), ("level", 250)]),
    product(2, [("derivedForecast", 0), ("forecastTime", 18), ("level", 500)]),
    product(0, [("indicatorOfUnitOfTimeRange", 1), ("forecastTime", 3000000), ("level", 250), ("parameterCategory", 1), ("parameterNumber", 0)]),
])

# A kept u at 250 hPa with the same overflowing forecast time.
write("g2_longstep.grib2", [product(0, [("indicatorOfUnitOfTimeRange", 1), ("forecastTime", 3000000), ("level", 250),
                                        ("parameterCategory", 2), ("parameterNumber", 2)])])

# Memory bomb: constant (0-bit) u, v, t on a 4096 x 4096 grid (2^24 points,
# the largest single grid accepted) at 20 levels and 10 steps: 600 messages
# of about 180 bytes that would need 40 GiB decoded.
h = eccodes.codes_grib_new_from_samples(S2)
eccodes.codes_set(h, "Ni", 4096)
eccodes.codes_set(h, "Nj", 4096)
eccodes.codes_set(h, "numberOfDataPoints", 4096 * 4096)
eccodes.codes_set(h, "latitudeOfFirstGridPointInDegrees", 80.0)
eccodes.codes_set(h, "longitudeOfFirstGridPointInDegrees", 0.0)
eccodes.codes_set(h, "latitudeOfLastGridPointInDegrees", 80.0 - 4095 * 0.01)
eccodes.codes_set(h, "longitudeOfLastGridPointInDegrees", 4095 * 0.01)
eccodes.codes_set(h, "iDirectionIncrementInDegrees", 0.01)
eccodes.codes_set(h, "jDirectionIncrementInDegrees", 0.01)
eccodes.codes_set_values(h, np.full(4096 * 4096, 10.0))
with open("bomb.grib2", "wb") as f:
    for step in range(10):
        for level in range(100, 1100, 50):
            for cat, num in [(2, 2), (2, 3), (0, 0)]:
                c = eccodes.codes_clone(h)
                eccodes.codes_set(c, "parameterCategory", cat)
                eccodes.codes_set(c, "parameterNumber", num)
                eccodes.codes_set(c, "level", level)
                eccodes.codes_set(c, "forecastTime", step * 3)
                eccodes.codes_write(c, f)
                eccodes.codes_release(c)

# Compressed copies, named without a compression suffix: levelpath tells
# them by content.
subprocess.run("bzip2 -9 -c g1_area2.grib1 > g1_area2_bzip2.grib1", shell=True, check=True)
subprocess.run("gzip -9 -n -c g2_area.grib2 > g2_area_gzip.grib2", shell=True, check=True)
