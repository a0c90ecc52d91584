/**
 * `thinfoil ribbon` end to end through the compiled CLI (`npm test` builds dist/ first). The micrograph is
 * made by `thinfoil render` from the invented example scenario (a SIMULATED image of a 6 nm ribbon), so this
 * checks the plumbing: file reading, pixel size, line angle from g, the read-out and the exit codes.
 */
import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

const ROOT = join(import.meta.dirname, '..', '..');
const CLI = join(ROOT, 'dist', 'cli', 'main.js');
const run = (...args: string[]) => {
  const r = spawnSync(process.execPath, [CLI, ...args], { cwd: ROOT, encoding: 'utf8' });
  return { code: r.status, out: r.stdout, err: r.stderr };
};
const SC = 'scenarios/copper-ribbon-width.json';

describe('thinfoil ribbon', () => {
  const dir = mkdtempSync(join(tmpdir(), 'thinfoil-ribbon-'));
  const out = join(dir, 'render');

  it('reads back the 6 nm ribbon of the example from its rendered weak-beam TIFF (pixel size from the file)', () => {
    const r0 = run('render', SC, '--out', out, '--json');
    expect(r0.code, r0.err).toBe(0);
    const r = run('ribbon', SC, '--micrograph', join(out, 'wb-df.tif'), '--g-angle', '90', '--json');
    expect(r.code, r.err).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.pixel_nm).toBeCloseTo(0.25, 9);
    expect(Math.abs(j.width_nm - 6)).toBeLessThan(0.25); // within the pixel size
    expect(j.shapeAgrees).toBe(true);
    expect(j.sfe.anisotropic_mJ_per_m2).toBeGreaterThan(0);
    const text = run('ribbon', SC, '--micrograph', join(out, 'wb-df.tif'), '--line-angle', '-90');
    expect(text.code, text.err).toBe(0);
    expect(text.out).toMatch(/true partial separation 6\.0\d* \+- /);
    expect(text.out).toMatch(/stacking-fault energy: isotropic/);
  });

  it.each([
    [['ribbon', SC], /--micrograph is missing/],
    [['ribbon', SC, '--micrograph', 'nope.tif'], /micrograph/],
    [['ribbon', SC, '--micrograph', 'MICRO', '--condition', 'xx'], /--condition: "xx"/],
    [['ribbon', SC, '--micrograph', 'MICRO'], /--line-angle is missing/],
    [['ribbon', SC, '--micrograph', 'MICRO', '--line-angle', '90', '--field', 'xx'], /--field/],
    [['ribbon', SC, '--micrograph', 'MICRO', '--line-angle', 'abc'], /--line-angle: "abc" is not a number/],
    [['ribbon', SC, '--micrograph', 'MICRO', '--line-angle', '90', '--centre', '5'], /--centre/],
    [['ribbon', SC, '--micrograph', 'MICRO', '--line-angle', '90', '--g-angle', '90'], /^thinfoil: --line-angle and --g-angle: give one of the two/],
    [['ribbon', SC, '--micrograph', 'MICRO', '--g-angle', '90', '--bin-nm', '100'], /^thinfoil: --bin-nm: bins of 100 nm leave fewer than two bins .* give a smaller --bin-nm or a centre farther from the edge\n$/],
    [['ribbon', 'scenarios/copper-dislocations.json', '--micrograph', 'MICRO', '--condition', 'g200', '--line-angle', '90'], /dissociated/],
  ])('bad input %j: exit code 2 and one sentence naming the field', (args, pattern) => {
    const micro = join(out, 'wb-df.tif');
    const a = (args as string[]).map((x) => (x === 'MICRO' ? micro : x));
    const r = run(...a);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(pattern);
    expect(r.err.trim().split('\n').length).toBe(1);
    expect(r.err).not.toMatch(/\n\s+at /);
  });

  // the scenario's "micrographs".wb settings go through the validation identify uses (src/analysis/identifySettings.ts)
  const withSettings = (name: string, wb: Record<string, unknown>) => {
    const file = join(dir, `${name}.json`);
    writeFileSync(file, JSON.stringify({ ...JSON.parse(readFileSync(join(ROOT, SC), 'utf8')), micrographs: { wb } }));
    return file;
  };

  it('takes the pixel size and the direction of g from the scenario\'s "micrographs" settings', () => {
    const file = withSettings('good', { pixel_nm: 0.25, gAngle_deg: 90 });
    const r = run('ribbon', file, '--micrograph', join(out, 'wb-df.tif'), '--json');
    expect(r.code, r.err).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.pixel_nm).toBe(0.25);
    expect(Math.abs(j.width_nm - 6)).toBeLessThan(0.25);
  });

  it.each([
    [{ pixel_nm: '0.25', gAngle_deg: 90 }, /^thinfoil: micrographs\.wb\.pixel_nm: must be a finite number \(nm\)\n$/],
    [{ pixel_nm: -0.25, gAngle_deg: 90 }, /^thinfoil: micrographs\.wb\.pixel_nm: must be greater than 0 \(nm\), got -0\.25\n$/],
    [{ gAngle_deg: 400 }, /^thinfoil: micrographs\.wb\.gAngle_deg: must be at most 360 \(degrees\), got 400\n$/],
    [{ gAngle_deg: '90' }, /^thinfoil: micrographs\.wb\.gAngle_deg: must be a finite number \(degrees\)\n$/],
  ])('a bad "micrographs" setting %j: exit code 2 and one sentence naming its JSON path', (wb, pattern) => {
    const file = withSettings('bad', wb);
    const r = run('ribbon', file, '--micrograph', join(out, 'wb-df.tif'));
    expect(r.code).toBe(2);
    expect(r.err).toMatch(pattern);
  });
});
