import { it } from 'vitest';
import { parseScenario } from '../../src/scenario/parse.js';
import { renderScenario } from '../../src/imaging/renderScenario.js';
import { createRenderPool } from '../../src/imaging/workerPool.js';
import { identificationCandidates } from '../../src/analysis/candidates.js';
import { syntheticMicrographs } from '../../src/analysis/synthetic.js';
import { prepareMicrographs } from '../../src/analysis/identifyMicrographs.js';
import { identify, type Renderer } from '../../src/analysis/identify.js';
import type { MicrographSettings } from '../../src/analysis/identifySettings.js';

for (const variant of ['invisible']) it(variant, async () => {
  const sc = parseScenario(variant === 'collinear' ? {
    name: 't', material: 'Cu', kV: 200, foil: { thickness_nm: 70, normal: [0, 0, 1] }, beam: [0, 0, 1],
    conditions: [
      { id: 'g200', g: [2, 0, 0], w: 0.5 },
      { id: 'gm200', g: [-2, 0, 0], w: 0.5 },
      { id: 'g200b', g: [2, 0, 0], w: 1.2 },
    ],
    defects: [{ type: 'dislocation', b: '1/2[1 1 0]', line: [0, 1, 1], point_nm: [0, 0, 35] }],
    candidates: ['1/2<110>'],
  } : {
    name: 't', material: 'Cu', kV: 200, foil: { thickness_nm: 70, normal: [0, 0, 1] }, beam: [0, 0, 1],
    conditions: [
      { id: 'g2m20', g: [2, -2, 0], w: 0.5 },
      { id: 'g1m1m1', g: [1, -1, -1], w: 0.5, beam: [1, -1, 2] },
      { id: 'g1m11', g: [1, -1, 1], w: 0.5, beam: [-1, 1, 2] },
    ],
    defects: [{ type: 'dislocation', b: '1/2[1 1 0]', line: [1, 1, 0], point_nm: [0, 0, 35] }],
    candidates: ['1/2<110>'],
  });
  const pool = createRenderPool(1);
  const render: Renderer = (s) => renderScenario(s, pool);
  const cands = identificationCandidates(sc);
  const truth = cands.find((c) => c.label === 'b = 1/2[1 1 0]')!;
  const syn = await syntheticMicrographs(sc, truth, sc.conditions.map((cd) => ({ conditionId: cd.id, field: 'bf' as const })),
    { width: 64, height: 64, pixel_nm: 1, snr: 5, blur_nm: 0.7, maxShift_nm: 4, maxRotation_deg: 2, oversample: 1, seed: 7 }, render);
  const settings = new Map<string, MicrographSettings>(sc.conditions.map((cd) => [cd.id, { field: 'bf', pixel_nm: 1, mirrored: false, intensity: 'linear', offset: 0, blur_nm: 0.7 }]));
  const preps = prepareMicrographs(sc, syn.map((s) => ({ conditionId: s.conditionId, image: s, source: 'x' })), settings);
  const res = await identify(sc, preps, render, { bootstrap: 20 });
  console.log(variant, res.ranking.map((r) => `${r.candidate} ${r.score.toFixed(4)}`).join(' | '));
  console.log(res.verdict.statement, res.verdict.indistinguishable, JSON.stringify(res.verdict.comparisons.slice(0,4)));
});
