/**
 * Locating JSON syntax errors for the user. Valid/invalid is decided by the
 * JSON grammar (RFC 8259); the reference for validity is the platform's own
 * JSON.parse (V8), an implementation independent of our scanner: every text
 * here must be judged the same way by both.
 */
import { describe, expect, it } from 'vitest';
import { locateJsonError } from '../../src/scenario/jsonSyntax.js';

const valid = (t: string) => {
  try {
    JSON.parse(t);
    return true;
  } catch {
    return false;
  }
};

describe('locateJsonError', () => {
  it.each([
    ['{"a": 1,\n  "b": }', 2, 8, /unexpected "}"/],
    ['{\n  "a": 1 // metres\n}', 2, 10, /comment/],
    ['{\n  "a": [1, 2,]\n}', 2, 14, /trailing comma/],
    ['{\n  "a": 1,\n}', 3, 1, /trailing comma/],
    ['{"a":', 1, 6, /unexpected end of the file, expected/],
    ['{"a": 1}\n}', 2, 1, /nothing more/],
    ['{\n  "a": "x\ty"\n}', 2, 10, /control character/],
    ["{'a': 1}", 1, 2, /double quotes/],
    ['{"a": .5}', 1, 7, /a value/],
    ['{"a": 01}', 1, 8, /"," or "}"/],
    ['{"a": "\\x"}', 1, 8, /bad escape/],
  ])('%j: line %i, column %i', (text, line, column, why) => {
    expect(valid(text)).toBe(false);
    const e = locateJsonError(text);
    expect(e).not.toBeNull();
    expect([e!.line, e!.column]).toEqual([line, column]);
    expect(e!.message).toMatch(why);
  });

  it('accepts what JSON.parse accepts (V8 as the reference), over a few hundred random mutations of a scenario', () => {
    const base = JSON.stringify({ name: 'x', kV: 200, foil: { thickness_nm: 100 }, conditions: [{ id: 'g', g: [2, 0, 0], w: -1.5e-3 }], s: 'a\\"\\u00e9' }, null, 1);
    let seed = 12345;
    const rnd = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
    const junk = ['', ',', '}', ']', '"', ':', ' ', '1', '-', '.', 'e', 'n', '/', '\\', '\n'];
    let agreed = 0;
    for (let k = 0; k < 400; k++) {
      const at = Math.floor(rnd() * base.length);
      const cut = Math.floor(rnd() * 3);
      const t = base.slice(0, at) + junk[Math.floor(rnd() * junk.length)] + base.slice(at + cut);
      expect(locateJsonError(t) === null).toBe(valid(t));
      agreed++;
    }
    expect(agreed).toBe(400);
  });
});
