// Benchmark: the demo identification (4 synthetic 64 x 64 micrographs, 12 candidates of 1/2<110>),
// timed by phase (simulation, registration, fitting, bootstrap) in one thread, with the ratio to a bare
// loop of 2x2 complex matrix-vector products over the same pixel count x candidates x micrographs and
// 200 slices, measured in the same run. Run: `node bench/identify.mjs [--no-fit] [--threads N] [--large]` after
// building dist/ (--threads N: a pool of N worker threads, as the CLI uses, instead of one thread; wall and CPU
// seconds; --large: the speed issue's row, 5 micrographs of 96 x 96, the fifth g 200 in the [011] beam at 60 degrees).
// Never a timed test.
import { parseScenario } from '../dist/scenario/parse.js';
import { renderScenario } from '../dist/imaging/renderScenario.js';
import { createRenderPool } from '../dist/imaging/workerPool.js';
import { identificationCandidates } from '../dist/analysis/candidates.js';
import { syntheticMicrographs } from '../dist/analysis/synthetic.js';
import { prepareMicrographs } from '../dist/analysis/identifyMicrographs.js';
import { identify } from '../dist/analysis/identify.js';
import { DEFAULT_SETTINGS } from '../dist/analysis/identifySettings.js';
import { DEMO_HIDDEN_CANDIDATE, DEMO_IDENTIFY_SCENARIO, DEMO_MICROGRAPHS, DEMO_SYNTHESIS } from '../dist/scenario/demoIdentify.js';

const noFit = process.argv.includes('--no-fit');
const ti = process.argv.indexOf('--threads');
const threads = ti > 0 ? Number(process.argv[ti + 1]) : 1;
const large = process.argv.includes('--large');
const side = large ? 96 : DEMO_SYNTHESIS.width;
const raw = large
  ? { ...DEMO_IDENTIFY_SCENARIO, image: { ...DEMO_IDENTIFY_SCENARIO.image, width_px: side, height_px: side }, conditions: [...DEMO_IDENTIFY_SCENARIO.conditions, { id: 'g200b', g: [2, 0, 0], w: 0.5, beam: [0, 1, 1] }] }
  : DEMO_IDENTIFY_SCENARIO;
const micrographs = large ? [...DEMO_MICROGRAPHS, { conditionId: 'g200b', field: 'bf', gAngle_deg: 60 }] : DEMO_MICROGRAPHS;
const sc = parseScenario(raw);
const hidden = identificationCandidates(sc).find((c) => c.label === DEMO_HIDDEN_CANDIDATE);
const pool = createRenderPool(threads);
const render = (s) => renderScenario(s, pool);
const syn = await syntheticMicrographs(sc, hidden, micrographs, { ...DEMO_SYNTHESIS, width: side, height: side }, render);
const settings = new Map(syn.map((m) => [m.conditionId, { ...DEFAULT_SETTINGS, field: m.field, pixel_nm: m.pixel_nm, gAngle_deg: m.truth.gAngle_deg, blur_nm: DEMO_SYNTHESIS.blur_nm }]));
const preps = prepareMicrographs(sc, syn.map((m) => ({ conditionId: m.conditionId, image: m, source: 'synthetic', synthetic: true })), settings);

function bareLoop(pixels) {
  const m = new Float64Array(8).fill(0.3);
  let ar = 1, ai = 0, br = 0, bi = 0;
  const t0 = performance.now();
  for (let p = 0; p < pixels; p++) {
    for (let k = 0; k < 200; k++) {
      const nar = m[0] * ar - m[1] * ai + m[2] * br - m[3] * bi;
      const nai = m[0] * ai + m[1] * ar + m[2] * bi + m[3] * br;
      const nbr = m[4] * ar - m[5] * ai + m[6] * br - m[7] * bi;
      const nbi = m[4] * ai + m[5] * ar + m[6] * bi + m[7] * br;
      ar = nar * 0.5; ai = nai * 0.5; br = nbr * 0.5; bi = nbi * 0.5;
    }
  }
  if (!Number.isFinite(ar + ai + br + bi)) console.log('');
  return (performance.now() - t0) / 1000;
}

const t0 = performance.now();
const cpu0 = process.cpuUsage();
const res = await identify(sc, preps, render, { bootstrap: 50, ...(noFit ? { fit: false } : {}) });
const total = (performance.now() - t0) / 1000;
const cpu = process.cpuUsage(cpu0);
const cpuSeconds = (cpu.user + cpu.system) / 1e6;
await pool.close();
const pixels = preps.reduce((a, m) => a + (m.width + 2 * m.margin) * (m.height + 2 * m.margin), 0) * res.candidates.length;
const base = bareLoop(pixels);
console.log(`demo identification (${res.candidates.length} candidates x ${preps.length} micrographs of ${side} x ${side}, ${threads > 1 ? `${threads} worker threads` : 'one thread'})${noFit ? ', no fitting' : ''}`);
console.log(`phases (s): ${Object.entries(res.seconds).map(([k, v]) => `${k} ${v.toFixed(2)}`).join(', ')}`);
console.log(`total ${total.toFixed(2)} s wall, ${cpuSeconds.toFixed(2)} s CPU (this process, all threads); bare loop (${pixels} px x 200 slices) ${base.toFixed(3)} s; ratio ${(total / base).toFixed(1)}`);
console.log(`best ${res.ranking[0].candidate} (hidden ${DEMO_HIDDEN_CANDIDATE}); verdict ${res.verdict.decision}`);
if (process.argv.includes('--details')) {
  for (const r of res.ranking.slice(0, 5)) console.log(r.candidate, r.score.toFixed(4), r.fit ? `fit ${r.fit.nominalScore.toFixed(4)} -> ${r.fit.fittedScore.toFixed(4)} renders ${r.fit.renders} ` + r.fit.parameters.map((p) => `${p.name}=${p.value.toFixed(3)}`).join(' ') : '');
  console.log(res.verdict.comparisons.slice(0, 5).map((c) => `${c.candidate} gap ${c.gap.toFixed(4)} sd ${c.gapSigma?.toFixed(4)} spread ${c.modelSpread.toFixed(4)} need ${c.threshold.toFixed(4)} ${c.excluded}`).join('\n'));
  console.log(res.absolute.perMicrograph.map((p) => `${p.condition} sigma ${p.sigma.toFixed(4)} resid ${p.residualRms.toFixed(4)} structure ${p.structure.toFixed(2)}`).join('\n'));
  console.log(res.flags.map((f) => f.message).join('\n'));
  console.log(res.verdict.statement);
}
