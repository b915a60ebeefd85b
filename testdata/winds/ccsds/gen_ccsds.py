#!/usr/bin/python3
"""Write the CCSDS (GRIB2 data representation template 5.42) fixtures of
levelpath/winds with ecCodes (python3-eccodes), their simple-packed repacks
and the values ecCodes decodes from them.

Run from this directory:  /usr/bin/python3 gen_ccsds.py
ccsdsFlags bits (libaec aec.h): 2 3-byte samples, 4 MSB first,
8 preprocessing (unit-delay predictor), 16 restricted ids, 32 pad at RSI (ecCodes 2.28
 cannot decode what it writes with 32, so no fixture uses it).
"""
import subprocess

import eccodes
import numpy as np

RNG = np.random.default_rng(20261201)


def grid(ni, nj):
    h = eccodes.codes_grib_new_from_samples("regular_ll_pl_grib2")
    di, dj = 360.0 / ni, 180.0 / (nj - 1)
    eccodes.codes_set(h, "Ni", ni)
    eccodes.codes_set(h, "Nj", nj)
    eccodes.codes_set(h, "numberOfDataPoints", ni * nj)
    eccodes.codes_set(h, "latitudeOfFirstGridPointInDegrees", 90.0)
    eccodes.codes_set(h, "longitudeOfFirstGridPointInDegrees", 0.0)
    eccodes.codes_set(h, "latitudeOfLastGridPointInDegrees", -90.0)
    eccodes.codes_set(h, "longitudeOfLastGridPointInDegrees", 360.0 - di)
    eccodes.codes_set(h, "iDirectionIncrementInDegrees", di)
    eccodes.codes_set(h, "jDirectionIncrementInDegrees", dj)
    return h


def field(h, kind):
    n = eccodes.codes_get(h, "Ni") * eccodes.codes_get(h, "Nj")
    eccodes.codes_set_values(h, np.zeros(n))
    lat = np.radians(eccodes.codes_get_array(h, "latitudes"))
    lon = np.radians(eccodes.codes_get_array(h, "longitudes"))
    smooth = 20 + 30 * np.cos(lat) * np.sin(lon + 0.5) + 3 * np.sin(3 * lat)
    if kind == "smooth":
        return smooth
    if kind == "noise":  # incompressible: uncompressed blocks
        return RNG.uniform(-50, 50, n)
    if kind == "plateau":  # long constant runs: zero blocks, runs past 5 blocks
        v = np.round(smooth / 15) * 15
        v[(np.abs(np.degrees(lat)) > 50)] = 7.0
        return v
    if kind == "lowent":  # deltas of 0 and 1: second extension
        steps = np.round(smooth * 4) / 4
        return steps + 0.25 * (RNG.uniform(0, 1, n) < 0.1)
    if kind == "const":
        return np.full(n, 273.15)
    if kind == "mixed":  # smooth with noisy patches
        v = smooth.copy()
        m = RNG.uniform(0, 1, n) < 0.05
        v[m] += RNG.uniform(-30, 30, m.sum())
        return v
    raise ValueError(kind)


# name: (ni, nj, kind, bits, block, rsi, flags, bitmap)
CASES = {
    "c_b16_j32_pp": (36, 19, "smooth", 16, 32, 128, 14, False),
    "c_b8_j8_pp_rsi2": (36, 19, "smooth", 8, 8, 2, 14, False),
    "c_b12_j16_nopp": (36, 19, "smooth", 12, 16, 4, 4, False),
    "c_b24_j64_pp": (36, 19, "smooth", 24, 64, 3, 14, False),
    "c_b24_j16_nopp": (36, 19, "mixed", 24, 16, 5, 6, False),
    # ecCodes 2.28 writes a truncated stream for 17-24 bit values without
    # flag 2 (3-byte samples); its own decoder does not notice.
    "bad_b24_no3byte": (36, 19, "mixed", 24, 16, 5, 4, False),
    "c_b32_j32_pp": (36, 19, "smooth", 32, 32, 2, 14, False),
    "c_b20_j8_noise": (36, 19, "noise", 20, 8, 7, 14, False),
    "c_b16_j8_plateau": (72, 37, "plateau", 16, 8, 64, 14, False),
    "c_b16_j16_plateau_nopp": (72, 37, "plateau", 16, 16, 64, 4, False),
    "c_b10_j8_lowent": (72, 37, "lowent", 10, 8, 16, 14, False),
    "c_b4_j16_restricted": (36, 19, "lowent", 4, 16, 8, 30, False),
    "c_b2_j8_restricted": (36, 19, "lowent", 2, 8, 8, 30, False),
    "c_b16_j32_mixed": (36, 19, "mixed", 16, 32, 3, 14, False),
    "c_b18_j64_nopp": (36, 19, "mixed", 18, 64, 2, 6, False),
    "c_const": (36, 19, "const", 16, 32, 128, 14, False),
    "c_bitmap": (36, 19, "smooth", 16, 32, 128, 14, True),
    "c_large": (360, 181, "smooth", 12, 32, 128, 14, False),
}


def main():
    for name, (ni, nj, kind, bits, block, rsi, flags, bitmap) in CASES.items():
        h = grid(ni, nj)
        v = field(h, kind)
        eccodes.codes_set(h, "packingType", "grid_ccsds")
        eccodes.codes_set(h, "ccsdsBlockSize", block)
        eccodes.codes_set(h, "ccsdsRsi", rsi)
        eccodes.codes_set(h, "ccsdsFlags", flags)
        eccodes.codes_set(h, "bitsPerValue", bits)
        if bitmap:
            eccodes.codes_set(h, "bitmapPresent", 1)
            eccodes.codes_set(h, "missingValue", 9999)
            lat = eccodes.codes_get_array(h, "latitudes")
            v[lat > 60] = 9999
        eccodes.codes_set_values(h, v)
        with open(name + ".grib2", "wb") as f:
            eccodes.codes_write(h, f)
        eccodes.codes_release(h)
        if name.startswith("bad_"):
            continue
        subprocess.run(["grib_set", "-r", "-s", "packingType=grid_simple",
                        name + ".grib2", "/tmp/" + name + "_simple.grib2"], check=True)
        dump = subprocess.run(["grib_get_data", "-m", "NaN", "-F", "%.9g", name + ".grib2"],
                              check=True, capture_output=True, text=True).stdout
        # "index value" per grid point (0-based, in the order of section 7;
        # every fixture scans in mode 0); c_large keeps every 97th point.
        vals = [ln.split()[2] for ln in dump.splitlines()[1:]]
        step = 97 if name == "c_large" else 1
        with open(name + ".txt", "w") as f:
            f.write("# grib_get_data -m NaN -F %%.9g %s.grib2 (value column)\n" % name)
            for i in range(0, len(vals), step):
                f.write("%d %s\n" % (i, vals[i]))
        if name != "c_large":
            subprocess.run(["cp", "/tmp/" + name + "_simple.grib2", name + "_simple.grib2"], check=True)


main()
