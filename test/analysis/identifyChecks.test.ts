/**
 * The verdict after the absolute fit (identifyChecks.ts finalVerdict): a
 * micrograph is unexplained only when its residual's structure ratio is
 * above STRUCTURE_LIMIT and its unexplained fraction above
 * UNEXPLAINED_LIMIT; the statement names it with both numbers, printed by
 * identifyText.ts (the same digits as the CLI and the report). Plumbing of
 * the rule on hand-made numbers; the statistics themselves are checked
 * against numpy and scipy in noiseEstimate.test.ts.
 */
import { describe, expect, it } from 'vitest';
import { finalVerdict, STRUCTURE_LIMIT, UNEXPLAINED_LIMIT, type AbsoluteFit, type MicrographNoise } from '../../src/analysis/identifyChecks.js';
import { decide } from '../../src/analysis/ranking.js';
import { noiseText } from '../../src/analysis/identifyText.js';

// two candidates, a gap far beyond the bootstrap scatter: "identified" before the checks
const verdict = decide(['b = 1/2[1 1 0]', 'b = 1/2[1 0 1]'], [0.6, 0.2], [[0.6, 0.2], [0.61, 0.21], [0.59, 0.19]]);

function micrograph(condition: string, structure: number, unexplained: number): MicrographNoise {
  return { condition, sigma: 0.1, residualRms: 0.12, structure, unexplained, contrastRms: 0.3, explained: structure <= STRUCTURE_LIMIT || unexplained <= UNEXPLAINED_LIMIT };
}
const abs = (ps: MicrographNoise[]): AbsoluteFit => ({ perMicrograph: ps, explained: ps.every((p) => p.explained), limit: STRUCTURE_LIMIT, method: '' });

describe('finalVerdict and the absolute fit', () => {
  it('structure well above the noise but a small unexplained fraction (a model misfit) keeps "identified"', () => {
    expect(verdict.decision).toBe('identified');
    const v = finalVerdict(verdict, abs([micrograph('g200', 20, 0.05), micrograph('g020', 1.2, 0.01)]), [], []);
    expect(v.decision).toBe('identified');
  });
  it('a large unexplained fraction within the noise (structure below the limit) keeps "identified"', () => {
    expect(finalVerdict(verdict, abs([micrograph('g200', 3, 0.9)]), [], []).decision).toBe('identified');
  });
  it('both above their limits: "no candidate explains", naming the micrograph with both numbers and what to widen', () => {
    const v = finalVerdict(verdict, abs([micrograph('g200', 21.3, 0.504), micrograph('g020', 1.2, 0.01)]), [], ['thickness']);
    expect(v.decision).toBe('no candidate explains');
    expect(v.statement).toMatch(/in g200 \(structure 21\.3 times the noise, 50 % of its structure unexplained\)\. /);
    expect(v.statement).not.toMatch(/g020 \(/);
    expect(v.statement).toMatch(/fitted values at the edge of their range: thickness/);
    expect(noiseText(micrograph('g200', 21.3, 0.504))).toBe('noise 0.1, residual 0.12, structure 21.3, unexplained 0.5');
  });
});
