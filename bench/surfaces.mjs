// Benchmark: cost of relaxed foil surfaces ("surfaces": "relaxed") against the infinite medium, same run.
// 1. Renders (one thread, the path the renderer would take: shared columns when translationPlan accepts
//    the job, else column by column), "relaxed" vs "infinite", interleaved, median of 3 each:
//    a. mixed dislocation parallel to the surfaces, isotropic (screw image series) and anisotropic (exact Stroh
//       plate correction, its table built once per line and thread): invariant along the line, shared columns in both;
//    b. inclined mixed dislocation (the half-space corrections change along the line: column by column when
//       relaxed, shared columns when infinite; also against the infinite medium column by column);
//    c. screw normal to the foil seen with a tilted beam (the Eshelby-Stroh twist changes along the line:
//       translationPlan declines it, so the relaxed render goes column by column);
//    d. pure edge parallel to the surfaces, isotropic (exact plate correction of the edge component, shared columns;
//       its table is built once per line and thread and kept, so after the warm-up this times the columns alone);
//    e. a spherical inclusion 12 nm deep (Mindlin & Cheng half-space corrections; column by column in both);
//    f. an edge normal to the foil (half-space corrections of the edge component: column by column when relaxed).
// 2. Per-point cost of beta' = g.(grad R).k for a line alone and for each correction.
// 3. Set-up of the plate corrections of a parallel line, isotropic edge and anisotropic (their residual tables, once per line), and of the inclined-line correction: building the two surface tables for a new line direction (they do
//    not depend on the line's point or the foil thickness, so only a new direction, b or material pays this), and
//    making the scalar g.F.k of both for a new condition.
// Run with `npm run bench` (builds dist/ first) or `node bench/surfaces.mjs` after a build. Never a timed test.
import { parseScenario } from '../dist/scenario/parse.js';
import { renderJob } from '../dist/imaging/renderScenario.js';
import { resolveCondition } from '../dist/imaging/resolveCondition.js';
import { renderRows } from '../dist/imaging/renderRows.js';
import { renderTranslated, translationPlan } from '../dist/imaging/translationColumns.js';
import { straightDislocation } from '../dist/elasticity/straightDislocation.js';
import { surfaceCorrection } from '../dist/elasticity/surfaceRelaxation.js';
import { anisotropicDislocation } from '../dist/elasticity/anisotropicDislocation.js';
import { voigtStiffness } from '../dist/elasticity/stiffness.js';
import { inclinedHalfSpaceCorrection } from '../dist/elasticity/surfaceHalfSpaceInclined.js';
import { sphericalInclusion } from '../dist/elasticity/inclusion.js';
import { inclusionSurfaceCorrection } from '../dist/elasticity/inclusionSurface.js';
import { edgeHalfSpaceImages } from '../dist/elasticity/surfaceEdgeImages.js';
import { plateEdgeCorrection } from '../dist/elasticity/surfacePlateEdge.js';
import { plateStrohCorrection } from '../dist/elasticity/surfacePlateStroh.js';
import { strohHalfSpaceImages } from '../dist/elasticity/surfaceImagesStroh.js';
import { fmt, inclinedDislocation, lcg, median, perPointNs, normalScrew } from './common.mjs';

const parallel = {
  name: 'bench-parallel',
  material: 'Cu',
  kV: 200,
  elasticity: 'isotropic',
  foil: { thickness_nm: 100, normal: [0, 0, 1] },
  beam: [0, 0, 1],
  imageX: [1, 0, 0],
  image: { width_px: 256, height_px: 256, pixel_nm: 0.5 },
  conditions: [{ id: 'g200', g: [2, 0, 0], w: 0.5 }],
  defects: [{ type: 'dislocation', b: '1/2[1 0 1]', line: [1, 1, 0], point_nm: [0, 0, 20] }],
};
const inclined = inclinedDislocation({ name: 'bench-inclined', size: 128, pixel_nm: 1 });
const normal = normalScrew();

const edgeParallel = { ...parallel, name: 'bench-edge-parallel', defects: [{ type: 'dislocation', b: '1/2[1 -1 0]', line: [1, 1, 0], point_nm: [0, 0, 20] }] };
const particle = {
  name: 'bench-inclusion',
  material: 'Cu',
  kV: 200,
  elasticity: 'isotropic',
  foil: { thickness_nm: 60, normal: [0, 0, 1] },
  beam: [0, 0, 1],
  imageX: [1, 0, 0],
  image: { width_px: 128, height_px: 128, pixel_nm: 0.5 },
  conditions: [{ id: 'g200', g: [2, 0, 0], w: 0.5 }],
  defects: [{ type: 'inclusion', centre_nm: [0, 0, 12], radius_nm: 6, misfit: 0.02 }],
};

