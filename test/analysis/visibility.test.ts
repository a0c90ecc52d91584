/** The g.b visibility rules (physics.md section 6) and their limits. */
import { describe, expect, it } from 'vitest';
import { judge, gDotBCrossU } from '../../src/analysis/visibility.js';
import { makeLattice } from '../../src/crystal/lattice.js';
import { scenario, render, maxContrast } from '../imaging/helpers.js';

const cubic = makeLattice('cubic', { a: 0.36 });

describe('visibility verdicts', () => {
  it('screw with g.b = 0: invisible (Hirsch et al. 1965)', () => {
    expect(judge(cubic, [2, 0, 0], [0, 0.5, 0.5], [0, 1, 1]).verdict).toBe('invisible');
  });
  it('edge with g.b = 0 and |g.(b x u)| >= 0.64: visible residual; < 0.64: weak residual (Hirsch et al. 1965; from memory)', () => {
    // edge b = 1/2[1 1 0] along u = [1 -1 0]/sqrt2, g = (1 -1 1): by hand b x u = (a/(2 sqrt2)) (0, 0, -2),
    // g.(b x u) = -1/sqrt2 = -0.707 (lattice units cancel)
    const v = judge(cubic, [1, -1, 1], [0.5, 0.5, 0], [1, -1, 0]);
    expect(v.gb).toBe(0);
    expect(gDotBCrossU(cubic, [1, -1, 1], [0.5, 0.5, 0], [1, -1, 0])).toBeCloseTo(-Math.SQRT1_2, 12);
    expect(v.verdict).toBe('visible');
    // b = 1/2[1 1 0], u = [1 2 1]/sqrt6, g = (1 -1 1): by hand b x u = (a/(2 sqrt6)) (1, -1, 1), g.(b x u) = 3/(2 sqrt6) = 0.612
    const w = judge(cubic, [1, -1, 1], [0.5, 0.5, 0], [1, 2, 1]);
    expect(w.gb).toBe(0);
    expect(w.gbxu!).toBeCloseTo(3 / (2 * Math.sqrt(6)), 9);
    expect(w.verdict).toBe('weak residual');
  });
  it('g.b = 0 and g.(b x u) = 0 with a mixed line and g.u != 0 keeps the edge x y term: not invisible (Hirth & Lothe 1982 ch. 3)', async () => {
    const l: [number, number, number] = [3, 1, 1];
    const v = judge(cubic, [1, 1, -1], [-0.5, 0, -0.5], l);
    expect(v.gb).toBe(0);
    expect(Math.abs(v.gbxu!)).toBeLessThan(1e-9);
    expect(v.verdict).toBe('weak residual');
    // the simulation agrees that there is contrast
    const sc = scenario({
      beam: [0, 1, 1], foil: { thickness_nm: 80, normal: [0, 1, 1] }, imageX: [2, 1, -1],
      image: { width_px: 48, height_px: 48, pixel_nm: 1 },
      conditions: [{ id: 'c', g: [1, 1, -1], w: 0.5 }],
      defects: [{ type: 'dislocation', b: '1/2[-1 0 -1]', line: l, point_nm: [0, 0, 40] }],
    });
    const [ci] = await render(sc);
    expect(maxContrast(ci.bf, ci.background.bf)).toBeGreaterThan(0.01);
  });
  it('Shockley partials: |g.b| = 1/3 invisible, 2/3 visible (Howie & Whelan 1962; from memory)', () => {
    expect(judge(cubic, [2, 0, 0], [1 / 6, 1 / 6, -1 / 3]).verdict).toBe('invisible');
    expect(judge(cubic, [2, 0, 0], [-1 / 3, 1 / 6, 1 / 6]).verdict).toBe('visible');
  });
  it('perfect dislocations: integer g.b != 0 visible', () => {
    expect(judge(cubic, [2, 2, 0], [0.5, 0.5, 0], [1, -1, 0]).verdict).toBe('visible');
  });
});
