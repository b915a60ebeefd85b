// Generates wmm_magvar.txt, the WMM2025 reference fixture for levelpath/route.
// Reference: npm package magvar 2.2.0 (World Magnetic Model 2025-2030,
// public-domain NOAA/BGS coefficients). Run:
//   cd /tmp && npm install magvar@2.2.0
//   NODE_PATH=/tmp/node_modules node make_wmm.js > wmm_magvar.txt
const { calculateMagneticField } = require('magvar');

// Small deterministic generator (mulberry32) so the fixture is reproducible.
let seed = 20250315;
function rand() {
  seed |= 0; seed = (seed + 0x6d2b79f5) | 0;
  let t = Math.imul(seed ^ (seed >>> 15), 1 | seed);
  t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
  return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
}
const r3 = (x) => Math.round(x * 1000) / 1000;

console.log('# decimal_year alt_km lat lon decl_deg x_nT y_nT z_nT  (magvar 2.2.0 calculateMagneticField)');
const rows = [];
for (let i = 0; i < 80; i++) {
  const lat = r3(Math.asin(2 * rand() - 1) * 180 / Math.PI * 0.99);
  const lon = r3(360 * rand() - 180);
  const alt = r3(15 * rand());
  const year = r3(2025 + 4.999 * rand());
  rows.push([year, alt, lat, lon]);
}
// A few cruise-altitude points along high-latitude and antimeridian routes.
for (const [lat, lon] of [[85, 0], [85, 90], [85, -120], [-85, 45], [60, 179.9], [60, -179.9], [0, 180], [70, -150]]) {
  rows.push([2026.5, 11, lat, lon]);
}
for (const [year, alt, lat, lon] of rows) {
  const f = calculateMagneticField(year, lat, lon, alt);
  console.log([year, alt, lat, lon, f.declination, f.x, f.y, f.z].join(' '));
}