function renderOnce(spec, surfaces) {
  const { eachColumn, ...rest } = spec;
  const sc = parseScenario({ ...rest, surfaces });
  const job0 = renderJob(sc, resolveCondition(sc, sc.conditions[0]));
  const job = eachColumn ? { ...job0, shareColumns: false } : job0;
  const W = sc.image.width_px, H = sc.image.height_px;
  const bf = new Float32Array(W * H), df = new Float32Array(W * H);
  const plan = translationPlan(job);
  const c0 = process.cpuUsage();
  if (plan !== null) renderTranslated(job, plan, 0, 1, bf, df);
  else for (let j = 0; j < H; j++) renderRows(job, j, j + 1, bf.subarray(j * W, (j + 1) * W), df.subarray(j * W, (j + 1) * W));
  const c = process.cpuUsage(c0);
  return { seconds: (c.user + c.system) / 1e6, shared: plan !== null };
}

for (const [label, spec] of [
  ['isotropic, mixed 1/2[101] along [110], parallel to the surfaces 20 nm deep, 256 x 256, g = 200, w = 0.5, t = 100 nm', parallel],
  ['anisotropic, the same line', { ...parallel, elasticity: 'anisotropic' }],
  ['isotropic, pure edge 1/2[1-10] along [110], parallel to the surfaces 20 nm deep (screw-free: the plate correction of the edge only), 256 x 256', edgeParallel],
  ['isotropic, spherical inclusion radius 6 nm, misfit 0.02, centre 12 nm deep, 128 x 128, g = 200, w = 0.5, t = 60 nm', particle],
  ['anisotropic, the same line, 128 x 128, column by column (render --each-column; general beam sets)', { ...parallel, elasticity: 'anisotropic', image: { width_px: 128, height_px: 128, pixel_nm: 1 }, eachColumn: true }],
  ['anisotropic, inclined mixed 1/2[101] along [112], 128 x 128, g = 200, w = 0.5, t = 100 nm', inclined],
  ['the same, infinite medium also column by column', { ...inclined, eachColumn: true }],
  ['screw 1/2[110] normal to a (110) foil, beam tilted to [551], 128 x 128, g = 1-11, w = 0.5, t = 60 nm', normal],
  ['edge 1/2[1-10] normal to a (110) foil (twist-free: half-space corrections of the edge), the same view', { ...normal, defects: [{ type: 'dislocation', b: '1/2[1 -1 0]', line: [1, 1, 0], point_nm: [0, 0, 30] }] }],
]) {
  renderOnce(spec, 'infinite'); // warm-up
  renderOnce(spec, 'relaxed');
  const tI = [], tR = [];
  let shI = false, shR = false;
  for (let r = 0; r < 3; r++) {
    const a = renderOnce(spec, 'relaxed');
    const i = renderOnce(spec, 'infinite');
    tR.push(a.seconds);
    tI.push(i.seconds);
    shR = a.shared;
    shI = i.shared;
  }
  console.log(`render, ${label}, one thread, CPU seconds (median of 3):`);
  console.log(`  infinite: ${fmt(median(tI))} s (${shI ? 'shared columns' : 'column by column'})`);
  console.log(`  relaxed : ${fmt(median(tR))} s (${shR ? 'shared columns' : 'column by column'})`);
  console.log(`  ratio relaxed / infinite: ${fmt(median(tR) / median(tI))}x`);
}

