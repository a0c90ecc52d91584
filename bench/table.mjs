// Benchmark table of issue 11: every row in seconds and as a ratio against a bare loop of
// 2x2 complex matrix-vector products (same pixel count, 200 slices per pixel, one thread),
// measured in the same run. Run with `npm run bench` (builds dist/ first). Never a timed test.
//
// Columns:
//   process  whole CLI process (`node dist/cli/main.js render|demo`): start-up, workers, writing files
//   warm     in this process, worker pool already started, median of 3 renders (the pure image work)
//   1 thread in this process, on the main thread (no workers), once, after a warm-up
// Every column shows wall-clock seconds and CPU seconds (all threads; for the whole process from
// /usr/bin/time). On a shared machine the wall clock also counts waiting for a core; CPU seconds
// do not, so the ratios use CPU seconds (baseline: one thread, CPU = wall).
// Usage: node bench/table.mjs [--no-process]
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parseScenario } from '../dist/scenario/parse.js';
import { renderJob } from '../dist/imaging/renderScenario.js';
import { resolveCondition } from '../dist/imaging/resolveCondition.js';
import { createRenderPool } from '../dist/imaging/workerPool.js';
import { renderRows } from '../dist/imaging/renderRows.js';
import { renderTranslated, translationPlan } from '../dist/imaging/translationColumns.js';
import { inclinedDislocation } from './common.mjs';

const args = process.argv.slice(2);
const withProcess = !args.includes('--no-process');
const SLICES = 200;

/** The baseline: n pixels x 200 slices of a 2x2 complex matrix times a 2-vector, on typed arrays. */
function bareLoop(n) {
  const m = new Float64Array(8);
  for (let i = 0; i < 8; i++) m[i] = 0.3 + 0.01 * i;
  m[0] = 0.9; m[6] = 0.9; // a contraction, so nothing overflows
  const out = new Float64Array(4 * n);
  const c0 = process.cpuUsage();
  for (let p = 0; p < n; p++) {
    let ar = 1, ai = 0, br = 0, bi = 0;
    for (let s = 0; s < SLICES; s++) {
      const nar = m[0] * ar - m[1] * ai + m[2] * br - m[3] * bi;
      const nai = m[0] * ai + m[1] * ar + m[2] * bi + m[3] * br;
      const nbr = m[4] * ar - m[5] * ai + m[6] * br - m[7] * bi;
      const nbi = m[4] * ai + m[5] * ar + m[6] * bi + m[7] * br;
      ar = nar; ai = nai; br = nbr; bi = nbi;
    }
    out[4 * p] = ar; out[4 * p + 1] = ai; out[4 * p + 2] = br; out[4 * p + 3] = bi;
  }
  const c = process.cpuUsage(c0);
  const s = (c.user + c.system) / 1e6; // CPU seconds of this thread's loop (on a shared machine wall time also counts waiting)
  if (!Number.isFinite(out[4 * n - 1])) throw new Error('baseline overflowed');
  return s;
}
const cpuNow = () => {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1e6;
};
/** Wall and CPU seconds of f (async allowed). */
async function clock(f) {
  const c0 = cpuNow();
  const t0 = performance.now();
  const r = await f();
  return { wall: (performance.now() - t0) / 1000, cpu: cpuNow() - c0, r };
}
/** Wall and CPU seconds of a child process (CPU from /usr/bin/time). */
function processClock(args) {
  const t0 = performance.now();
  const p = spawnSync('/usr/bin/time', ['-f', 'CPU %U %S', process.execPath, ...args], { encoding: 'utf8' });
  const wall = (performance.now() - t0) / 1000;
  if (p.status !== 0) throw new Error(`${args[1]} failed: ${p.stderr}`);
  const m = /CPU ([\d.]+) ([\d.]+)/.exec(p.stderr);
  return { wall, cpu: m ? Number(m[1]) + Number(m[2]) : NaN };
}
function median(f, k = 3) {
  const t = [];
  for (let i = 0; i < k; i++) t.push(f());
  return t.sort((a, b) => a - b)[Math.floor(k / 2)];
}

