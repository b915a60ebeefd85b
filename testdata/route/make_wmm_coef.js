// Prints the WMM2025 coefficient rows of route/wmm_coef.go from the npm
// package magvar 2.2.0: NODE_PATH=/tmp/node_modules node make_wmm_coef.js
const path = require('path');
const c = require(path.join(path.dirname(require.resolve('magvar')), 'WMMCOF2025.js'));
const f = (x) => { let s = Number(x).toFixed(1); if (s === '-0.0') s = '0.0'; return s; };
let out = [];
for (let n = 1; n <= 12; n++) for (let m = 0; m <= n; m++)
  out.push(`\t{${n}, ${m}, ${f(c.gnmWmm[n][m])}, ${f(c.hnmWmm[n][m])}, ${f(c.gtnmWmm[n][m])}, ${f(c.htnmWmm[n][m])}},`);
console.log(out.join('\n'));