// per-point cost of beta'
const N = 2_000_000;
const pts = new Float64Array(3 * 4096);
const rnd = lcg();
for (let i = 0; i < pts.length; i += 3) {
  pts[i] = 40 * rnd() - 20;
  pts[i + 1] = 40 * rnd() - 20;
  pts[i + 2] = 1 + 58 * rnd(); // inside a 60 nm foil with normal z
}
const g = [4.5, 1.2, -0.7], k = [0.1, 0.2, 0.97];
const t = 60;
const cu = voigtStiffness({ C11: 168.4, C12: 121.4, C44: 75.4 }, 'cubic');
const fields = {
  'isotropic line (reference)': straightDislocation({ b_nm: [0.18, 0.18, 0], line: [1, 1, 0], point_nm: [0, 0, 20], poissonRatio: 0.34, coreRadius_nm: 0.01 }),
  'parallel: image screws': surfaceCorrection({ b_nm: [0.18, 0.18, 0], line: [1, 1, 0], point_nm: [0, 0, 20], correction: { kind: 'parallel-screw-images', normal: [0, 0, 1], thickness_nm: t } }),
  'anisotropic line (Cu)': anisotropicDislocation({ b_nm: [0.18, 0.18, 0], line: [1, 1, 0], point_nm: [0, 0, 20], stiffness_GPa: cu, coreRadius_nm: 0.01 }),
  'parallel: Stroh plate (Cu)': surfaceCorrection({ b_nm: [0.18, 0, 0.18], line: [1, 1, 0], point_nm: [0, 0, 20], correction: { kind: 'parallel-stroh-plate', normal: [0, 0, 1], thickness_nm: t }, stiffness_GPa: cu }),
  '  (its two Stroh images)': strohHalfSpaceImages({ b_nm: [0.18, 0, 0.18], line: [1, 1, 0], point_nm: [0, 0, 20], normal: [0, 0, 1], thickness_nm: t, stiffness_GPa: cu }),
  'inclined: half-space tables': inclinedHalfSpaceCorrection({ b_nm: [0.18, 0, 0.18], line: [1, 1, 2], point_nm: [0, 0, 30], normal: [0, 0, 1], thickness_nm: t, poissonRatio: 0.34 }),
  'parallel: edge plate': surfaceCorrection({ b_nm: [0.18, -0.18, 0], line: [1, 1, 0], point_nm: [0, 0, 20], correction: { kind: 'parallel-edge-plate', normal: [0, 0, 1], thickness_nm: t }, poissonRatio: 0.34 }),
  '  (its two Head images)': edgeHalfSpaceImages({ b_nm: [0.18, -0.18, 0], line: [1, 1, 0], point_nm: [0, 0, 20], normal: [0, 0, 1], thickness_nm: t, poissonRatio: 0.34 }),
  'inclusion (its own field)': sphericalInclusion({ centre_nm: [0, 0, 20], radius_nm: 3, strain: 0.01, poissonRatio: 0.34 }),
  'inclusion: half-space corr.': inclusionSurfaceCorrection({ centre_nm: [0, 0, 20], strength_nm3: 0.27, normal: [0, 0, 1], thickness_nm: t, poissonRatio: 0.34 }),
  'normal: plate twist': surfaceCorrection({ b_nm: [0, 0, 0.25], line: [0, 0, 1], point_nm: [0, 0, 0], correction: { kind: 'normal-screw-twist', normal: [0, 0, 1], thickness_nm: t } }),
  'normal: twist + edge tables': surfaceCorrection({ b_nm: [0.1, 0.05, 0.25], line: [0, 0, 1], point_nm: [3, 1, 0], correction: { kind: 'normal-edge-half-space', normal: [0, 0, 1], thickness_nm: t }, poissonRatio: 0.34 }),
};
const perPoint = (f) => perPointNs(f, g, k, pts, N);
const res = {};
for (let r = 0; r < 3; r++) for (const [name, f] of Object.entries(fields)) (res[name] ??= []).push(perPoint(f).ns);
console.log('directional derivative g.(grad R).k per point, CPU time (median of 3):');
const ref = median(res['isotropic line (reference)']);
for (const name of Object.keys(fields)) console.log(`  ${name.padEnd(27)}: ${fmt(median(res[name]))} ns  (${fmt(median(res[name]) / ref)}x the line)`);

// set-up cost of the plate correction of a parallel edge line (the residual table: 384 k values x 289 x 25 nodes)
const plateBuild = [];
for (let r = 0; r < 5; r++) {
  const c0 = process.cpuUsage();
  plateEdgeCorrection({ b_nm: [0.18, -0.18, 0], line: [1, 1, 0], point_nm: [0, 0, 20 + r], normal: [0, 0, 1], thickness_nm: t, poissonRatio: 0.34 });
  const c1 = process.cpuUsage();
  if (r >= 2) plateBuild.push((c1.user + c1.system - c0.user - c0.system) / 1e3);
}
console.log(`plate correction of a parallel edge line, set-up (table) per line, CPU time (median of 3): ${fmt(median(plateBuild))} ms`);

// set-up cost of the anisotropic plate correction of a parallel line (the residual table, once per line and thread)
const strohBuild = [];
for (let r = 0; r < 5; r++) {
  const c0 = process.cpuUsage();
  plateStrohCorrection({ b_nm: [0.18, 0, 0.18], line: [1, 1, 0], point_nm: [0, 0, 20 + r], normal: [0, 0, 1], thickness_nm: t, stiffness_GPa: cu });
  const c1 = process.cpuUsage();
  if (r >= 2) strohBuild.push((c1.user + c1.system - c0.user - c0.system) / 1e3);
}
console.log(`anisotropic plate correction of a parallel line (Cu), set-up (table) per line, CPU time (median of 3): ${fmt(median(strohBuild))} ms`);

// set-up cost of the inclined-line tables (a new direction each time: the tables are cached per direction and b)
const build = [], contract = [];
for (let r = 0; r < 5; r++) {
  const c0 = process.cpuUsage();
  const f = inclinedHalfSpaceCorrection({ b_nm: [0.18, 0, 0.18], line: [1, 1 + 0.013 * r, 2], point_nm: [0, 0, 30], normal: [0, 0, 1], thickness_nm: t, poissonRatio: 0.34, stiffness_GPa: cu });
  const c1 = process.cpuUsage();
  f.directional(g, k);
  const c2 = process.cpuUsage();
  if (r < 2) continue; // warm-up
  build.push((c1.user + c1.system - c0.user - c0.system) / 1e3);
  contract.push((c2.user + c2.system - c1.user - c1.system) / 1e3);
}
console.log('inclined-line correction set-up, anisotropic (Cu), CPU time (median of 3):');
console.log(`  both surface tables for a new line direction: ${fmt(median(build))} ms`);
console.log(`  scalar g.F.k of both for a new condition   : ${fmt(median(contract))} ms`);
