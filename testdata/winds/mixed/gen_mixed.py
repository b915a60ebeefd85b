#!/usr/bin/python3
"""Write the EDR "hazard" fixtures of levelpath/winds with ecCodes
(python3-eccodes): EDR on a grid other than the winds' (longitudes from
-180), at flight-level pressures rounded to 10 Pa, several EDR parameters
in one file, and EDR in product templates 4.15 and 4.8. The tests write
the winds they combine them with (winds.WriteGRIB2).

Run from this directory:  /usr/bin/python3 gen_mixed.py  (also writes the dumps)
"""
import eccodes
import numpy as np


def grid(h, ni, nj, lat1, lon1, lat2, lon2, di, dj):
    eccodes.codes_set(h, "Ni", ni)
    eccodes.codes_set(h, "Nj", nj)
    eccodes.codes_set(h, "numberOfDataPoints", ni * nj)
    eccodes.codes_set(h, "latitudeOfFirstGridPointInDegrees", lat1)
    eccodes.codes_set(h, "longitudeOfFirstGridPointInDegrees", lon1)
    eccodes.codes_set(h, "latitudeOfLastGridPointInDegrees", lat2)
    eccodes.codes_set(h, "longitudeOfLastGridPointInDegrees", lon2)
    eccodes.codes_set(h, "iDirectionIncrementInDegrees", di)
    eccodes.codes_set(h, "jDirectionIncrementInDegrees", dj)


def message(f, g, cat, num, level, step, kind, product=0):
    h = eccodes.codes_grib_new_from_samples("regular_ll_pl_grib2")
    if product:
        eccodes.codes_set(h, "productDefinitionTemplateNumber", product)
    grid(h, *g)
    eccodes.codes_set(h, "dataDate", 20261201)
    eccodes.codes_set(h, "dataTime", 0)
    eccodes.codes_set(h, "discipline", 0)
    eccodes.codes_set(h, "parameterCategory", cat)
    eccodes.codes_set(h, "parameterNumber", num)
    eccodes.codes_set(h, "typeOfFirstFixedSurface", 100)
    eccodes.codes_set(h, "scaleFactorOfFirstFixedSurface", 0)
    eccodes.codes_set(h, "scaledValueOfFirstFixedSurface", level)
    eccodes.codes_set(h, "forecastTime", step)
    if product == 15:
        eccodes.codes_set(h, "statisticalProcess", 2)  # maximum
        eccodes.codes_set(h, "spatialProcessing", 0)
        eccodes.codes_set(h, "numberOfPointsUsed", 9)
    n = g[0] * g[1]
    eccodes.codes_set_values(h, np.zeros(n))
    lat = np.radians(eccodes.codes_get_array(h, "latitudes"))
    lon = np.radians(eccodes.codes_get_array(h, "longitudes"))
    base, amp = kind
    v = base + amp * (1 + np.cos(lat) * np.sin(lon + 0.3)) + 1e-6 * level + 0.01 * step
    eccodes.codes_set(h, "bitsPerValue", 16)
    eccodes.codes_set_values(h, v)
    eccodes.codes_write(h, f)
    eccodes.codes_release(h)


HAZARD = (18, 10, 90.0, -180.0, -90.0, 160.0, 20.0, 20.0)  # -180..160E
# Isobaric levels of flight levels as hazard files give them, rounded to
# 10 Pa: FL300 30090 (ISA 30089.6), FL390 19680 (19677.0), FL450 14750 (14747.7).
EDR_LEVELS = (30090, 19680, 14750)

# 0.19.28 mountain-wave EDR, 29 clear-air EDR, 30 eddy dissipation
# parameter, 31 its maximum: distinct value ranges tell them apart.
with open("mixed_edr.grib2", "wb") as f:
    for step in (0, 6):
        for level in EDR_LEVELS:
            for num, kind in ((28, (0.01, 0.02)), (29, (0.1, 0.05)), (30, (0.2, 0.1)), (31, (0.4, 0.2))):
                message(f, HAZARD, 19, num, level, step, kind)

# EDR in product template 4.15 (spatial statistics: maximum over 9 points).
with open("mixed_edr415.grib2", "wb") as f:
    for step in (0, 6):
        for level in EDR_LEVELS:
            message(f, HAZARD, 19, 30, level, step, (0.3, 0.1), product=15)

# EDR in product template 4.8 (statistically processed over a time
# interval): not read, reported.
with open("mixed_edr48.grib2", "wb") as f:
    message(f, HAZARD, 19, 30, 19680, 6, (0.3, 0.1), product=8)

# Dumps of the fields the tests check (step 6 h).
import subprocess
for out, args in (("mixed_edr_29.txt", ["-w", "parameterNumber=29,step=6", "mixed_edr.grib2"]),
                  ("mixed_edr_30.txt", ["-w", "parameterNumber=30,step=6", "mixed_edr.grib2"]),
                  ("mixed_edr415.txt", ["-w", "step=6", "mixed_edr415.grib2"])):
    with open(out, "w") as f:
        subprocess.run(["grib_get_data", "-m", "NaN", "-F", "%.9g"] + args, stdout=f, check=True)
