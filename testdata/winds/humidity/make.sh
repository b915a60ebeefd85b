#!/bin/sh
# Makes the humidity fixtures from the fixtures one folder up with ecCodes'
# grib_copy and grib_set (tested with ecCodes 2.28.0). See README.md.
set -eu
cd "$(dirname "$0")"
src=..
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT

# GRIB2: u, v, t at 300 and 200 hPa, steps 0 and 6 h (g2_multi without its
# EDR, ensemble and 2 m fields), relative humidity 0.1.1 and specific
# humidity 0.1.0 made from the temperature fields (206.6..259.1 K) by
# offsetValuesBy/scaleValuesBy: RH = 2.2 (T - 200) %, q = 1e-6 (T - 200)
# kg/kg.
grib_copy -w shortName=u/v/t,typeOfLevel=isobaricInhPa,level=300/200 $src/g2_multi.grib2 "$tmp/uvt.grib2"
grib_copy -w shortName=t "$tmp/uvt.grib2" "$tmp/t.grib2"
grib_set -s parameterCategory=1,parameterNumber=1,offsetValuesBy=-200,scaleValuesBy=2.2 "$tmp/t.grib2" "$tmp/rh.grib2"
grib_set -s parameterCategory=1,parameterNumber=0,offsetValuesBy=-200,scaleValuesBy=1e-6 "$tmp/t.grib2" "$tmp/q.grib2"
cat "$tmp/uvt.grib2" "$tmp/rh.grib2" "$tmp/q.grib2" > g2_humid.grib2
# The same from NCEP (centre 7): its relative humidity is over water.
grib_set -s centre=7 g2_humid.grib2 g2_humid_ncep.grib2
# Specific humidity alone beside the winds.
cat "$tmp/uvt.grib2" "$tmp/q.grib2" > g2_q_only.grib2

# GRIB1: u, v, T of g1_wmo (250 hPa, values -6.9..50.8) with relative
# humidity (table 2 parameter 52: 2 (x + 10) %) and specific humidity (51:
# 1e-5 (x + 10) kg/kg) from the T message; and the same with ECMWF local
# table 128 (157 and 133) from g1_ecmwf.
grib_copy -w indicatorOfParameter=11 $src/g1_wmo.grib1 "$tmp/t1.grib1"
grib_set -s indicatorOfParameter=52,offsetValuesBy=10,scaleValuesBy=2 "$tmp/t1.grib1" "$tmp/rh1.grib1"
grib_set -s indicatorOfParameter=51,offsetValuesBy=10,scaleValuesBy=1e-5 "$tmp/t1.grib1" "$tmp/q1.grib1"
cat $src/g1_wmo.grib1 "$tmp/rh1.grib1" "$tmp/q1.grib1" > g1_humid.grib1
grib_copy -w indicatorOfParameter=130 $src/g1_ecmwf.grib1 "$tmp/t128.grib1"
grib_set -s indicatorOfParameter=157,offsetValuesBy=10,scaleValuesBy=2 "$tmp/t128.grib1" "$tmp/rh128.grib1"
grib_set -s indicatorOfParameter=133,offsetValuesBy=10,scaleValuesBy=1e-5 "$tmp/t128.grib1" "$tmp/q128.grib1"
cat $src/g1_ecmwf.grib1 "$tmp/rh128.grib1" "$tmp/q128.grib1" > g1_humid_ecmwf.grib1

# Bad input: relative humidity up to 3 (T - 200) = 177 % (over 150 %),
# down to 2.2 (T - 220) = -29 % (below 0), and at 400 hPa, a level the
# winds do not have.
grib_set -s parameterCategory=1,parameterNumber=1,offsetValuesBy=-200,scaleValuesBy=3 "$tmp/t.grib2" "$tmp/rhhi.grib2"
cat "$tmp/uvt.grib2" "$tmp/rhhi.grib2" > g2_rh_high.grib2
grib_set -s parameterCategory=1,parameterNumber=1,offsetValuesBy=-220,scaleValuesBy=2.2 "$tmp/t.grib2" "$tmp/rhlo.grib2"
cat "$tmp/uvt.grib2" "$tmp/rhlo.grib2" > g2_rh_negative.grib2
grib_set -s level=400 "$tmp/rh.grib2" "$tmp/rh400.grib2"
cat "$tmp/uvt.grib2" "$tmp/rh400.grib2" > g2_rh_level.grib2
