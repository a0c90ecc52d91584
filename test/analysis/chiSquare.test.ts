/** The chi-square survival function behind the consistency p-value of `traces`, against scipy.stats.chi2.sf. */
import { describe, expect, it } from 'vitest';
import { chiSquareSurvival } from '../../src/analysis/chiSquare.js';
import { needPython, pythonJson } from '../python.js';

describe('chiSquareSurvival', () => {
  it('closed forms: k = 2 gives exp(-x/2); k = 1 at x = 3.841 gives 0.05 (textbook table, Abramowitz & Stegun 26.4)', () => {
    for (const x of [0.1, 1, 5, 20]) expect(chiSquareSurvival(x, 2)).toBeCloseTo(Math.exp(-x / 2), 12);
    expect(chiSquareSurvival(3.841458820694124, 1)).toBeCloseTo(0.05, 9);
  });
  const py = needPython('scipy');
  it('equals scipy.stats.chi2.sf to 1e-9 relative', (ctx) => {
    py.require(ctx);
    const pts = [[0.5, 1], [3, 1], [12, 1], [0.2, 3], [4, 3], [30, 3], [2, 7], [15, 7], [60, 20], [5, 22]];
    const ref = pythonJson<number[]>('import json,sys; from scipy.stats import chi2; p=json.load(sys.stdin); print(json.dumps([float(chi2.sf(x,k)) for x,k in p]))', pts);
    pts.forEach(([x, k], i) => expect(Math.abs(chiSquareSurvival(x, k) - ref[i])).toBeLessThan(1e-9 * Math.max(ref[i], 1e-300) + 1e-15));
  });
});
