// Benchmark: the two-beam column-by-column ("general") path, integrator against the previous one in the same run.
// Each row renders one image column by column in one thread (renderRows, shareColumns false) twice, interleaved,
// median of 5 CPU times each after two warm-up renders: with integrateColumn (Simpson samples of beta', twoBeamColumn.ts) and with the
// previous integrator as the baseline (Gauss-Legendre samples, twoBeamColumnGauss.ts, RenderJob.gaussNodes).
// Prints CPU seconds, the ratio baseline / now, slices and beta' samples per column, and the largest intensity
// difference between the two images (both at the renderer's tolerance 1e-4).
// Then, for accuracy rather than speed: 450 random columns of 1-3 Lorentzian peaks of beta' (widths from 0.01 or
// from 0.1 nm up to 20 nm) integrated at tolerances 1e-3 .. 1e-6 by both integrators against fixed-step RK4
// (rk4Reference.ts, at least 40 steps per width of the narrowest peak): how many column-tolerance pairs miss the
// tolerance (peaks narrower than the sample spacing can fall between samples; see DEFAULT_MAX_SLICE_NM of twoBeamColumn.ts).
// Run: node bench/columns.mjs after building dist/ (npx tsc -p tsconfig.build.json). Never a timed test.
import { parseScenario } from '../dist/scenario/parse.js';
import { renderJob } from '../dist/imaging/renderScenario.js';
import { resolveCondition } from '../dist/imaging/resolveCondition.js';
import { columnEvaluator, renderRows } from '../dist/imaging/renderRows.js';
import { pixelX } from '../dist/geometry/frames.js';
import { DEMO_SCENARIO } from '../dist/scenario/demo.js';
import { integrateColumn, DEFAULT_MAX_SLICE_NM } from '../dist/dynamics/twoBeamColumn.js';
import { integrateColumnGaussNodes } from '../dist/dynamics/twoBeamColumnGauss.js';
import { rk4Column } from '../dist/dynamics/rk4Reference.js';
import { DEMO_IDENTIFY_SCENARIO } from '../dist/scenario/demoIdentify.js';
import { fmt, inclinedDislocation, lcg, median, normalScrew } from './common.mjs';

const inclined = inclinedDislocation({ name: 'bench-inclined', size: 128, pixel_nm: 1 });
const normal = { ...normalScrew(), surfaces: 'relaxed' };
// the identification's full-size view of one candidate (the demo's line, b = 1/2[0 -1 1]) at the micrograph's g angle
const view = { ...DEMO_IDENTIFY_SCENARIO, defects: [{ ...DEMO_IDENTIFY_SCENARIO.defects[0], b: '1/2[0 -1 1]' }] };

const rows = [
  ['inclined mixed 1/2[101] along [112], Cu, 128 x 128 px of 1 nm, g 200, w 0.5, t 100 nm (render --each-column)', inclined, 0],
  ['the same with relaxed foil surfaces', { ...inclined, surfaces: 'relaxed' }, 0],
  ['screw 1/2[110] normal to a (110) foil, beam tilted to [551], relaxed surfaces, 128 x 128 px, g 1-11', normal, 0],
  ['demo scenario (3 lines, a fault ribbon, an inclusion, 2 loops), 128 x 128 px, condition g200, infinite medium', { ...DEMO_SCENARIO, surfaces: 'infinite' }, 0],
  ['identification view: demo line, candidate 1/2[0-11], 64 x 64 px, condition g11m1 (beam [011])', view, 2],
];

function prepare(spec, ci) {
  const sc = parseScenario(spec);
  const job = { ...renderJob(sc, resolveCondition(sc, sc.conditions[ci])), shareColumns: false };
  return job;
}

function renderOnce(job) {
  const n = job.width * job.height;
  const bf = new Float32Array(n), df = new Float32Array(n);
  const c0 = process.cpuUsage();
  const st = renderRows(job, 0, job.height, bf, df);
  const c = process.cpuUsage(c0);
  return { seconds: (c.user + c.system) / 1e6, bf, df, slices: st.slices, columns: st.columns };
}

