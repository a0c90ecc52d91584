/**
 * toCsv against RFC 4180 (CRLF record ends, quoting of comma, quote, CR, LF,
 * doubled quotes) and read back by an independent parser: Python's standard
 * csv module run with Debian's /usr/bin/python3; numbers must read back to
 * the same double with Python's float().
 */
import { describe, expect, it } from 'vitest';
import { toCsv } from '../../src/output/csv.js';
import { needPython, pythonText } from '../python.js';

const py = needPython('csv', 'json');

const PY_READ = String.raw`
import csv, io, json, sys
text = sys.stdin.buffer.read().decode("utf-8")
rows = list(csv.reader(io.StringIO(text, newline="")))
print(json.dumps(rows))
`;

const PY_FLOATS = String.raw`
import json, sys
cells = json.loads(sys.stdin.read())
print(json.dumps([repr(float(c)) for c in cells]))
`;

describe('toCsv: RFC 4180 form', () => {
  it('ends every record with CRLF and quotes only where needed', () => {
    const text = toCsv(['name', 'value'], [
      ['plain', 1],
      ['a,b', 2],
      ['say "hi"', 3],
    ]);
    expect(text).toBe('name,value\r\nplain,1\r\n"a,b",2\r\n"say ""hi""",3\r\n');
  });

  it('refuses NaN, infinities and ragged rows', () => {
    expect(() => toCsv(['a'], [[NaN]])).toThrow(/row 1, column 0 is NaN/);
    expect(() => toCsv(['a'], [[-Infinity]])).toThrow(RangeError);
    expect(() => toCsv(['a', 'b'], [[1]])).toThrow(/row 1 has 1 cells/);
    expect(() => toCsv([], [])).toThrow(RangeError);
  });
});

describe('toCsv read back by Python csv', () => {

  it('gives back every string cell, including commas, quotes, CR, LF, spaces and non-ASCII', (ctx) => {
    py.require(ctx);
    const header = ['label', 'note', 'x'];
    const rows: (string | number)[][] = [
      ['g = 1,1,-1', 'b = a/2 [1 1 0]', 1],
      ['quote "inside"', '"', 2],
      ['line\nbreak', 'cr\rhere', 3],
      ['crlf\r\nin field', '', 4],
      [' leading space', 'trailing space ', 5],
      ['ξg = 25 nm', 'Å, °, µ', 6],
      ['', '', 7],
    ];
    const text = toCsv(header, rows);
    const back = JSON.parse(pythonText(['-c', PY_READ], text)) as string[][];
    expect(back).toEqual([header, ...rows.map((row) => row.map(String))]);
  });

  it('a one-column table with an empty cell keeps the record', (ctx) => {
    py.require(ctx);
    const text = toCsv(['only'], [[''], ['x']]);
    expect(JSON.parse(pythonText(['-c', PY_READ], text))).toEqual([['only'], [''], ['x']]);
  });

  it('numbers read back to the same double', (ctx) => {
    py.require(ctx);
    const nums = [0.1, 1 / 3, -2 / 7, 1e-7, 5e-324, -1.5e300, 123456789012345680000, 2 ** 53 + 2, -0, 0.30000000000000004, Math.PI];
    const text = toCsv(['v'], nums.map((v) => [v]));
    const cells = (JSON.parse(pythonText(['-c', PY_READ], text)) as string[][])
      .slice(1)
      .map((r) => r[0]);
    // Python repr(float) is the shortest round-trip text too; compare as doubles
    const back = (JSON.parse(pythonText(['-c', PY_FLOATS], cells)) as string[]).map(Number);
    back.forEach((v, i) => expect(v === nums[i] || (v === 0 && nums[i] === 0)).toBe(true));
  });
});
