import { it } from 'vitest';
import { writeFileSync, mkdirSync } from 'node:fs';
import { parseScenario } from '../../src/scenario/parse.js';
import { renderScenario } from '../../src/imaging/renderScenario.js';
import { createRenderPool } from '../../src/imaging/workerPool.js';
import { identificationCandidates } from '../../src/analysis/candidates.js';
import { syntheticMicrographs, syntheticFileName } from '../../src/analysis/synthetic.js';
import { encodeFloatTiff } from '../../src/output/tiff.js';
import { identifyCommand } from '../../src/cli/identifyCommand.js';

it('cli', async () => {
  const raw = {
    name: 'scratch cu', material: 'Cu', kV: 200, foil: { thickness_nm: 70, normal: [0, 0, 1] }, beam: [0, 0, 1],
    conditions: [
      { id: 'g200', g: [2, 0, 0], w: 0.5 },
      { id: 'g020', g: [0, 2, 0], w: 0.5 },
      { id: 'g11m1', g: [1, 1, -1], w: 0.5, beam: [0, 1, 1] },
      { id: 'g1m11', g: [1, -1, 1], w: 0.5, beam: [0, 1, 1] },
    ],
    defects: [{ type: 'dislocation', b: '1/2[1 1 0]', line: [3, 1, 1], point_nm: [0, 0, 35] }],
    candidates: ['1/2<110>'],
  };
  const sc = parseScenario(raw);
  const pool = createRenderPool(1);
  const cands = identificationCandidates(sc);
  const truth = cands[5];
  const angles = [10, 100, 40, -60];
  const fields = ['bf', 'bf', 'df', 'bf'] as const;
  const syn = await syntheticMicrographs(sc, truth, sc.conditions.map((c, i) => ({ conditionId: c.id, field: fields[i], gAngle_deg: angles[i] })),
    { width: 80, height: 64, pixel_nm: 1, snr: 5, blur_nm: 0.7, seed: 3 }, (s) => renderScenario(s, pool));
  const dir = '/tmp/idscratch'; mkdirSync(dir, { recursive: true });
  const args: string[] = [];
  syn.forEach((s) => { const f = `${dir}/${syntheticFileName(s.conditionId, s.field)}`; writeFileSync(f, encodeFloatTiff(s.data, s.width, s.height, { pixel_nm: 1 })); args.push(`${s.conditionId}=${f}`); });
  const full = { ...raw, micrographs: Object.fromEntries(sc.conditions.map((c, i) => [c.id, { field: fields[i], gAngle_deg: angles[i], blur_nm: 0.7 }])) };
  writeFileSync(`${dir}/scenario.json`, JSON.stringify(full, null, 2));
  console.log('truth', truth.label);
  const t = performance.now();
  await identifyCommand(`${dir}/scenario.json`, { micrograph: args, out: `${dir}/out` });
  console.log('took', performance.now() - t);
});
