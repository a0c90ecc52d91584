/** The g.b visibility rules (physics.md section 6) and their limits. */
import { describe, expect, it } from 'vitest';
import { judge, gDotBCrossU } from '../../src/analysis/visibility.js';
import { makeLattice } from '../../src/crystal/lattice.js';
import { scenario, render, maxContrast } from '../imaging/helpers.js';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { visibilityTable } from '../../src/analysis/visibilityTable.js';
import { formatVisibility } from '../../src/cli/visibilityCommand.js';

const cubic = makeLattice('cubic', { a: 0.36 });

// The rule-of-thumb verdicts below check that the published rules are copied correctly (the 0.64 threshold and the
// partial rules are from memory, as the rules' texts say) and hand-computed g.b and g.(b x u); they are not
// physics checks of the images. Since the table's verdict now comes from a simulated strip, the physics is
// checked at the end of this file against an independent scipy strip (scripts/ref_line_strip.py).
describe('g.b rule-of-thumb verdicts (checks that the rules are copied correctly, not physics)', () => {
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

// ---- simulated verdicts (src/analysis/lineContrast.ts) against an independent strip (scripts/ref_line_strip.py) ----

interface StripReference {
  w: number;
  thickness_nm: number;
  depth_nm: number;
  cases: { b: number[]; bf: number; df: number; bfRange: [number, number]; columns: number; halfWidth_nm: number }[];
}
// written by `/usr/bin/python3 scripts/ref_line_strip.py` (scipy solve_ivp, Hirth & Lothe field written independently)
const strips = JSON.parse(readFileSync(join(import.meta.dirname, '..', 'reference', 'line-strips.json'), 'utf8')) as StripReference;

describe('the verdict follows the simulated contrast of the actual condition', () => {
  const frac = (b: number[]) => `1/2[${b.map((x) => Math.round(2 * x)).join(' ')}]`;
  const sc = scenario({
    // the reference integrates the isotropic Hirth & Lothe field of the infinite medium
    elasticity: 'isotropic',
    surfaces: 'infinite',
    foil: { thickness_nm: strips.thickness_nm, normal: [0, 0, 1] },
    conditions: [{ id: 'g020', g: [0, 2, 0], w: strips.w }],
    defects: strips.cases.map((c) => ({ type: 'dislocation', b: frac(c.b), line: [1, 1, 2], point_nm: [0, 0, strips.depth_nm] })),
  });
  const rows = visibilityTable(sc);

  it('strip contrast matches the scipy strip (peak contrast and bright-field range to 1e-4; measured 1.6e-6)', () => {
    strips.cases.forEach((ref, i) => {
      const e = rows[i].entries[0];
      const sim = e.simulated!;
      expect(sim.columns).toBe(ref.columns);
      expect(sim.halfWidth_nm).toBeCloseTo(ref.halfWidth_nm, 9);
      // strip tolerance 1e-5 in intensity over backgrounds of ~0.3: about 3e-5 relative; 1e-4 leaves a factor 3
      expect(Math.abs(sim.bf - ref.bf)).toBeLessThan(1e-4);
      expect(Math.abs(sim.df - ref.df)).toBeLessThan(1e-4);
      expect(Math.abs(sim.bfRange[0] - ref.bfRange[0])).toBeLessThan(1e-4);
      expect(Math.abs(sim.bfRange[1] - ref.bfRange[1])).toBeLessThan(1e-4);
    });
  });

  it('b = 1/2[101], u = [112], g = 020: the rule says weak residual (m = 0.05), the simulation shows a visible line', () => {
    const e = rows[0].entries[0];
    expect(e.gb).toBe(0);
    expect(e.ruleVerdict).toBe('weak residual');
    // the independent strip shows BF 0.66 .. 1.3 of the background: 34 % contrast, far above any visibility threshold
    expect(strips.cases[0].bf).toBeGreaterThan(0.3);
    expect(e.verdict).toBe('visible');
  });

  it('a screw with g.b = 0 gives no contrast at all in the strip (infinite medium: g.R = 0 everywhere)', () => {
    // with relaxed surfaces the surface correction of an inclined screw has components across b, so g.b = 0
    // leaves contrast (next test): the statement holds for the infinite medium
    const s2 = scenario({ surfaces: 'infinite', conditions: [{ id: 'g200', g: [2, 0, 0], w: 0.3 }], defects: [{ type: 'dislocation', b: '1/2[0 1 1]', line: [0, 1, 1], point_nm: [0, 0, 50] }] });
    const [row] = visibilityTable(s2);
    expect(row.entries[0].simulated!.bf).toBeLessThan(1e-6);
    expect(row.entries[0].verdict).toBe('invisible');
    expect(row.entries[0].infiniteMedium).toBeUndefined();
  });

  it('with relaxed surfaces (the default) the same screw reads visible in its strip, and the table carries the infinite-medium verdict beside it', () => {
    // measured: BF 0.05, DF 0.14 of the background with the corrections (a broad band, where the two half-space
    // corrections are approximate: README, Foil surfaces); the infinite medium gives exactly nothing
    const s3 = scenario({ conditions: [{ id: 'g200', g: [2, 0, 0], w: 0.3 }], defects: [{ type: 'dislocation', b: '1/2[0 1 1]', line: [0, 1, 1], point_nm: [0, 0, 50] }] });
    expect(s3.surfaces).toBe('relaxed');
    const e = visibilityTable(s3)[0].entries[0];
    expect(e.ruleVerdict).toBe('invisible');
    expect(Math.max(e.simulated!.bf, e.simulated!.df)).toBeGreaterThan(0.02);
    expect(e.infiniteMedium!.bf).toBeLessThan(1e-6);
    expect(e.infiniteMedium!.verdict).toBe('invisible');
    const cell = formatVisibility(s3, visibilityTable(s3)).split('\n')[2];
    expect(cell).toMatch(/\[inf\. i 0%\]/);
  });
});
