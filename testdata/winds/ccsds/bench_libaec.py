#!/usr/bin/python3
"""Time libaec's aec_buffer_decode alone (through ctypes) on section 7 of a CCSDS
GRIB2 message, to compare with BenchmarkCCSDSUnpack (the Go decoder alone):

    BENCH_DIR=/tmp/x go test ./winds/ -run XXX -bench DecodeCCSDS -benchtime 1x
    /usr/bin/python3 testdata/winds/ccsds/bench_libaec.py /tmp/x/bench_ccsds.grib2

libaec writes 2- or 4-byte integers; the Go decoder also scales to float32.
"""
import ctypes, time, sys
lib = ctypes.CDLL("libaec.so.0")
class S(ctypes.Structure):
    _fields_ = [("next_in", ctypes.c_void_p), ("avail_in", ctypes.c_size_t), ("total_in", ctypes.c_size_t),
                ("next_out", ctypes.c_void_p), ("avail_out", ctypes.c_size_t), ("total_out", ctypes.c_size_t),
                ("bits_per_sample", ctypes.c_uint), ("block_size", ctypes.c_uint), ("rsi", ctypes.c_uint),
                ("flags", ctypes.c_uint), ("state", ctypes.c_void_p)]
msg = open(sys.argv[1], "rb").read()
# locate sections 5 and 7
p = 16; s5 = s7 = None
while msg[p:p+4] != b"7777":
    ln = int.from_bytes(msg[p:p+4], "big")
    if msg[p+4] == 5: s5 = msg[p:p+ln]
    if msg[p+4] == 7: s7 = msg[p+5:p+ln]
    p += ln
n = int.from_bytes(s5[5:9], "big"); bps = s5[19]; flags = s5[21]; block = s5[22]; rsi = int.from_bytes(s5[23:25], "big")
nbytes = 2 if bps <= 16 else 4
inb = ctypes.create_string_buffer(s7, len(s7)); out = ctypes.create_string_buffer(n * nbytes)
best = cpu = 1e9
for rep in range(5):
    t, c = time.perf_counter(), time.process_time()
    for _ in range(20):
        st = S(ctypes.cast(inb, ctypes.c_void_p), len(s7), 0, ctypes.cast(out, ctypes.c_void_p), n * nbytes, 0, bps, block, rsi, flags & ~2)
        r = lib.aec_buffer_decode(ctypes.byref(st))
        assert r == 0, r
    best = min(best, (time.perf_counter() - t) / 20); cpu = min(cpu, (time.process_time() - c) / 20)
print(f"libaec aec_buffer_decode alone: {best*1e9:.0f} ns/op wall, {cpu*1e9:.0f} cpu-ns/op, n={n} bps={bps} flags={flags} block={block} rsi={rsi}")