const dislocation = (size, pixel) => inclinedDislocation({ name: `bench dislocation ${size}`, size, pixel_nm: pixel });
const weakBeam = {
  name: 'bench weak beam',
  material: 'Cu',
  kV: 200,
  foil: { thickness_nm: 100, normal: [0, 0, 1] },
  beam: [0, 0, 1],
  imageX: [1, 0, 0],
  image: { width_px: 256, height_px: 256, pixel_nm: 0.25 },
  surfaces: 'infinite',
  conditions: [{ id: 'wb', g: [2, 2, 0], weakBeam: 3, beams: { row: [-2, 4] } }], // 7 beams holding 3g and 4g
  defects: [{ type: 'dislocation', b: '1/2[1 1 0]', line: [1, -1, 2], point_nm: [0, 0, 50] }],
};

const rows = [
  { work: '256x256 BF+DF, one inclined dislocation, 100 nm Cu, g 200, w 0.5', scenario: dislocation(256, 0.5), target: 0.15 },
  { work: 'same at 512x512', scenario: dislocation(512, 0.25), target: 0.3 },
  { work: '256x256 weak beam g(3g), 7-beam row, one dislocation', scenario: weakBeam, target: 1.5 },
  // the rows above are in the infinite medium (the path their targets were set for); this one has the default relaxed surfaces
  { work: '256x256 BF+DF, the same dislocation with relaxed surfaces (the default)', scenario: { ...dislocation(256, 0.5), surfaces: 'relaxed' }, target: NaN },
];

const pool = createRenderPool();
const tmp = mkdtempSync(join(tmpdir(), 'thinfoil-bench-'));
const results = [];
try {
  for (const r of rows) {
    const sc = parseScenario(r.scenario);
    const job = renderJob(sc, resolveCondition(sc, sc.conditions[0]));
    const n = job.width * job.height;
    const base = median(() => bareLoop(n));
    // warm-up: a small job column by column starts the workers (a pool starts them itself only after about
    // 1 s of in-thread rendering), then the job itself (JIT in the workers)
    await pool.render({ ...job, width: 16, height: 16, shareColumns: false });
    await pool.render(job);
    const warms = [];
    for (let k = 0; k < 3; k++) warms.push(await clock(() => pool.render(job)));
    const warm = warms.sort((a, b) => a.wall - b.wall)[1];
    const bf = new Float32Array(n);
    const df = new Float32Array(n);
    const plan = translationPlan(job);
    const inThread = () => (plan === null ? renderRows(job, 0, job.height, bf, df) : renderTranslated(job, plan, 0, 1, bf, df));
    inThread(); // warm-up
    const one = await clock(inThread);
    const st = one.r;
    let proc = { wall: NaN, cpu: NaN };
    if (withProcess) {
      const file = join(tmp, 'scenario.json');
      writeFileSync(file, JSON.stringify(r.scenario));
      proc = processClock(['dist/cli/main.js', 'render', file, '--out', join(tmp, 'out'), '--json']);
    }
    results.push({ work: r.work, target: r.target, base, proc, warm, one, path: plan === null ? 'each column' : 'shared columns', slicesPerColumn: st.slices / n });
  }
  if (withProcess) {
    const base = median(() => bareLoop(256 * 256));
    const proc = processClock(['dist/cli/main.js', 'demo', '--out', join(tmp, 'demo')]);
    results.push({ work: '`npm run demo` (whole command, all conditions and the identification)', target: 8, base, proc, warm: { wall: NaN, cpu: NaN }, one: { wall: NaN, cpu: NaN }, path: '-', slicesPerColumn: NaN });
  }
} finally {
  await pool.close();
  rmSync(tmp, { recursive: true, force: true });
}

const f = (x) => (Number.isFinite(x) ? x.toPrecision(3) : '-');
const cell = (t, b) => (Number.isFinite(t.wall) ? `${f(t.wall)} / ${f(t.cpu)} (${(t.cpu / b).toPrecision(3)}x)` : '-');
console.log(`baseline: bare loop of 2x2 complex matrix-vector products, pixels x ${SLICES} slices, one thread, same run (CPU s, median of 3)`);
console.log(`${pool.threads} worker threads; cells: wall s / CPU s (CPU ratio to the baseline); process = whole CLI command;`);
console.log('warm = pool already started (median of 3); 1 thread = main thread, no workers');
console.log('');
console.log('| work | baseline s | process | warm | 1 thread | path | slices/column | target s |');
console.log('|---|---|---|---|---|---|---|---|');
for (const r of results) {
  console.log(`| ${r.work} | ${f(r.base)} | ${cell(r.proc, r.base)} | ${cell(r.warm, r.base)} | ${cell(r.one, r.base)} | ${r.path} | ${f(r.slicesPerColumn)} | ${Number.isFinite(r.target) ? `<= ${r.target}` : "-"} |`);
}
