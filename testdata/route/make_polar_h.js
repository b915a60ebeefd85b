// Generates wmm_polar_h.txt: WMM2025 horizontal intensity H near the
// magnetic poles, the reference for levelpath/route's compass zones
// (caution H < 6000 nT, blackout H < 2000 nT).
// Reference: npm package magvar 2.2.0 (calculateMagneticField's h, rounded
// by magvar to 0.1 nT). Run:
//   mkdir -p /tmp/magvar && cd /tmp/magvar && npm install magvar@2.2.0
//   NODE_PATH=/tmp/magvar/node_modules node make_polar_h.js > wmm_polar_h.txt
const { calculateMagneticField } = require('magvar');

const rows = [];
// Eleven points on the great circle (spherical, positions only) from
// 80N 100E to 88N 170E, the polar test route, at 2026.5 and 0 km.
const rad = Math.PI / 180;
const toV = (lat, lon) => [Math.cos(lat * rad) * Math.cos(lon * rad), Math.cos(lat * rad) * Math.sin(lon * rad), Math.sin(lat * rad)];
const a = toV(80, 100), b = toV(88, 170);
const om = Math.acos(a[0] * b[0] + a[1] * b[1] + a[2] * b[2]);
for (let i = 0; i <= 10; i++) {
  const f = i / 10;
  const ka = Math.sin((1 - f) * om) / Math.sin(om), kb = Math.sin(f * om) / Math.sin(om);
  const v = [0, 1, 2].map((k) => ka * a[k] + kb * b[k]);
  const lat = Math.atan2(v[2], Math.hypot(v[0], v[1])) / rad;
  const lon = Math.atan2(v[1], v[0]) / rad;
  rows.push([2026.5, 0, Math.round(lat * 1000) / 1000, Math.round(lon * 1000) / 1000]);
}
// A ring of points round each dip pole and a few well outside the zones.
for (const lon of [-180, -120, -60, 0, 60, 120]) {
  rows.push([2027.0, 11, 84, lon], [2027.0, 11, 75, lon], [2027.0, 11, -68, lon]);
}
for (const [lat, lon] of [[86, 140], [85, 170], [-64, 136], [51.5, 0], [0, 0]]) {
  rows.push([2025.5, 0, lat, lon]);
}
console.log('# decimal_year alt_km lat lon h_nT  (magvar 2.2.0 calculateMagneticField)');
for (const [year, alt, lat, lon] of rows) {
  const m = calculateMagneticField(year, lat, lon, alt);
  console.log([year, alt, lat, lon, m.h].join(' '));
}
