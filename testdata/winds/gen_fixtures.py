#!/usr/bin/python3
"""Write the GRIB fixtures of levelpath/winds with ecCodes (python3-eccodes).

Run from this directory:  /usr/bin/python3 gen_fixtures.py
Then dump the reference values:  sh dump_expected.sh
Values are a smooth analytic function of latitude and longitude so that a
decoder that puts a value at the wrong grid point is caught.
"""
import math
import os
import struct
import subprocess

import eccodes
import numpy as np

G2 = "regular_ll_pl_grib2"
G1 = "regular_ll_pl_grib1"


def func(lat, lon, kind=0):
    """Field values at (lat, lon) in degrees; kind shifts the pattern."""
    la, lo = np.radians(lat), np.radians(lon)
    base = [20.0, -5.0, 230.0, 0.1][kind]
    amp = [30.0, 12.0, 25.0, 0.08][kind]
    return base + amp * np.cos(la) * np.sin(lo + 0.5 + kind) + 0.05 * lat + 0.013 * lon


def new(sample, geometry, scan=None):
    h = eccodes.codes_grib_new_from_samples(sample)
    ni, nj, lat1, lon1, lat2, lon2, di, dj = geometry
    eccodes.codes_set(h, "Ni", ni)
    eccodes.codes_set(h, "Nj", nj)
    if eccodes.codes_get(h, "edition") == 2:
        # ecCodes does not derive section 3 octets 7-10 from Ni and Nj.
        eccodes.codes_set(h, "numberOfDataPoints", ni * nj)
    for k, v in scan or {}:
        eccodes.codes_set(h, k, v)
    eccodes.codes_set(h, "latitudeOfFirstGridPointInDegrees", lat1)
    eccodes.codes_set(h, "longitudeOfFirstGridPointInDegrees", lon1)
    eccodes.codes_set(h, "latitudeOfLastGridPointInDegrees", lat2)
    eccodes.codes_set(h, "longitudeOfLastGridPointInDegrees", lon2)
    eccodes.codes_set(h, "iDirectionIncrementInDegrees", di)
    eccodes.codes_set(h, "jDirectionIncrementInDegrees", dj)
    return h


GLOBAL = (36, 19, 90.0, 0.0, -90.0, 350.0, 10.0, 10.0)


def set_values(h, kind=0, missing=None, packing=None, bits=16, extra=()):
    # Values are computed at the coordinates of ecCodes' own geoiterator, in
    # the message's scanning order.
    n = eccodes.codes_get(h, "Ni") * eccodes.codes_get(h, "Nj")
    eccodes.codes_set_values(h, np.zeros(n))  # resize before the geoiterator runs
    lats = eccodes.codes_get_array(h, "latitudes")
    lons = eccodes.codes_get_array(h, "longitudes")
    vals = func(lats, lons, kind)
    if missing is not None:
        eccodes.codes_set(h, "bitmapPresent", 1)
        eccodes.codes_set(h, "missingValue", 9999)
        vals = np.where(missing(lats, lons), 9999.0, vals)
    # Pack simply first, then let ecCodes repack (changing the packing of
    # the sample's constant field directly is refused).
    eccodes.codes_set(h, "bitsPerValue", 16)
    eccodes.codes_set_values(h, vals)
    if packing:
        eccodes.codes_set(h, "packingType", packing)
    for k, v in extra:
        eccodes.codes_set(h, k, v)
    if bits and packing != "grid_ieee":
        eccodes.codes_set(h, "bitsPerValue", bits)
    eccodes.codes_set_values(h, vals)


def param2(h, cat, num, level_hpa=250, ptype=None):
    eccodes.codes_set(h, "discipline", 0)
    eccodes.codes_set(h, "parameterCategory", cat)
    eccodes.codes_set(h, "parameterNumber", num)
    eccodes.codes_set(h, "typeOfFirstFixedSurface", 100)
    eccodes.codes_set(h, "scaleFactorOfFirstFixedSurface", 0)
    eccodes.codes_set(h, "scaledValueOfFirstFixedSurface", level_hpa * 100)


def write(name, handles):
    with open(name, "wb") as f:
        for h in handles:
            eccodes.codes_write(h, f)
            eccodes.codes_release(h)


def g2(kind=0, cat=2, num=2, level=250, scan=None, geometry=GLOBAL, step=0, **kw):
    h = new(G2, geometry, scan)
    param2(h, cat, num, level)
    eccodes.codes_set(h, "dataDate", 20240115)
    eccodes.codes_set(h, "dataTime", 600)
    eccodes.codes_set(h, "forecastTime", step)
    set_values(h, kind, **kw)
    return h


