/** `thinfoil render` figure options end to end (compiled CLI in a child process; plumbing, not physics). */
import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

const ROOT = join(import.meta.dirname, '..', '..');
const CLI = join(ROOT, 'dist', 'cli', 'main.js');
const run = (...args: string[]) => {
  const r = spawnSync(process.execPath, [CLI, ...args], { cwd: ROOT, encoding: 'utf8' });
  return { code: r.status, out: r.stdout, err: r.stderr };
};

const SCENARIO = {
  name: 'figure options test (invented)',
  material: 'Cu',
  kV: 200,
  foil: { thickness_nm: 60, normal: [0, 0, 1] },
  beam: [0, 0, 1],
  imageX: [1, 0, 0],
  image: { width_px: 24, height_px: 16, pixel_nm: 1 },
  absorption: 0.1,
  conditions: [
    { id: 'g200', g: [2, 0, 0], w: 0.5 },
    { id: 'g020', g: [0, 2, 0], w: 0.5 },
  ],
  defects: [{ type: 'dislocation', b: '1/2[1 1 0]', line: [1, -1, 2], point_nm: [0, 0, 30] }],
};

describe('thinfoil render figures', () => {
  const dir = mkdtempSync(join(tmpdir(), 'thinfoil-fig-'));
  const file = join(dir, 'sc.json');
  writeFileSync(file, JSON.stringify(SCENARIO));

  it('writes a figure per condition and a contact sheet, and records contrast, point spread and geometry in render.json', () => {
    const out = join(dir, 'out');
    const r = run('render', file, '--out', out, '--contrast', 'each', '--blur-nm', '1.5');
    expect(r.err).toBe('');
    expect(r.code).toBe(0);
    for (const f of ['g200-figure.png', 'g200-figure.svg', 'g020-figure.png', 'contact-sheet.png', 'contact-sheet.svg']) expect(existsSync(join(out, f))).toBe(true);
    const j = JSON.parse(readFileSync(join(out, 'render.json'), 'utf8'));
    expect(j.figures.contrast).toBe('each');
    expect(j.pointSpread_nm).toBe(1.5);
    // g = (0 2 0) with beam [001] and imageX [100] points down the image: -90 degrees (worked by hand)
    expect(j.conditions[1].geometry.gAngle_deg).toBeCloseTo(-90, 9);
    expect(j.conditions[1].geometry.nearestZone.axis).toBe('[0 0 1]');
    expect(readFileSync(join(out, 'contact-sheet.svg'), 'utf8')).toMatch(/^<svg|<\?xml/);
  });

  it.each([
    [['--contrast', 'loud'], /--contrast/],
    [['--blur-nm', '-1'], /--blur-nm/],
  ])('refuses %j with exit code 2 and one line', (opt, re) => {
    const r = run('render', file, '--out', join(dir, 'bad'), ...opt);
    expect(r.code).toBe(2);
    expect(r.err.trim().split('\n')).toHaveLength(1);
    expect(r.err).toMatch(re);
  });

  it('a scenario with a JSON comment is refused with its line and column', () => {
    const bad = join(dir, 'comment.json');
    writeFileSync(bad, '{\n  "name": "x", // a comment\n  "kV": 200\n}\n');
    const r = run('render', bad, '--out', join(dir, 'c'));
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/line 2, column 16: a comment/);
  });
});
