import { it } from 'vitest';
import { parseScenario } from '../../src/scenario/parse.js';
import { renderScenario } from '../../src/imaging/renderScenario.js';
import { createRenderPool } from '../../src/imaging/workerPool.js';
import { identificationCandidates } from '../../src/analysis/candidates.js';
import { syntheticMicrographs } from '../../src/analysis/synthetic.js';
import { prepareMicrographs } from '../../src/analysis/identifyMicrographs.js';
import { identify, type Renderer } from '../../src/analysis/identify.js';
import type { MicrographSettings } from '../../src/analysis/identifySettings.js';

it('pipeline', async () => {
  const line = process.env.LINE ? JSON.parse(process.env.LINE) : [3, 1, 1];
  const sc = parseScenario({
    name: 't', material: 'Cu', kV: 200, foil: { thickness_nm: 70, normal: [0, 0, 1] }, beam: [0, 0, 1],
    conditions: [
      { id: 'g200', g: [2, 0, 0], w: 0.5 },
      { id: 'g020', g: [0, 2, 0], w: 0.5 },
      { id: 'g11m1', g: [1, 1, -1], w: 0.5, beam: [0, 1, 1] },
      { id: 'g1m11', g: [1, -1, 1], w: 0.5, beam: [0, 1, 1] },
    ],
    defects: [{ type: 'dislocation', b: '1/2[1 1 0]', line, point_nm: [0, 0, 35] }],
    candidates: ['1/2<110>'],
  });
  const pool = createRenderPool(1);
  const cache = new Map<string, any>();
  let renders = 0, rtime = 0;
  const render: Renderer = async (s) => {
    const key = JSON.stringify([s.defects, s.conditions[0].id, s.image, s.imageX_cart]);
    const hit = cache.get(key); if (hit) return hit;
    const t = performance.now();
    const r = await renderScenario(s, pool); renders++; rtime += performance.now() - t;
    cache.set(key, r); return r;
  };
  const cands = identificationCandidates(sc);
  const angles = [10, 100, 40, -60];
  const fields: ('bf'|'df')[] = ['bf', 'bf', 'df', 'bf'];
  let ok = 0, decisive = 0, decisiveWrong = 0;
  const N = Number(process.env.N ?? 12);
  const T0 = performance.now();
  for (let c = 0; c < N; c++) {
    const truth = cands[(c * 7 + 3) % cands.length];
    const syn = await syntheticMicrographs(sc, truth, sc.conditions.map((cd, i) => ({ conditionId: cd.id, field: fields[i], gAngle_deg: angles[i] })),
      { width: 64, height: 64, pixel_nm: 1, snr: 5, blur_nm: 0.7, maxShift_nm: 6, maxRotation_deg: 3, oversample: 1, seed: 100 + c }, render);
    const settings = new Map<string, MicrographSettings>(sc.conditions.map((cd, i) => [cd.id, { field: fields[i], pixel_nm: 1, gAngle_deg: angles[i], mirrored: false, intensity: 'linear', offset: 0, blur_nm: 0.7, maxShift_nm: 12 }]));
    const preps = prepareMicrographs(sc, syn.map((s) => ({ conditionId: s.conditionId, image: s, source: 'synthetic-' + s.conditionId, synthetic: true })), settings);
    const t = performance.now();
    const res = await identify(sc, preps, render, { bootstrap: Number(process.env.B ?? 20) });
    const top = res.ranking[0].candidate;
    if (top === truth.label) ok++;
    if (res.verdict.decision === 'identified') { decisive++; if (top !== truth.label) decisiveWrong++; }
    console.log(c, truth.label, '->', res.ranking.slice(0, 3).map((r) => `${r.candidate} ${r.score.toFixed(3)}`).join(' | '), res.verdict.decision, 'gap', res.verdict.gap.toFixed(4), 'sig', res.verdict.gapSigma.toFixed(4), 'truth shift', syn[0].truth.shift_nm.map(v=>v.toFixed(1)).join(','), 'rot', syn[0].truth.rotation_deg.toFixed(2), 'found', res.ranking[0].perCondition[0].shift_nm.map(v=>v.toFixed(1)).join(','), res.ranking[0].perCondition[0].rotation_deg.toFixed(2), JSON.stringify(res.seconds), (performance.now() - t).toFixed(0));
  }
  console.log('top1', ok, '/', N, 'decisive', decisive, 'wrong decisive', decisiveWrong, 'renders', renders, rtime.toFixed(0), 'total', (performance.now() - T0).toFixed(0));
});
