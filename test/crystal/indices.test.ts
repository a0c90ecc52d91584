/**
 * Reading index strings. Notation: Miller indices (hkl), [uvw], families
 * <uvw> and {hkl}; Miller-Bravais [uvtw] with t = -(u+v) (Hirth & Lothe 1982
 * ch. 1; Williams & Carter 2009 ch. 18). Compact single-digit writing with a
 * minus sign for the overbar ("[1-10]") is common practice in plain text.
 */
import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/errors.js';
import { parseIndices, parseVectorWithFraction } from '../../src/crystal/indices.js';

describe('parseIndices accepts the usual writings', () => {
  const cases: [string | number[], number[]][] = [
    ['1,1,1', [1, 1, 1]],
    ['1 -1 0', [1, -1, 0]],
    ['[1 -1 0]', [1, -1, 0]],
    ['(1 1 1)', [1, 1, 1]],
    ['<1 1 0>', [1, 1, 0]],
    ['{1 1 1}', [1, 1, 1]],
    ['1,-1,0', [1, -1, 0]],
    [' 1, -1 , 0 ', [1, -1, 0]],
    ['[1-10]', [1, -1, 0]],
    ['111', [1, 1, 1]],
    ['-1-1-1', [-1, -1, -1]],
    ['(2 0 0)', [2, 0, 0]],
    ['[10 0 1]', [10, 0, 1]],
    ['1 \u22121 0', [1, -1, 0]], // typographic minus
    ['[0.5 0.5 0]', [0.5, 0.5, 0]],
    [[1, -1, 0], [1, -1, 0]],
  ];
  for (const [text, want] of cases) it(JSON.stringify(text), () => expect(parseIndices(text, 'g', 3)).toEqual(want));
  it('4-index sets', () => {
    expect(parseIndices('(1 1 -2 0)', 'g', 4)).toEqual([1, 1, -2, 0]);
    expect(parseIndices('[11-20]', 'g', 4)).toEqual([1, 1, -2, 0]);
    expect(parseIndices('0001', 'g', 4)).toEqual([0, 0, 0, 1]);
    expect(parseIndices('10-11', 'g', '3or4')).toEqual([1, 0, -1, 1]);
    expect(parseIndices('1 1 1', 'g', '3or4')).toEqual([1, 1, 1]);
  });
});

describe('parseIndices refuses bad text with the field name and an example', () => {
  const bad: [string | number[], 3 | 4 | '3or4', RegExp][] = [
    ['1 1', 3, /^g: expected 3 indices but found 2 .*e\.g\. "1 -1 0"/],
    ['1 1 1 1', 3, /expected 3 indices but found 4/],
    ['1 1 0', 4, /expected 4 indices .*e\.g\. "1 1 -2 0"/],
    ['1 1 1 0', 4, /third index must equal -\(first \+ second\)/],
    ['1120', 4, /third index must equal/],
    ['[1 1 0)', 3, /brackets .* do not match/],
    ['[1 1 0', 3, /brackets .* do not match/],
    ['x y z', 3, /^g: cannot read "x y z" as 3 indices; write e\.g\./],
    ['1,,1,0', 3, /cannot read/],
    ['', 3, /cannot read/],
    ['[]', 3, /cannot read/],
    ['0 0 0', 3, /all zero/],
    ['1/2 1/2 0', 3, /fraction is not accepted/],
    ['1.5.2 0 0', 3, /cannot read/],
    [[1, Number.NaN, 0], 3, /finite numbers/],
    [[1, 0], 3, /expected 3 indices but found 2/],
  ];
  for (const [text, n, re] of bad) {
    it(JSON.stringify(text), () => {
      expect(() => parseIndices(text, 'g', n)).toThrow(InputError);
      expect(() => parseIndices(text, 'g', n)).toThrow(re);
    });
  }
});

describe('parseVectorWithFraction', () => {
  const close = (a: number[], b: number[]) => {
    expect(a).toHaveLength(b.length);
    a.forEach((x, i) => expect(x).toBeCloseTo(b[i], 14));
  };
  it('applies the fraction in front', () => {
    close(parseVectorWithFraction('1/2[1 1 0]', 'b'), [0.5, 0.5, 0]);
    close(parseVectorWithFraction('1/6[1 1 -2]', 'b'), [1 / 6, 1 / 6, -1 / 3]);
    close(parseVectorWithFraction('1/2 [1-10]', 'b'), [0.5, -0.5, 0]);
    close(parseVectorWithFraction('0.5[110]', 'b'), [0.5, 0.5, 0]);
    close(parseVectorWithFraction('-1/3 <1 1 1>', 'b'), [-1 / 3, -1 / 3, -1 / 3]);
    close(parseVectorWithFraction('2*[1 0 0]', 'b'), [2, 0, 0]);
    close(parseVectorWithFraction('1/3[11-20]', 'b', 4), [1 / 3, 1 / 3, -2 / 3, 0]);
  });
  it('without a fraction it reads plain indices and arrays', () => {
    close(parseVectorWithFraction('[0.5 0.5 0]', 'b'), [0.5, 0.5, 0]);
    close(parseVectorWithFraction('0.5 0.5 0', 'b'), [0.5, 0.5, 0]);
    close(parseVectorWithFraction([0.5, -0.5, 0], 'b'), [0.5, -0.5, 0]);
  });
  it('refuses a bad factor with the field name and an example', () => {
    expect(() => parseVectorWithFraction('a/2[110]', 'defects[0].b')).toThrow(/^defects\[0\]\.b: give the factor in lattice units without "a", e\.g\. "1\/2\[1 1 0\]"/);
    expect(() => parseVectorWithFraction('1/0[110]', 'b')).toThrow(/must be a non-zero number or fraction/);
    expect(() => parseVectorWithFraction('0[110]', 'b')).toThrow(/must be a non-zero/);
    expect(() => parseVectorWithFraction('half[110]', 'b')).toThrow(/^b: cannot read the factor "half"/);
    expect(() => parseVectorWithFraction('1/2[1 1]', 'b')).toThrow(/expected 3 indices/);
    expect(() => parseVectorWithFraction('1/2[1 1 0]', 'b', 4)).toThrow(/expected 4 indices .*"1 1 -2 0"/);
  });
});
