// Benchmark: cost of the anisotropic (Stroh) displacement field against the isotropic one, same run.
// 1. A 256 x 256 bright/dark-field render of one inclined mixed dislocation in Cu (one thread),
//    "elasticity": "anisotropic" vs "isotropic", interleaved, median of 3 each.
// 2. The per-point cost of the directional derivative beta' = g.(grad R).k that the integrator calls,
//    for the diagonal (well separated p) and the degenerate-safe (triangular) Stroh evaluation.
// Run with `npm run bench` (builds dist/ first). Never a timed test.
import { parseScenario } from '../dist/scenario/parse.js';
import { renderJob } from '../dist/imaging/renderScenario.js';
import { resolveCondition } from '../dist/imaging/resolveCondition.js';
import { renderRows } from '../dist/imaging/renderRows.js';
import { straightDislocation } from '../dist/elasticity/straightDislocation.js';
import { anisotropicDislocation } from '../dist/elasticity/anisotropicDislocation.js';
import { voigtStiffness } from '../dist/elasticity/stiffness.js';
import { fmt, inclinedDislocation, lcg, median, perPointNs } from './common.mjs';

const base = inclinedDislocation();

function renderOnce(elasticity) {
  const sc = parseScenario({ ...base, elasticity });
  const job = renderJob(sc, resolveCondition(sc, sc.conditions[0]));
  const W = sc.image.width_px, H = sc.image.height_px;
  const bf = new Float32Array(W * H), df = new Float32Array(W * H);
  let slices = 0;
  // CPU time of this thread's work (robust when other processes share the cores)
  const c0 = process.cpuUsage();
  for (let j = 0; j < H; j++) slices += renderRows(job, j, j + 1, bf.subarray(j * W, (j + 1) * W), df.subarray(j * W, (j + 1) * W)).slices;
  const c = process.cpuUsage(c0);
  return { seconds: (c.user + c.system) / 1e6, slices };
}

renderOnce('isotropic'); // warm-up
renderOnce('anisotropic');
const tI = [], tA = [];
let sI = 0, sA = 0;
for (let r = 0; r < 3; r++) {
  const a = renderOnce('anisotropic');
  const i = renderOnce('isotropic');
  tA.push(a.seconds);
  tI.push(i.seconds);
  sA = a.slices;
  sI = i.slices;
}
console.log('render 256 x 256, Cu, mixed 1/2[101] along [112], g = 200, w = 0.5, t = 100 nm, one thread, CPU seconds (median of 3):');
console.log(`  isotropic  : ${fmt(median(tI))} s, ${fmt(sI / 65536)} slices/column`);
console.log(`  anisotropic: ${fmt(median(tA))} s, ${fmt(sA / 65536)} slices/column`);
console.log(`  ratio anisotropic / isotropic: ${fmt(median(tA) / median(tI))}x (limit 2x)`);

// per-point cost of beta'
const N = 2_000_000;
const pts = new Float64Array(3 * 4096);
const rnd = lcg();
for (let i = 0; i < pts.length; i++) pts[i] = 40 * rnd() - 20;
const g = [4.5, 1.2, -0.7], k = [0.1, 0.2, 0.97];
const opts = { b_nm: [0.18, 0, 0.18], line: [1, 1, 2], point_nm: [0, 0, 0], coreRadius_nm: 0.01 };
const cu = voigtStiffness({ C11: 168.4, C12: 121.4, C44: 75.4 }, 'cubic');
const fields = {
  isotropic: straightDislocation({ ...opts, poissonRatio: 0.34 }),
  'anisotropic (diagonal)': anisotropicDislocation({ ...opts, stiffness_GPa: cu }),
  'anisotropic (triangular)': anisotropicDislocation({ ...opts, stiffness_GPa: cu, forceTriangular: true }),
};
const perPoint = (f) => perPointNs(f, g, k, pts, N);
const res = {};
for (let r = 0; r < 3; r++) for (const [name, f] of Object.entries(fields)) (res[name] ??= []).push(perPoint(f).ns);
console.log('directional derivative g.(grad R).k per point, CPU time (median of 3):');
const iso = median(res.isotropic);
for (const name of Object.keys(fields)) console.log(`  ${name.padEnd(25)}: ${fmt(median(res[name]))} ns  (${fmt(median(res[name]) / iso)}x isotropic)`);
