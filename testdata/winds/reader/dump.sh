#!/bin/sh
# Reference values and keys, as ecCodes 2.28 decodes them.
set -e
for f in g1_area[1-6].grib1 g2_area.grib2; do
  grib_get_data -m NaN -F "%.9g" "$f" > "${f%.*}.txt"
done
grib_get -p productDefinitionTemplateNumber,level,validityDate,validityTime g2_products.grib2 > g2_products.keys
grib_get -p gridType,Ni,Nj g1_polar.grib1 g1_gaussian.grib1 > g1_grids.keys
grib_get -p level,validityDate,validityTime g2_longstep.grib2 > g2_longstep.keys
grib_get -p count bomb.grib2 | tail -1 > bomb.keys
grib_get -p Ni,Nj,bitsPerValue -w count=1 bomb.grib2 >> bomb.keys
