// Benchmark: 256 x 256 bright- and dark-field images of one inclined dislocation in a 100 nm foil.
// Prints column-slices per second and ratios against a plain fixed-step RK4 integration of the
// same equations, measured in the same run at equal accuracy (1e-4 in intensity).
// Run with `npm run bench` (builds dist/ first). Never a timed test.
import { parseScenario } from '../dist/scenario/parse.js';
import { renderJob } from '../dist/imaging/renderScenario.js';
import { resolveCondition } from '../dist/imaging/resolveCondition.js';
import { createRenderPool } from '../dist/imaging/workerPool.js';
import { renderRows } from '../dist/imaging/renderRows.js';
import { fmt, inclinedDislocation } from './common.mjs';

const sc = parseScenario(inclinedDislocation());
const cond = resolveCondition(sc, sc.conditions[0]);
const W = sc.image.width_px;
const H = sc.image.height_px;

function inThread(job, rows) {
  const bf = new Float32Array(W * H);
  const df = new Float32Array(W * H);
  let slices = 0;
  const t0 = performance.now();
  for (const j of rows) {
    const s = renderRows(job, j, j + 1, bf.subarray(j * W, (j + 1) * W), df.subarray(j * W, (j + 1) * W));
    slices += s.slices;
  }
  return { bf, df, slices, seconds: (performance.now() - t0) / 1000 };
}

function maxError(a, ref, rows) {
  let e = 0;
  for (const j of rows) for (let i = 0; i < W; i++) {
    const k = j * W + i;
    e = Math.max(e, Math.abs(a.bf[k] - ref.bf[k]), Math.abs(a.df[k] - ref.df[k]));
  }
  return e;
}

const allRows = Array.from({ length: H }, (_, j) => j);
const sampleRows = allRows.filter((j) => j % 8 === 3);

console.log('reference: adaptive integrator at tol 1e-9 (sampled rows)');
const ref = inThread(renderJob(sc, cond, 1e-9), sampleRows);

// RK4: the smallest step count (doubling) that reaches 1e-4 on the sampled rows
let steps = 25;
let rk;
for (;;) {
  rk = inThread({ ...renderJob(sc, cond), rk4Steps: steps }, sampleRows);
  const e = maxError(rk, ref, sampleRows);
  console.log(`  RK4 ${String(steps).padStart(5)} steps/column: max error ${e.toExponential(2)}`);
  if (e <= 1e-4 || steps >= 12800) break;
  steps *= 2;
}

const job = renderJob(sc, cond); // default tolerance
const ours1 = inThread(job, allRows);
const err = maxError(ours1, ref, sampleRows);
const rkFull = inThread({ ...renderJob(sc, cond), rk4Steps: steps }, allRows);

const pool = createRenderPool();
await pool.render(job); // warm-up
const times = [];
for (let r = 0; r < 3; r++) {
  const t0 = performance.now();
  await pool.render(job);
  times.push((performance.now() - t0) / 1000);
}
await pool.close();
const wall = times.sort((a, b) => a - b)[1];

console.log('');
console.log(`image: 256 x 256, bright + dark field from one integration, inclined mixed dislocation, t = 100 nm, Cu 200, w = 0.5`);
console.log(`adaptive (default tol ${job.tol}), 1 thread : ${fmt(ours1.seconds)} s, ${fmt(ours1.slices / W / H)} slices/column, ${fmt(ours1.slices / ours1.seconds / 1e6)} M column-slices/s, max error ${err.toExponential(2)}`);
console.log(`RK4 baseline (${steps} steps), 1 thread    : ${fmt(rkFull.seconds)} s, ${fmt(rkFull.slices / rkFull.seconds / 1e6)} M column-steps/s`);
console.log(`adaptive, ${pool.threads} worker threads (median of 3): ${fmt(wall)} s for the pair of images`);
console.log('');
console.log(`ratio RK4 / adaptive, same thread count: ${fmt(rkFull.seconds / ours1.seconds)}x`);
console.log(`ratio RK4 (1 thread) / adaptive (${pool.threads} threads), wall clock: ${fmt(rkFull.seconds / wall)}x`);