# Packings (u at 250 hPa on a 10-degree global grid).
write("g2_simple.grib2", [g2()])
write("g2_complex.grib2", [g2(packing="grid_complex")])
write("g2_sd1.grib2", [g2(packing="grid_complex_spatial_differencing", extra=[("orderOfSpatialDifferencing", 1)])])
write("g2_sd2.grib2", [g2(packing="grid_complex_spatial_differencing", extra=[("orderOfSpatialDifferencing", 2)])])
write("g2_ieee32.grib2", [g2(packing="grid_ieee", extra=[("precision", 1)])])
write("g2_ieee64.grib2", [g2(packing="grid_ieee", extra=[("precision", 2)])])


def repack(src, dst, *settings):
    """Repack with the grib_set tool, as a user would."""
    subprocess.run(["grib_set", "-r", "-s", ",".join(settings), src, dst], check=True)


repack("g2_simple.grib2", "g2_png.grib2", "packingType=grid_png")
for bits in (24, 12):
    repack("g2_simple.grib2", "tmp.grib2", "bitsPerValue=%d" % bits)
    repack("tmp.grib2", "g2_png%d.grib2" % bits, "packingType=grid_png")
os.remove("tmp.grib2")

# Scanning modes (code table 3.4).
write("g2_jpos.grib2", [g2(scan=[("jScansPositively", 1)], geometry=(36, 19, -90.0, 0.0, 90.0, 350.0, 10.0, 10.0))])
write("g2_ineg.grib2", [g2(scan=[("iScansNegatively", 1)], geometry=(36, 19, 90.0, 350.0, -90.0, 0.0, 10.0, 10.0))])
write("g2_jcons.grib2", [g2(scan=[("jPointsAreConsecutive", 1)])])
write("g2_boustro.grib2", [g2(scan=[("alternativeRowScanning", 1)])])
# Regional grid across the antimeridian, i negative and j positive.
write("g2_regional.grib2", [g2(kind=2, cat=0, num=0, scan=[("iScansNegatively", 1), ("jScansPositively", 1)],
                               geometry=(13, 9, 20.0, 200.0, 60.0, 140.0, 5.0, 5.0))])

# Bitmaps: points north of 60N are missing.
polar = lambda la, lo: la > 60
write("g2_bitmap.grib2", [g2(missing=polar)])
write("g2_complex_bitmap.grib2", [g2(missing=polar, packing="grid_complex")])
write("g2_sd2_bitmap.grib2", [g2(missing=polar, packing="grid_complex_spatial_differencing",
                                 extra=[("orderOfSpatialDifferencing", 2)])])
# Bitmaps with scanning modes other than 0 (bitmap bits in scanning order),
# masks asymmetric in latitude and longitude.
write("g2_jcons_bitmap.grib2", [g2(missing=lambda la, lo: (la > 60) | ((lo > 100) & (lo < 140)),
                                   scan=[("jPointsAreConsecutive", 1)])])
write("g2_regional_bitmap.grib2", [g2(kind=2, cat=0, num=0, missing=lambda la, lo: (la > 45) | (lo > 185),
                                      scan=[("iScansNegatively", 1), ("jScansPositively", 1)],
                                      geometry=(13, 9, 20.0, 200.0, 60.0, 140.0, 5.0, 5.0))])

# Several messages: u, v, t, EDR (0.19.30) at 300 and 200 hPa, steps 0 and 6 h;
# plus an ensemble member (template 4.1) and a 2 m temperature (skipped).
hs = []
for step in (0, 6):
    for level in (300, 200):
        for kind, (cat, num) in enumerate([(2, 2), (2, 3), (0, 0), (19, 30)]):
            hs.append(g2(kind=kind, cat=cat, num=num, level=level, step=step,
                         packing="grid_complex_spatial_differencing" if kind == 2 else None))
h = g2(kind=1, cat=2, num=3, level=500)
eccodes.codes_set(h, "productDefinitionTemplateNumber", 1)
eccodes.codes_set(h, "perturbationNumber", 7)
eccodes.codes_set(h, "numberOfForecastsInEnsemble", 51)
eccodes.codes_set(h, "typeOfEnsembleForecast", 3)
hs.append(h)
h = g2(kind=2, cat=0, num=0)
eccodes.codes_set(h, "typeOfFirstFixedSurface", 103)
eccodes.codes_set(h, "scaledValueOfFirstFixedSurface", 2)
hs.append(h)
write("g2_multi.grib2", hs)

