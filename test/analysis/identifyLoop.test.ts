/**
 * Identification of a dislocation loop's Burgers vector and nature, end to
 * end: synthetic micrographs of a hidden loop (our renderer, noise, blur, a
 * random shift and rotation: src/analysis/synthetic.ts) are ranked against
 * the loop candidates, every b of the list with both signs, i.e. both natures
 * (b . n > 0 vacancy, < 0 interstitial: src/defects/loop.ts). The physics of
 * the loop images is checked against outside references in
 * test/defects/loop.test.ts and test/elasticity/loopField.test.ts; this test
 * checks that identify tells the natures apart, as the inside-outside method
 * does (Edington 1975: a +g/-g pair of an inclined loop fixes the sign of b),
 * from a +g/-g pair with s > 0 (w = 1, common practice for inside-outside work).
 */
import { describe, expect, it } from 'vitest';
import { parseScenario } from '../../src/scenario/parse.js';
import { renderScenario } from '../../src/imaging/renderScenario.js';
import { createRenderPool } from '../../src/imaging/workerPool.js';
import { identificationCandidates } from '../../src/analysis/candidates.js';
import { syntheticMicrographs } from '../../src/analysis/synthetic.js';
import { prepareMicrographs } from '../../src/analysis/identifyMicrographs.js';
import { identify, type Renderer } from '../../src/analysis/identify.js';
import { DEFAULT_SETTINGS, type MicrographSettings } from '../../src/analysis/identifySettings.js';

describe('identify ranks loop candidates (Burgers vector and nature)', () => {
  it('a hidden vacancy loop 1/2[1 0 1] on (1 0 1) is ranked first, ahead of the interstitial loop with -b', async () => {
    const sc = parseScenario({
      name: 'loop identification test (invented)',
      material: 'Cu',
      kV: 200,
      foil: { thickness_nm: 80, normal: [0, 0, 1] },
      beam: [0, 0, 1],
      conditions: [
        { id: 'g220', g: [2, 2, 0], w: 1 },
        { id: 'gm2m20', g: [-2, -2, 0], w: 1 },
      ],
      defects: [{ type: 'loop', label: 'L', b: '1/2[1 0 1]', normal: [1, 0, 1], centre_nm: [0, 0, 40], radius_nm: 7 }],
      candidates: [{ b: '1/2[1 0 1]' }, { b: '1/2[1 1 0]' }],
    });
    const candidates = identificationCandidates(sc);
    // two vectors, both signs: four candidates, both natures of each, named in the label
    expect(candidates.map((c) => c.label)).toContain('b = 1/2[-1 0 -1] (interstitial)');
    expect(candidates.length).toBe(4);
    const truth = candidates.find((c) => c.label === 'b = 1/2[1 0 1] (vacancy)')!;
    expect(truth).toBeDefined();
    const pool = createRenderPool(1);
    const render: Renderer = (s) => renderScenario(s, pool);
    try {
      const angles = [15, 195];
      const syn = await syntheticMicrographs(sc, truth, sc.conditions.map((c, i) => ({ conditionId: c.id, field: 'bf' as const, gAngle_deg: angles[i] })), {
        width: 32, height: 32, pixel_nm: 1, snr: 8, blur_nm: 0.6, maxShift_nm: 2, maxRotation_deg: 1, oversample: 1, seed: 3,
      }, render);
      const settings = new Map<string, MicrographSettings>(sc.conditions.map((c, i) => [c.id, { ...DEFAULT_SETTINGS, pixel_nm: 1, gAngle_deg: angles[i], blur_nm: 0.6, maxShift_nm: 6 }]));
      const preps = prepareMicrographs(sc, syn.map((m) => ({ conditionId: m.conditionId, image: m, source: 'synthetic' })), settings);
      const res = await identify(sc, preps, render, { bootstrap: 10, fit: false });
      const labels = res.ranking.map((r) => r.candidate);
      expect(labels[0]).toBe('b = 1/2[1 0 1] (vacancy)');
      // the other nature of the same loop (same line, -b) scores lower
      const best = res.ranking[0].score;
      const other = res.ranking.find((r) => r.candidate === 'b = 1/2[-1 0 -1] (interstitial)')!;
      expect(other.score).toBeLessThan(best - 0.02);
      // measured when written: 0.823 against 0.775, verdict "identified"; a verdict never names another candidate
      if (res.verdict.decision === 'identified') expect(res.verdict.best).toBe(labels[0]);
    } finally {
      await pool.close();
    }
  }, 240_000);
});
