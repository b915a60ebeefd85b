#!/usr/bin/python3
"""Time ecCodes' own decode of the winds benchmark files.

    cd winds && BENCH_DIR=/tmp go test -run XXX -bench Decode -benchtime 1x .
    /usr/bin/python3 ../testdata/winds/bench_eccodes.py /tmp

Prints ns per decode and values per second for bench_simple.grib2 and
bench_complex.grib2 (codes_new_from_message + codes_get_values, the same
work as winds.Decode: parse the message and return all values).
"""
import os
import sys
import time

import eccodes

d = sys.argv[1] if len(sys.argv) > 1 else "/tmp"
for name in ("bench_simple.grib2", "bench_complex.grib2", "bench_ccsds.grib2"):
    if not os.path.exists(f"{d}/{name}"):
        continue
    data = open(f"{d}/{name}", "rb").read()
    n, best, cpu = 20, float("inf"), float("inf")
    for rep in range(5):
        t, c = time.perf_counter(), time.process_time()
        for _ in range(n):
            h = eccodes.codes_new_from_message(data)
            v = eccodes.codes_get_values(h)
            eccodes.codes_release(h)
        best = min(best, (time.perf_counter() - t) / n)
        cpu = min(cpu, (time.process_time() - c) / n)
    print(f"{name}: {best * 1e9:.0f} ns/op (best of 5 x {n}), {cpu * 1e9:.0f} cpu-ns/op, {len(v) / best:.3g} values/s")
