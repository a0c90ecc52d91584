/**
 * fault, bloch and the refusals of render end to end through the compiled CLI (`npm test` builds dist/ first);
 * the demo has its own file (test/cli/demo.test.ts) so that the two test workers share the long files.
 */
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

describe('thinfoil fault', () => {
  it('reads the example scenario and gives both readings of the fault with opposite bright-field outer fringes', () => {
    const r = run('fault', 'scenarios/copper-faults.json', '--json');
    expect(r.code, r.err).toBe(0);
    const j = JSON.parse(r.out);
    const g111 = j.faults.find((f: any) => f.condition === 'g1m11');
    const [intr, extr] = g111.readings;
    expect(intr.reading).toBe('intrinsic');
    expect(Math.abs(intr.alpha_deg)).toBeCloseTo(120, 6); // alpha = 2 pi g.R = +-2 pi/3 (physics.md section 5)
    expect(intr.bf.top).not.toBe(extr.bf.top); // alpha -> -alpha reverses BF outer fringes (Hashimoto et al. 1962)
    // g.R integer: no fringes
    const g022 = j.faults.find((f: any) => f.condition === 'g02m2');
    expect(g022.readings[0].bf.top).toBe('none');
    expect(j.inclusions.length).toBe(3);
  });
  it('`nature` (the same command) reads loop nature from a simulated +g/-g pair and black-white lobes of a small loop', () => {
    // the physics of these readings is checked in test/analysis/loopReadout.test.ts; here the plumbing
    const r = run('nature', 'scenarios/copper-loop-nature.json', '--json');
    expect(r.code, r.err).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.loops.length).toBe(2);
    const [big, small] = j.loops;
    expect(big.pair).toBe('+g outside and -g inside: vacancy; +g inside and -g outside: interstitial');
    expect(small.small).toBe(true);
    // at w = 1 the lobes are read with a caution: they are usually read near s = 0 (common practice)
    expect(small.note).toMatch(/usually read near s = 0; at w = 1/);
    expect(small.natures[0].depthSeries.length).toBe(12);
    const t = run('nature', 'scenarios/copper-loop-nature.json');
    expect(t.code, t.err).toBe(0);
    expect(t.out).toMatch(/A \(25 nm\), g220: \+g outside and -g inside: vacancy/);
    expect(t.out).toMatch(/sign of l\.g with depth/);
  });
  it('at w = 0 the loop line suggests s > 0 with |w| near 1 (README), not "a larger |w|"', () => {
    const dir = mkdtempSync(join(tmpdir(), 'thinfoil-loop-w0-'));
    const sc = JSON.parse(readFileSync(join(ROOT, 'scenarios', 'copper-loop-nature.json'), 'utf8'));
    sc.conditions = [{ id: 'g220', g: [2, 2, 0], w: 0 }];
    sc.image = { width_px: 64, height_px: 64, pixel_nm: 1 };
    writeFileSync(join(dir, 'w0.json'), JSON.stringify(sc));
    const r = run('nature', join(dir, 'w0.json'));
    expect(r.code, r.err).toBe(0);
    expect(r.out).toMatch(/A \(25 nm\), g220: the simulated \+g\/-g pair does not separate the natures here; choose another g, or s > 0 with \|w\| near 1/);
    expect(r.out).not.toMatch(/a larger \|w\|/);
  });
  it('says so when there is nothing to analyse', () => {
    const r = run('fault', 'scenarios/copper-dislocations.json');
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/nothing to analyse/);
  });
});

describe('thinfoil bloch', () => {
  it('writes the table, CSV and plots for a 5-beam row; two waves at s = 0 in two-beam', () => {
    const out = mkdtempSync(join(tmpdir(), 'thinfoil-bloch-'));
    const r = run('bloch', 'Cu', '2,0,0', '--beams', '5', '--w', '-0.5', '--out', out, '--json');
    expect(r.code, r.err).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.waves.length).toBe(5);
    for (const f of ['bloch-waves.csv', 'thickness.png', 'rocking.svg', 'profiles.csv']) expect(existsSync(join(out, f))).toBe(true);
    const two = JSON.parse(run('bloch', 'Al', '1,1,1', '--out', out, '--json').out);
    expect(two.waves.length).toBe(2);
  });
  it.each([
    [['bloch', 'Cu', '1,0,0'], /forbidden/],
    [['bloch', 'Cu', '2,0,0', '--beams', '4'], /--beams/],
    [['bloch', 'Cu', '2,0,0', '--s', '0.01', '--w', '1'], /--s|--w/],
    [['bloch', 'Cu', '2,0,0', '--thickness', '-3'], /--thickness/],
    [['demo', '--size', '10.5'], /--size/],
  ])('bad input %j: exit code 2', (args, pattern) => {
    const r = run(...(args as string[]));
    expect(r.code).toBe(2);
    expect(r.err).toMatch(pattern);
    expect(r.err).not.toMatch(/\n\s+at /);
  });
});

