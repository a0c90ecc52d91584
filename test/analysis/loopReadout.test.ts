/**
 * Loop read-outs by simulation (src/analysis/loopReadout.ts): inside-outside
 * contrast and the nature of a loop from a +g/-g pair; black-white lobes of a
 * small loop. The outside facts checked here:
 * - reversing g, or the sign of s, moves a loop's image from outside to
 *   inside its projected line and back (the inside-outside method: Edington
 *   1975, "Practical Electron Microscopy in Materials Science", vol. 3;
 *   Williams & Carter 2009, ch. 26);
 * - the side is fixed by the sign of (g.b) s once the loop's inclination is
 *   known (same sources); our sign bookkeeping (outside when (g.b) s (n.B) > 0)
 *   is derived in DEVELOPERS.md and must agree with every clear simulation;
 * - the description of a loop must not change its image: the same physical
 *   loop given with -n (and hence -b) reads the same;
 * - a loop much smaller than xi_g near a surface shows a black and a white
 *   lobe along +-g, whose order reverses with the sign of b and alternates
 *   with depth in layers of the order of xi_g / 2 (Rühle 1967; Wilkens 1970;
 *   from memory, so only the alternation and the direction along g are checked).
 */
import { describe, expect, it } from 'vitest';
import { parseScenario } from '../../src/scenario/parse.js';
import { analyseLoops, insideOutsideRule, type LoopConditionReading } from '../../src/analysis/loopReadout.js';

function scenario(loop: Record<string, unknown>, conditions: unknown[]) {
  return parseScenario({
    name: 'loop read-out test (invented)',
    material: 'Cu',
    kV: 200,
    foil: { thickness_nm: 120, normal: [0, 0, 1] },
    beam: [0, 0, 1],
    imageX: [1, 0, 0],
    image: { width_px: 64, height_px: 64, pixel_nm: 1 },
    conditions,
    defects: [{ type: 'loop', label: 'L', ...loop }],
  });
}

const large = { b: '1/2[1 0 1]', normal: [1, 0, 1], centre_nm: [0, 0, 60], radius_nm: 25 };

describe('inside-outside contrast of an inclined prismatic loop (radius 25 nm, Cu 220, |w| = 1)', () => {
  let rows: LoopConditionReading[] = [];
  it('reads a clear side for both natures at +g and -g, opposite sides at +g and -g', () => {
    rows = analyseLoops(scenario(large, [
      { id: 'sPlus', g: [2, 2, 0], w: 1 },
      { id: 'sMinus', g: [2, 2, 0], w: -1 },
    ]));
    expect(rows.length).toBe(2);
    for (const r of rows) {
      expect(r.natures.map((x) => x.nature).sort()).toEqual(['interstitial', 'vacancy']);
      for (const x of r.natures) {
        expect(['inside', 'outside']).toContain(x.plus.side);
        expect(['inside', 'outside']).toContain(x.minus.side);
        // reversing g moves the image across the line (Edington 1975; Williams & Carter 2009)
        expect(x.minus.side).not.toBe(x.plus.side);
      }
    }
  });

  it('reversing s moves the image across the line, as reversing g does', () => {
    const [p, m] = rows;
    for (let i = 0; i < 2; i++) {
      expect(m.natures[i].plus.side).toBe(p.natures[i].minus.side);
      expect(m.natures[i].minus.side).toBe(p.natures[i].plus.side);
    }
  });

  it('agrees with the rule in our bookkeeping: outside when (g.b) s (n.B) > 0', () => {
    for (const r of rows) for (const x of r.natures) expect(x.plus.side).toBe(x.rulePlus);
  });

  it('states what a +g/-g pair means, and the two natures differ', () => {
    const p = rows[0];
    expect(p.pair).toMatch(/\+g (inside|outside) and -g (inside|outside): (vacancy|interstitial); \+g (inside|outside) and -g (inside|outside): (vacancy|interstitial)/);
    const vac = p.natures.find((x) => x.nature === 'vacancy')!;
    expect(p.pair).toContain(`+g ${vac.plus.side} and -g ${vac.minus.side}: vacancy`);
  });

  it('a weak beam g(3g) (dark-field background below 1 % of the incident beam) still reads a side, as the rule says', () => {
    // the weak-beam image of the loop is a sharp line (as `thinfoil render` of this loop shows); the side follows the same
    // (g.b) s rule (Edington 1975; Williams & Carter 2009); before, a fixed 1 % threshold called it "no contrast"
    const [wb] = analyseLoops(scenario(large, [{ id: 'wb', g: [2, 2, 0], weakBeam: 3 }]));
    for (const x of wb.natures) {
      expect(x.plus.side).toBe(x.rulePlus);
      expect(x.minus.side).not.toBe(x.plus.side);
      expect(['inside', 'outside']).toContain(x.minus.side);
    }
    expect(wb.pair).toMatch(/vacancy/);
  });

  it('the same physical loop given with -n and -b reads the same', () => {
    const flipped = analyseLoops(scenario({ ...large, b: '1/2[-1 0 -1]', normal: [-1, 0, -1] }, [{ id: 'sPlus', g: [2, 2, 0], w: 1 }]))[0];
    for (const x of rows[0].natures) {
      const y = flipped.natures.find((q) => q.nature === x.nature)!;
      // b is FS/RH about the line, and the line turns with n: the same loop has -b in this description
      expect(y.b.map((v) => v + 0)).toEqual(x.b.map((v) => -v + 0));
      expect(y.plus.side).toBe(x.plus.side);
      expect(y.plus.offset_nm).toBeCloseTo(x.plus.offset_nm, 6);
      expect(y.rulePlus).toBe(x.rulePlus);
    }
  });
});