/** beta' samples per column over every pixel centre. */
function samplesPerColumn(job) {
  const ev = columnEvaluator(job);
  const out = new Float64Array(4);
  for (let j = 0; j < job.height; j++) for (let i = 0; i < job.width; i++) ev.column(out, pixelX(i, job.width, job.pixel_nm), pixelX(j, job.height, job.pixel_nm));
  return ev.stats.betaCalls / (job.width * job.height);
}

console.log('two-beam column by column, one thread, CPU seconds (median of 5, interleaved, after 2 warm-ups); baseline = previous integrator (Gauss-Legendre samples)');
for (const [label, spec, ci] of rows) {
  const now = prepare(spec, ci);
  const base = { ...now, gaussNodes: true };
  for (let r = 0; r < 2; r++) {
    renderOnce(now); // warm-up (JIT)
    renderOnce(base);
  }
  const tN = [], tB = [];
  let a, b;
  for (let r = 0; r < 5; r++) {
    b = renderOnce(base);
    a = renderOnce(now);
    tB.push(b.seconds);
    tN.push(a.seconds);
  }
  let diff = 0;
  for (let k = 0; k < a.bf.length; k++) diff = Math.max(diff, Math.abs(a.bf[k] - b.bf[k]), Math.abs(a.df[k] - b.df[k]));
  console.log(`${label}:`);
  console.log(`  baseline ${fmt(median(tB))} s (${fmt(b.slices / b.columns)} slices, ${fmt(samplesPerColumn(base))} beta' samples per column)`);
  console.log(`  now      ${fmt(median(tN))} s (${fmt(a.slices / a.columns)} slices, ${fmt(samplesPerColumn(now))} beta' samples per column)`);
  console.log(`  ratio baseline / now ${fmt(median(tB) / median(tN))}x; largest |I_now - I_baseline| ${diff.toExponential(2)}`);
}

/** Column-tolerance pairs over the tolerance, for both integrators, on 450 random columns with peak widths from wMin. */
function misses(wMin, seed) {
  const rnd = lcg(seed);
  const none = new Float64Array(0), out = new Float64Array(4), ref = new Float64Array(4);
  const inten = (a) => [a[0] ** 2 + a[1] ** 2, a[2] ** 2 + a[3] ** 2];
  const count = { now: 0, baseline: 0 };
  for (let c = 0; c < 450; c++) {
    const t = 40 + 160 * rnd();
    const xiAbs = rnd() < 0.3 ? Infinity : 200 + 600 * rnd();
    const p = { xi_nm: 20 + 60 * rnd(), xiAbs_nm: xiAbs, xiAbs0_nm: xiAbs, s_per_nm: 0.02 * (rnd() - 0.5) };
    const n = 1 + Math.floor(3 * rnd());
    const peaks = Array.from({ length: n }, () => {
      const sign = rnd() - 0.5;
      const w = Math.exp(Math.log(wMin) + (Math.log(20) - Math.log(wMin)) * rnd());
      return { A: (0.2 * sign) / Math.max(w, 0.05), w, z0: t * rnd() };
    });
    const f = (z) => {
      let v = 0;
      for (const q of peaks) {
        const u = (z - q.z0) / q.w;
        v += q.A / (1 + u * u);
      }
      return v;
    };
    const narrowest = Math.min(...peaks.map((q) => q.w));
    rk4Column(ref, p, t, f, Math.min(400000, Math.max(4000, Math.ceil((t / narrowest) * 40))));
    const [r0, rg] = inten(ref);
    for (const tol of [1e-3, 1e-4, 1e-5, 1e-6]) {
      // each with the longest slice the renderer gives it (13 nm now, 20 nm before)
      for (const [name, integrate, hMax] of [['now', integrateColumn, DEFAULT_MAX_SLICE_NM], ['baseline', integrateColumnGaussNodes, 20]]) {
        integrate(out, p, t, f, none, tol, undefined, hMax);
        const [a, b] = inten(out);
        if (Math.max(Math.abs(a - r0), Math.abs(b - rg)) > tol) count[name]++;
      }
    }
  }
  return count;
}
console.log('random columns of 1-3 Lorentzian peaks against RK4: column-tolerance pairs (of 1800) over the tolerance');
for (const wMin of [0.01, 0.1]) {
  const c = misses(wMin, 20261202);
  console.log(`  widths ${wMin}-20 nm: now ${c.now}, baseline ${c.baseline}`);
}
