// Benchmark: the cost of the integrator's guards on two pathological columns (formerly timed
// assertions in test/dynamics/twoBeamAdaptive.test.ts), as a ratio against a bare loop of
// 200 2x2 complex matrix-vector products (one column of the baseline of bench/table.mjs),
// measured in the same run. Run with `npm run bench`. Never a timed test.
import { integrateColumn } from '../dist/dynamics/twoBeam.js';

const p = { xi_nm: 30, xiAbs_nm: 300, xiAbs0_nm: 300, s_per_nm: 0 };
const out = new Float64Array(4);
const none = new Float64Array(0);
const spike = (z) => (1 / (2 * Math.PI)) * (0.01 / (0.01 * 0.01 + (z - 41.3) * (z - 41.3)));
const fast = (z) => 50 * Math.sin((2 * Math.PI * z) / 3e-4);

function bare(reps) {
  const m = [0.9, 0.31, 0.32, 0.33, 0.34, 0.35, 0.9, 0.37];
  let s = 0;
  for (let r = 0; r < reps; r++) {
    let ar = 1, ai = 0, br = 0, bi = 0;
    for (let k = 0; k < 200; k++) {
      const nar = m[0] * ar - m[1] * ai + m[2] * br - m[3] * bi;
      const nai = m[0] * ai + m[1] * ar + m[2] * bi + m[3] * br;
      const nbr = m[4] * ar - m[5] * ai + m[6] * br - m[7] * bi;
      const nbi = m[4] * ai + m[5] * ar + m[6] * bi + m[7] * br;
      ar = nar; ai = nai; br = nbr; bi = nbi;
    }
    s += ar;
  }
  return s;
}
function time(f, reps) {
  f();
  const t0 = performance.now();
  for (let r = 0; r < reps; r++) f();
  return (performance.now() - t0) / reps;
}
const base = time(() => bare(1000), 20) / 1000;
const rows = [
  ['column 0.01 nm from a dislocation core (resolved spike)', time(() => integrateColumn(out, p, 100, spike, none, 1e-4, { slices: 0 }), 20)],
  ["beta' oscillating faster than the shortest slice (guards end it)", time(() => integrateColumn(out, p, 100, fast, none, 1e-4, { slices: 0 }), 5)],
];
console.log(`baseline: one column of 200 bare 2x2 complex matrix-vector products = ${(base * 1000).toPrecision(3)} us`);
for (const [name, ms] of rows) console.log(`${name}: ${ms.toPrecision(3)} ms = ${(ms / base).toPrecision(3)} x baseline column`);