describe('commands refuse a scenario that is not an object', () => {
  it('an array or a number: exit code 2', () => {
    const dir = mkdtempSync(join(tmpdir(), 'thinfoil-bad-'));
    for (const text of ['[]', '3', 'null']) {
      const f = join(dir, 's.json');
      writeFileSync(f, text);
      for (const cmd of ['render', 'visibility', 'fault']) {
        const r = run(cmd, f);
        expect(r.code).toBe(2);
        expect(r.err).not.toMatch(/\n\s+at /);
      }
    }
  });
});

describe('render warns about defects that cannot show', () => {
  it('an end-on dislocation, an edge-on fault and an inclusion outside the view give warnings on stderr, in --json and in render.json; the render still works', () => {
    const dir = mkdtempSync(join(tmpdir(), 'thinfoil-warn-'));
    const f = join(dir, 's.json');
    writeFileSync(f, JSON.stringify({
      name: 'warn', material: 'Cu', kV: 200, foil: { thickness_nm: 50, normal: [0, 0, 1] }, beam: [0, 0, 1], imageX: [1, 0, 0],
      image: { width_px: 8, height_px: 8, pixel_nm: 1 },
      conditions: [{ id: 'g200', g: [2, 0, 0], w: 0.5 }],
      defects: [
        { type: 'dislocation', b: '1/2[1 1 0]', line: [0, 0, 1], point_nm: [0, 0, 25] },
        { type: 'fault', plane: [1, 0, 0], vector: '1/3[1 1 1]', point_nm: [0, 0, 25] },
        { type: 'inclusion', centre_nm: [100, 0, 25], radius_nm: 3, misfit: 0.01 },
      ],
    }));
    const r = run('render', f, '--out', join(dir, 'o'), '--json');
    expect(r.code, r.err).toBe(0);
    expect(r.err).toMatch(/end-on/);
    expect(r.err).toMatch(/edge-on/);
    expect(r.err).toMatch(/outside the 8 x 8 nm field of view/);
    expect(JSON.parse(r.out).warnings.length).toBe(3);
    expect(JSON.parse(readFileSync(join(dir, 'o', 'render.json'), 'utf8')).warnings).toEqual(JSON.parse(r.out).warnings);
  });

  it('a thickness typed in micrometres (0.15) is warned about on stderr and in the JSON of render, visibility and fault', () => {
    const dir = mkdtempSync(join(tmpdir(), 'thinfoil-thin-'));
    const f = join(dir, 's.json');
    writeFileSync(f, JSON.stringify({
      name: 'thin', material: 'Cu', kV: 200, foil: { thickness_nm: 0.15 }, beam: [0, 0, 1],
      image: { width_px: 4, height_px: 4, pixel_nm: 1 }, conditions: [{ id: 'g200', g: [2, 0, 0], s_per_nm: 0 }],
    }));
    for (const cmd of ['render', 'visibility', 'fault']) {
      const r = run(cmd, f, '--json', ...(cmd === 'render' ? ['--out', join(dir, 'o')] : []));
      expect(r.code, r.err).toBe(0);
      expect(r.err).toMatch(/^thinfoil: warning: foil\.thickness_nm is 0\.15 nm, .*micrometres \(150 nm\)\?\n$/);
      expect(JSON.parse(r.out).warnings).toHaveLength(1);
    }
  });

  it('a defect wholly outside the crystal is refused: one line, exit code 2', () => {
    const dir = mkdtempSync(join(tmpdir(), 'thinfoil-out-of-foil-'));
    const f = join(dir, 's.json');
    writeFileSync(f, JSON.stringify({
      name: 'x', material: 'Cu', kV: 200, foil: { thickness_nm: 50 }, beam: [0, 0, 1],
      image: { width_px: 4, height_px: 4, pixel_nm: 1 }, conditions: [{ id: 'g200', g: [2, 0, 0], s_per_nm: 0 }],
      defects: [{ type: 'inclusion', centre_nm: [0, 0, 500], radius_nm: 3, misfit: 0.01 }],
    }));
    const r = run('render', f, '--out', join(dir, 'o'));
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/^thinfoil: defects\[0\]\.centre_nm: the inclusion .* wholly outside the 50 nm foil.*\n$/);
    expect(r.err.trim().split('\n')).toHaveLength(1);
  });
});

describe('an output folder that cannot be written is refused before any work', () => {
  it('--out under a regular file or under /proc: exit code 2 at once', () => {
    const dir = mkdtempSync(join(tmpdir(), 'thinfoil-out-'));
    const file = join(dir, 'plain-file');
    writeFileSync(file, 'x');
    for (const out of [join(file, 'sub'), '/proc/thinfoil-test']) {
      const r = run('render', 'scenarios/copper-dislocations.json', '--out', out);
      expect(r.code).toBe(2);
      expect(r.err).toMatch(/--out/);
    }
  });
});
