/**
 * Dislocation cores in images (src/imaging/cores.ts). Inside the modified core the column approximation and
 * linear elasticity fail; the renderer must not show structure there that a user could take for contrast.
 * Case: a dissociated 1/2[0 1 1] on (-1 1 -1) in Ni, g = 200: both Shockley partials have |g.b| = 1/3 and are
 * invisible as lines (Howie & Whelan 1962; physics.md section 6, from memory). Before the core handling one
 * column per pixel (or 3 x 3 columns reaching into the core) drew lines 1-2 pixels wide, 9 % darker at 0.5 nm
 * pixels and up to -23 % / +30 % at 0.1 nm pixels.
 */
import { describe, expect, it } from 'vitest';
import { render, scenario } from './helpers.js';
import { coreMask } from '../../src/imaging/cores.js';
import { resolveCondition } from '../../src/imaging/resolveCondition.js';
import { renderJob } from '../../src/imaging/renderScenario.js';

const ribbon = (pixel_nm: number) =>
  scenario({
    material: 'Ni',
    foil: { thickness_nm: 100, normal: [0, 0, 1] },
    image: { width_px: 48, height_px: 24, pixel_nm },
    conditions: [{ id: 'g200', g: [2, 0, 0], w: 0.3 }],
    defects: [{ type: 'dissociated', b: '1/2[0 1 1]', plane: [-1, 1, -1], line: [0, 1, 1], point_nm: [0, 0, 50] }],
  });

describe('no structure inside dislocation cores', () => {
  for (const px of [0.5, 0.2, 0.1]) {
    it(`|g.b| = 1/3 partials in Ni, ${px} nm pixels: every core pixel lies between its nearest non-core neighbours (within 1 % of the background)`, async () => {
      const sc = ribbon(px);
      const [ci] = await render(sc);
      const mask = coreMask(renderJob(sc, resolveCondition(sc, sc.conditions[0])));
      const W = ci.width;
      const bg = ci.background.bf;
      let cores = 0;
      let worst = 0;
      for (let j = 0; j < ci.height; j++) {
        // the line runs along y in this view: walk each row across it
        for (let i = 0; i < W; i++) {
          if (!mask[j * W + i]) continue;
          cores++;
          let l = i;
          while (l >= 0 && mask[j * W + l]) l--;
          let r = i;
          while (r < W && mask[j * W + r]) r++;
          expect(l >= 0 && r < W).toBe(true);
          const lo = Math.min(ci.bf[j * W + l], ci.bf[j * W + r]);
          const hi = Math.max(ci.bf[j * W + l], ci.bf[j * W + r]);
          const v = ci.bf[j * W + i];
          worst = Math.max(worst, (lo - v) / bg, (v - hi) / bg);
        }
      }
      expect(cores).toBeGreaterThan(0);
      // 1 %: half the 2 % below which src/analysis/lineContrast.ts calls a line invisible (common practice)
      expect(worst).toBeLessThan(0.01);
    });
  }

  it('the mask covers the pixels within 2 core radii (+ half a pixel diagonal) of the partials and nothing far away', () => {
    const sc = ribbon(0.5);
    const mask = coreMask(renderJob(sc, resolveCondition(sc, sc.conditions[0])));
    // partials at x = +-0.37 nm (image), core radius |1/6<112>| = 0.144 nm: reach 0.29 + 0.35 nm
    for (let j = 0; j < 24; j++) {
      for (let i = 0; i < 48; i++) {
        const x = (i + 0.5 - 24) * 0.5;
        if (Math.abs(x) > 1.1) expect(mask[j * 48 + i]).toBe(0);
        if (Math.abs(x) < 0.3) expect(mask[j * 48 + i]).toBe(1);
      }
    }
  });
});
