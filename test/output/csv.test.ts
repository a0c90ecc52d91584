/**
 * toCsv against RFC 4180 (CRLF record ends, quoting of comma, quote, CR, LF,
 * doubled quotes) and read back by an independent parser: Python's standard
 * csv module run with Debian's /usr/bin/python3; numbers must read back to
 * the same double with Python's float().
 */
import { spawnSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { toCsv } from '../../src/output/csv.js';
import { IN_CI, PYTHON } from '../imageio/python.js';

const HAVE_PYTHON = spawnSync(PYTHON, ['-c', 'import csv, json'], { encoding: 'utf8' }).status === 0;

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
  it('has /usr/bin/python3 (required when CI=true)', (ctx) => {
    if (!HAVE_PYTHON) {
      if (IN_CI) expect.fail('/usr/bin/python3 not found; required under CI');
      ctx.skip('/usr/bin/python3 not found; skipping the Python csv checks');
    }
    expect(HAVE_PYTHON).toBe(true);
  });

  it.skipIf(!HAVE_PYTHON)('gives back every string cell, including commas, quotes, CR, LF, spaces and non-ASCII', () => {
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
    const r = spawnSync(PYTHON, ['-c', PY_READ], { input: text, encoding: 'utf8' });
    expect(r.status).toBe(0);
    const back = JSON.parse(r.stdout) as string[][];
    expect(back).toEqual([header, ...rows.map((row) => row.map(String))]);
  });

  it.skipIf(!HAVE_PYTHON)('a one-column table with an empty cell keeps the record', () => {
    const text = toCsv(['only'], [[''], ['x']]);
    const r = spawnSync(PYTHON, ['-c', PY_READ], { input: text, encoding: 'utf8' });
    expect(JSON.parse(r.stdout)).toEqual([['only'], [''], ['x']]);
  });

  it.skipIf(!HAVE_PYTHON)('numbers read back to the same double', () => {
    const nums = [0.1, 1 / 3, -2 / 7, 1e-7, 5e-324, -1.5e300, 123456789012345680000, 2 ** 53 + 2, -0, 0.30000000000000004, Math.PI];
    const text = toCsv(['v'], nums.map((v) => [v]));
    const cells = (JSON.parse(spawnSync(PYTHON, ['-c', PY_READ], { input: text, encoding: 'utf8' }).stdout) as string[][])
      .slice(1)
      .map((r) => r[0]);
    const r = spawnSync(PYTHON, ['-c', PY_FLOATS], { input: JSON.stringify(cells), encoding: 'utf8' });
    expect(r.status).toBe(0);
    // Python repr(float) is the shortest round-trip text too; compare as doubles
    const back = (JSON.parse(r.stdout) as string[]).map(Number);
    back.forEach((v, i) => expect(v === nums[i] || (v === 0 && nums[i] === 0)).toBe(true));
  });
});