# Unsupported templates.
repack("g2_simple.grib2", "g2_jpeg.grib2", "packingType=grid_jpeg")
repack("g2_simple.grib2", "g2_ccsds.grib2", "packingType=grid_ccsds")
h = eccodes.codes_grib_new_from_samples("regular_gg_pl_grib2")
param2(h, 2, 2)
write("g2_gaussian.grib2", [h])


# One message carrying two fields (sections 4-7 repeated), the second with
# bitmap indicator 254 (previous bitmap): spliced from two ecCodes messages.
def sections(msg):
    out, pos = [], 16
    while msg[pos:pos + 4] != b"7777":
        n = struct.unpack(">I", msg[pos:pos + 4])[0]
        out.append((msg[pos + 4], msg[pos:pos + n]))
        pos += n
    return out


def raw(h):
    b = eccodes.codes_get_message(h)
    eccodes.codes_release(h)
    return b


a = raw(g2(kind=0, missing=polar))
b = raw(g2(kind=1, cat=2, num=3, missing=polar))
sa, sb = sections(a), sections(b)
body = b"".join(s for n, s in sa)
body += b"".join(s if n != 6 else struct.pack(">IBB", 6, 6, 254) for n, s in sb if n >= 4)
total = 16 + len(body) + 4
msg = a[:8] + struct.pack(">Q", total) + body + b"7777"
with open("g2_multifield.grib2", "wb") as f:
    f.write(msg)


# GRIB1: WMO table 2 (version 3) parameter 33 and ECMWF table 128 parameter 131.
def g1(table, param, level=250, **kw):
    h = new(G1, GLOBAL)
    eccodes.codes_set(h, "table2Version", table)
    eccodes.codes_set(h, "indicatorOfParameter", param)
    eccodes.codes_set(h, "indicatorOfTypeOfLevel", 100)
    eccodes.codes_set(h, "level", level)
    eccodes.codes_set(h, "dataDate", 20240115)
    eccodes.codes_set(h, "dataTime", 600)
    set_values(h, 0, **kw)
    return h


write("g1_wmo.grib1", [g1(3, 33), g1(3, 34), g1(3, 11)])
write("g1_ecmwf.grib1", [g1(128, 131), g1(128, 132), g1(128, 130)])
write("g1_bitmap.grib1", [g1(128, 131, missing=polar)])


# ecCodes 2.28 writes template 5.3 only with order 0 (its packer resets the
# order) and ignores alternativeRowScanning in its geoiterator, so these
# fixtures are encoded here and decoded by ecCodes for the reference dump.
def nbits_for(v):
    return int(v).bit_length()


