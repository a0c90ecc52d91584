/**
 * Simulated visibility of loops (src/analysis/lineContrast.ts loopContrast): a patch of columns over the loop,
 * integrated with the renderer's column evaluator (whose loop columns are checked against an independent scipy
 * integration in test/defects/loop.test.ts, scripts/ref_loop_columns.py). Here: what the verdict must show.
 */
import { describe, expect, it } from 'vitest';
import { visibilityTable } from '../../src/analysis/visibilityTable.js';
import { loopContrast, PATCH_COLUMNS } from '../../src/analysis/lineContrast.js';
import { resolveCondition } from '../../src/imaging/resolveCondition.js';
import { defectModel, type LoopFieldSpec } from '../../src/imaging/fieldSpecs.js';
import { scenario } from '../imaging/helpers.js';

// an invented 5 nm prismatic loop b = 1/2[1 0 1] on (1 0 1) (pure edge: b along the normal) in a 100 nm Cu foil
const PRISMATIC = { type: 'loop', label: 'P', b: '1/2[1 0 1]', normal: [1, 0, 1], centre_nm: [0, 0, 50], radius_nm: 5 };
// an invented 5 nm Frank loop b = 1/3[1 1 1] on (1 1 1) enclosing an intrinsic fault
const FRANK = { type: 'loop', label: 'F', b: '1/3[1 1 1]', normal: [1, 1, 1], centre_nm: [0, 0, 50], radius_nm: 5, fault: 'intrinsic' };
const CONDITIONS = [
  { id: 'g200', g: [2, 0, 0], w: 0.5 },
  { id: 'g020', g: [0, 2, 0], w: 0.5 },
  { id: 'g2m20', g: [2, -2, 0], w: 0.5 },
];

describe('loops in the visibility table: a simulated patch beside the g.b rule', () => {
  const sc = scenario({ image: { width_px: 32, height_px: 32, pixel_nm: 1 }, conditions: CONDITIONS, defects: [PRISMATIC, FRANK] });
  const [p, f] = visibilityTable(sc).filter((r) => r.kind === 'defect');

  it('the prismatic loop at g.b = 1 (g 200) is visible, by rule and simulation (g.b rule, Hirsch et al. 1965)', () => {
    const e = p.entries[0];
    expect(e.gb).toBe(1);
    expect(e.ruleVerdict).toBe('visible');
    expect(e.simulated!.bf).toBeGreaterThan(0.1);
    expect(e.verdict).toBe('visible');
  });

  it('at g.b = 0 (g 020, same |g| and w) it is weaker but not invisible: g lies in the loop plane, so g.(b x u) reaches |g||b| = 1.4 on its sides, above the 0.64 of the residual rule (Hirsch et al. 1965)', () => {
    const one = p.entries[0].simulated!;
    const zero = p.entries[1].simulated!;
    expect(p.entries[1].gb).toBe(0);
    // the rule for a loop sees only g.b (no single line direction)
    expect(p.entries[1].ruleVerdict).toBe('invisible');
    // seen: 0.26 against 0.66 (at depths 20-80 nm and w 0.5 or 1 the ratio was 0.30-0.57)
    expect(zero.bf).toBeLessThan(0.6 * one.bf);
    expect(zero.bf).toBeGreaterThan(0.1);
    expect(p.entries[1].verdict).toBe('visible');
  });

  it('the Frank loop: with g.R = 2/3 (g 200) its fault shows; with g.b = g.R = 0 (g 2-20) fault and strain are out of contrast and the patch is far weaker', () => {
    const shows = f.entries[0].simulated!;
    const out = f.entries[2].simulated!;
    expect(f.entries[0].gb).toBeCloseTo(2 / 3, 6);
    expect(f.entries[2].gb).toBe(0);
    expect(shows.verdict).toBe('visible');
    // seen: 0.135 against 0.53 (at depths 20-80 nm the ratio was 0.17-0.26 at w 0.5, 0.38-0.86 at w 1)
    expect(out.bf).toBeLessThan(0.5 * shows.bf);
  });

  it('the patch covers the loop and a margin, and leaves out only the columns through its core', () => {
    const c = resolveCondition(sc, sc.conditions[0]);
    const model = defectModel({ ...sc, defects: [sc.defects[0]] });
    const r = loopContrast(c, model, model.fields[0] as LoopFieldSpec);
    // the loop's projection along [0 0 1]: 5 nm in y (a little more at the polygon's vertices), 5 cos 45 = 3.5 nm in x;
    // margin max(5 nm, xi_g / 4)
    const margin = Math.max(5, 0.25 * c.xi_nm);
    expect(r.halfWidth_nm).toBeGreaterThanOrEqual(5 + margin);
    expect(r.halfWidth_nm).toBeLessThan(5.2 + margin);
    expect(r.columns).toBeLessThanOrEqual(PATCH_COLUMNS * PATCH_COLUMNS);
    expect(r.columns).toBeGreaterThan(0.8 * PATCH_COLUMNS * PATCH_COLUMNS);
    expect(r.bfRange[0]).toBeLessThan(1);
    expect(r.bfRange[1]).toBeGreaterThan(1);
  });
});

describe('candidates of a loop scenario are simulated as the loop with their b', () => {
  const sc = scenario({
    image: { width_px: 32, height_px: 32, pixel_nm: 1 },
    conditions: CONDITIONS.slice(0, 2),
    defects: [PRISMATIC],
    candidates: ['1/2[1 0 1]', '1/2[1 1 0]'],
  });
  const rows = visibilityTable(sc);
  const defectRow = rows.find((r) => r.kind === 'defect')!;
  const cand = rows.filter((r) => r.kind === 'candidate');

  it('every candidate row has a simulated patch; the candidate equal to the loop\'s own b reproduces the loop\'s row', () => {
    expect(cand).toHaveLength(2);
    for (const r of cand) for (const e of r.entries) expect(e.simulated).toBeDefined();
    const same = cand.find((r) => r.b.join() === defectRow.b.join())!;
    same.entries.forEach((e, i) => {
      expect(e.simulated!.bf).toBe(defectRow.entries[i].simulated!.bf);
      expect(e.simulated!.df).toBe(defectRow.entries[i].simulated!.df);
    });
  });

  it('1/2[1 1 0] on the (1 0 1) loop under g 020 has g.b = 1 and is visible; 1/2[1 0 1] there has g.b = 0 and is weaker (g.b rule, Hirsch et al. 1965)', () => {
    const other = cand.find((r) => r.b.join() !== defectRow.b.join())!;
    expect(other.entries[1].gb).toBe(1);
    expect(other.entries[1].verdict).toBe('visible');
    expect(defectRow.entries[1].simulated!.bf).toBeLessThan(other.entries[1].simulated!.bf);
  });
});