describe('the rule itself', () => {
  it('flips with each of g.b, s and the sense of the normal; no reading without contrast or inclination', () => {
    expect(insideOutsideRule(1, 0.01, 0.7)).toBe('outside');
    expect(insideOutsideRule(-1, 0.01, 0.7)).toBe('inside');
    expect(insideOutsideRule(1, -0.01, 0.7)).toBe('inside');
    expect(insideOutsideRule(1, 0.01, -0.7)).toBe('inside');
    expect(insideOutsideRule(0, 0.01, 0.7)).toBe('undecided');
    expect(insideOutsideRule(1, 0.01, 0)).toBe('undecided');
  });
});

describe('black-white contrast of a small loop (radius 2 nm, Cu 200, w = 0)', () => {
  it('lobes along +-g, reversed with the sign of b, alternating with depth', () => {
    const r = analyseLoops(scenario({ b: '1/2[1 0 1]', normal: [1, 0, 1], centre_nm: [0, 0, 4], radius_nm: 2 }, [{ id: 'a', g: [2, 0, 0], w: 0 }]))[0];
    expect(r.note).toMatch(/small loop/);
    const [a, b] = r.natures;
    for (const x of r.natures) {
      const bw = x.blackWhite!;
      expect(bw.sign).not.toBe(0);
      // along +-g (Rühle 1967: l parallel or antiparallel to g for loops near the surface)
      expect(Math.min(bw.angleToG_deg, 180 - bw.angleToG_deg)).toBeLessThan(20);
      // layers: the sign of l.g changes at least three times through 120 nm = 2.8 xi_g
      const signs = x.depthSeries!.map((q) => q.sign).filter((q) => q !== 0);
      let changes = 0;
      for (let i = 1; i < signs.length; i++) if (signs[i] !== signs[i - 1]) changes++;
      expect(changes).toBeGreaterThanOrEqual(3);
    }
    expect(a.blackWhite!.sign).toBe(-b.blackWhite!.sign);
    a.depthSeries!.forEach((q, i) => expect(q.sign).toBe(-b.depthSeries![i].sign));
  });
});

describe('a shear loop (b = 1/2[1 -1 0] in its (1 1 1) plane, Cu 200, w = 1)', () => {
  it('is called a shear loop for both signs of b (neither vacancy nor interstitial), and its image side still follows (g.b) s (n.B)', () => {
    // b.n = 0: no prismatic component, so no vacancy/interstitial nature (Hull & Bacon, Introduction to Dislocations: a
    // shear loop glides in its plane); the inside-outside side of any dislocation line flips with the sign of (g.b) s
    // (Edington 1975), so a +g/-g pair still tells the sign of b
    const [r] = analyseLoops(scenario({ b: '1/2[1 -1 0]', normal: [1, 1, 1], centre_nm: [0, 0, 60], radius_nm: 25 }, [{ id: 'a', g: [2, 0, 0], w: 1 }]));
    expect(r.natures.map((x) => x.nature)).toEqual(['shear', 'shear']);
    for (const x of r.natures) {
      expect(['inside', 'outside']).toContain(x.plus.side);
      expect(x.plus.side).toBe(x.rulePlus);
      expect(x.minus.side).not.toBe(x.plus.side);
    }
    expect(r.pair).toMatch(/^\+g (inside|outside) and -g (inside|outside): shear loop with b = 1\/2\[1 -1 0\]; \+g (inside|outside) and -g (inside|outside): shear loop with b = 1\/2\[-1 1 0\]$/);
  });
});