def complex_pack(xs, order, missing_mgmt, group_lens=(16, 24)):
    """Encode integers xs (None = missing) per templates 5.2/5.3 and 7.2/7.3.

    Returns (section-5 tail from octet 20, section-7 payload)."""
    present = [x for x in xs if x is not None]
    first, mind = [], 0
    vals = list(xs)
    if order:
        d = {}
        idx = [i for i, x in enumerate(xs) if x is not None]
        for k, i in enumerate(idx):
            if k < order:
                d[i] = 0
            elif order == 1:
                d[i] = xs[i] - xs[idx[k - 1]]
            else:
                d[i] = xs[i] - 2 * xs[idx[k - 1]] + xs[idx[k - 2]]
        first = [xs[i] for i in idx[:order]]
        mind = min(d[i] for i in idx[order:])
        for k, i in enumerate(idx):
            vals[i] = 0 if k < order else d[i] - mind
    groups, i, g = [], 0, 0
    while i < len(vals):
        L = group_lens[g % len(group_lens)]
        groups.append(vals[i:i + L])
        i += L
        g += 1
    refs, widths = [], []
    for grp in groups:
        p = [v for v in grp if v is not None]
        if not p:
            refs.append(None)
            widths.append(0)
            continue
        ref = min(p)
        span = max(p) - ref
        if missing_mgmt and len(p) < len(grp):
            span += 1  # reserve all ones for missing
        refs.append(ref)
        widths.append(nbits_for(span))
    nb = max(nbits_for(max(r for r in refs if r is not None)), 1)
    if missing_mgmt:
        nb = max(nb, nbits_for(max(r for r in refs if r is not None) + 1))
    refs = [(1 << nb) - 1 if r is None else r for r in refs]
    bw = max(nbits_for(max(widths)), 1)
    lens = [len(grp) for grp in groups]
    ref_len, inc = min(group_lens), abs(group_lens[1] - group_lens[0]) or 1
    scaled = [(L - ref_len) // inc for L in lens[:-1]] + [0]
    bl = max(nbits_for(max(scaled)), 1)

    bits = []

    def put(v, n):
        for k in range(n - 1, -1, -1):
            bits.append((v >> k) & 1)

    def pad():
        while len(bits) % 8:
            bits.append(0)

    octets = 0
    if order:
        big = max([abs(v) for v in first] + [abs(mind)])
        octets = (nbits_for(big) + 1 + 7) // 8
        for v in first:
            put(v, 8 * octets)
        put((1 << (8 * octets - 1)) | -mind if mind < 0 else mind, 8 * octets)
    for r in refs:
        put(r, nb)
    pad()
    for w in widths:
        put(w, bw)
    pad()
    for s in scaled:
        put(s, bl)
    pad()
    for grp, r, w in zip(groups, refs, widths):
        if w == 0:
            continue
        for v in grp:
            put((1 << w) - 1 if v is None else v - r, w)
    pad()
    data = bytes(int("".join(map(str, bits[k:k + 8])), 2) for k in range(0, len(bits), 8))
    tail = struct.pack(">BBBBIIIBBIBIB", nb, 0, 1, missing_mgmt, 0, 0, len(groups), 0, bw,
                       ref_len, inc, lens[-1], bl)
    if order:
        tail += struct.pack(">BB", order, octets)
    return tail, data


def splice(src, dst, order, missing_mgmt=0, drop_bitmap=False):
    """Repack the 16-bit simple-packed field of src with complex packing."""
    msg = open(src, "rb").read()
    secs = sections(msg)
    s5 = [s for n, s in secs if n == 5][0]
    s6 = [s for n, s in secs if n == 6][0]
    s7 = [s for n, s in secs if n == 7][0]
    nvals = struct.unpack(">I", s5[5:9])[0]
    xs = [struct.unpack(">H", s7[5 + 2 * i:7 + 2 * i])[0] for i in range(nvals)]
    if drop_bitmap:  # move the bitmap's missing points into the data
        npts = struct.unpack(">I", [s for n, s in secs if n == 3][0][6:10])[0]
        it = iter(xs)
        xs = [next(it) if (s6[6 + i // 8] >> (7 - i % 8)) & 1 else None for i in range(npts)]
        nvals = npts
        s6 = struct.pack(">IBB", 6, 6, 255)
    tail, data = complex_pack(xs, order, missing_mgmt)
    tmpl = 3 if order else 2
    s5n = struct.pack(">IBIH", 0, 5, nvals, tmpl) + s5[11:19] + tail
    s5n = struct.pack(">I", len(s5n)) + s5n[4:]
    s7n = struct.pack(">IB", 5 + len(data), 7) + data
    body = b"".join({5: s5n, 6: s6, 7: s7n}.get(n, s) for n, s in secs)
    out = msg[:8] + struct.pack(">Q", 16 + len(body) + 4) + body + b"7777"
    open(dst, "wb").write(out)


splice("g2_simple.grib2", "g2_sd1.grib2", 1)
splice("g2_simple.grib2", "g2_sd2.grib2", 2)
splice("g2_bitmap.grib2", "g2_sd2_bitmap.grib2", 2)
splice("g2_bitmap.grib2", "g2_complex_missing.grib2", 0, missing_mgmt=1, drop_bitmap=True)
splice("g2_bitmap.grib2", "g2_sd1_missing.grib2", 1, missing_mgmt=1, drop_bitmap=True)

# Boustrophedon rows (flag 0x10): reverse every odd row of g2_simple's data.
msg = bytearray(open("g2_simple.grib2", "rb").read())
secs = sections(bytes(msg))
off = 16
for n, s in secs:
    if n == 3:
        msg[off + 71] = 0x10
    if n == 7:
        row = 36 * 2
        for j in range(1, 19, 2):
            a = off + 5 + j * row
            vals = [msg[a + 2 * i:a + 2 * i + 2] for i in range(36)]
            msg[a:a + row] = b"".join(reversed(vals))
    off += len(s)
open("g2_boustro.grib2", "wb").write(bytes(msg))
