#!/usr/bin/env python3
"""Generate the WGS-84 geodesic fixtures for levelpath/route tests.

Reference: GeographicLib's GeodSolve (Debian package geographiclib-tools,
GeodSolve 2.1.2, Karney's algorithm). Run from this folder:

    python3 make_geodesic.py

It writes geodesic_inverse.txt (lat1 lon1 lat2 lon2 s12 azi1 azi2) and
geodesic_direct.txt (lat1 lon1 azi1 s12 lat2 lon2 azi2); degrees and metres.
"""
import math
import random
import subprocess

rng = random.Random(20250101)


def rand_lat(lo=-90.0, hi=90.0):
    # area-uniform latitude within [lo, hi]
    a, b = math.sin(math.radians(lo)), math.sin(math.radians(hi))
    return math.degrees(math.asin(rng.uniform(a, b)))


def r6(x):
    return round(x, 6)


pairs = []
# 300 pairs uniform on the globe (any distance, nearly antipodal included).
for _ in range(300):
    pairs.append((rand_lat(), rng.uniform(-180, 180), rand_lat(), rng.uniform(-180, 180)))
# 100 legs crossing the antimeridian.
for _ in range(100):
    pairs.append((rand_lat(-70, 70), rng.uniform(150, 180), rand_lat(-70, 70), rng.uniform(-180, -150)))
# 100 legs near or over a pole (both ends poleward of 75 degrees).
for _ in range(100):
    s = rng.choice((-1, 1))
    pairs.append((s * rand_lat(75, 90), rng.uniform(-180, 180), s * rand_lat(75, 90), rng.uniform(-180, 180)))
# 60 short legs (up to about 100 km).
for _ in range(60):
    la, lo = rand_lat(-85, 85), rng.uniform(-180, 180)
    pairs.append((la, lo, la + rng.uniform(-1, 1), lo + rng.uniform(-1, 1)))
# 40 medium legs up to 10,000 km typical of routes.
for _ in range(40):
    la, lo = rand_lat(-60, 60), rng.uniform(-180, 180)
    pairs.append((la, lo, max(-90, min(90, la + rng.uniform(-40, 40))), lo + rng.uniform(-80, 80)))
pairs = [(r6(a), r6(b), r6(c), r6(d)) for a, b, c, d in pairs]

inp = "".join(f"{a} {b} {c} {d}\n" for a, b, c, d in pairs)
out = subprocess.run(["GeodSolve", "-i", "-p", "9"], input=inp, capture_output=True,
                     text=True, check=True).stdout.split("\n")
with open("geodesic_inverse.txt", "w") as f:
    f.write("# lat1 lon1 lat2 lon2 s12_m azi1_deg azi2_deg  (GeodSolve -i -p 9)\n")
    for p, line in zip(pairs, out):
        azi1, azi2, s12 = line.split()
        f.write(" ".join(str(v) for v in p) + f" {s12} {azi1} {azi2}\n")

direct = []
for _ in range(200):
    direct.append((r6(rand_lat()), r6(rng.uniform(-180, 180)), r6(rng.uniform(-180, 180)),
                   round(rng.uniform(0, 10_000_000), 3)))
for _ in range(50):  # polar starts
    direct.append((r6(rng.choice((-1, 1)) * rand_lat(80, 90)), r6(rng.uniform(-180, 180)),
                   r6(rng.uniform(-180, 180)), round(rng.uniform(0, 3_000_000), 3)))
for _ in range(50):  # eastbound or westbound across the antimeridian
    direct.append((r6(rand_lat(-60, 60)), r6(rng.uniform(170, 180)), r6(rng.uniform(45, 135)),
                   round(rng.uniform(1_500_000, 5_000_000), 3)))
inp = "".join(f"{a} {b} {c} {d}\n" for a, b, c, d in direct)
out = subprocess.run(["GeodSolve", "-p", "9"], input=inp, capture_output=True,
                     text=True, check=True).stdout.split("\n")
with open("geodesic_direct.txt", "w") as f:
    f.write("# lat1 lon1 azi1_deg s12_m lat2 lon2 azi2_deg  (GeodSolve -p 9)\n")
    for p, line in zip(direct, out):
        f.write(" ".join(str(v) for v in p) + " " + " ".join(line.split()) + "\n")

# Points along whole legs, for the Track.PointAt tests: GeodSolve -L from
# the leg start along the initial azimuth, every 250 km and at the end.
legs = [
    ("antimeridian", 35.55, 139.78, 37.62, -122.38),
    ("transpolar", 85.0, -40.0, 85.0, 140.0),
    ("polar", 70.0, -100.0, 75.0, 60.0),
]
with open("geodesic_legs.txt", "w") as f:
    f.write("# leg lat1 lon1 lat2 lon2 s_m lat lon azi_deg  (GeodSolve -i, then GeodSolve -L lat1 lon1 azi1 -p 9)\n")
    for name, a, b, c, d in legs:
        azi1, _, s12 = subprocess.run(["GeodSolve", "-i", "-p", "9"], input=f"{a} {b} {c} {d}\n",
                                      capture_output=True, text=True, check=True).stdout.split()
        dists = [k * 250_000.0 for k in range(int(float(s12) // 250_000) + 1)] + [float(s12)]
        out = subprocess.run(["GeodSolve", "-L", str(a), str(b), azi1, "-p", "9"],
                             input="".join(f"{s!r}\n" for s in dists),
                             capture_output=True, text=True, check=True).stdout.split("\n")
        for s, line in zip(dists, out):
            f.write(f"{name} {a} {b} {c} {d} {s!r} " + " ".join(line.split()) + "\n")
