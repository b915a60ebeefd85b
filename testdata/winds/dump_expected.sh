#!/bin/sh
# Dump the values ecCodes decodes from each fixture (lat lon value per point;
# missing points print NaN).
set -e
for f in *.grib1 *.grib2; do
  case $f in g2_jpeg*|g2_gaussian*|g2_boustro*) continue;; esac
  grib_get_data -m NaN -F "%.9g" "$f" > "${f%.*}.txt"
done
# ecCodes 2.28 does not apply alternativeRowScanning in its geoiterator:
# the boustrophedon fixture holds g2_simple's values with odd rows reversed,
# so its reference is g2_simple's dump.
cp g2_simple.txt g2_boustro.txt
