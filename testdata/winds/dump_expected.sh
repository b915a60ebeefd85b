#!/bin/sh
# Dump the values ecCodes decodes from each fixture (lat lon value per point,
# in the file's order; missing points print NaN).
set -e
for f in *.grib1 *.grib2; do
  case $f in g2_jpeg*|g2_ccsds*|g2_gaussian*) continue;; esac
  grib_get_data -m NaN -F "%.9g" "$f" > "${f%.*}.txt"
done
