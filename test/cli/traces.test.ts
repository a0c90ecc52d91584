/** `thinfoil traces` end to end through the compiled CLI (`npm test` builds dist/ first). */
import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';

const ROOT = join(import.meta.dirname, '..', '..');
const CLI = join(ROOT, 'dist', 'cli', 'main.js');
const run = (...args: string[]) => {
  const r = spawnSync(process.execPath, [CLI, ...args], { cwd: ROOT, encoding: 'utf8' });
  return { code: r.status, out: r.stdout, err: r.stderr };
};

// the README's invented example: a line along [1 -1 2] in Cu seen in [001], [011] and [112]
// (exact angles 57, 29.76 and 69.23 degrees; the "measured" ones carry up to 0.7 degrees of error)
const VIEWS = [
  '--view', 'beam=0,0,1 g=2,0,0 gAngle=12 lineAngle=57.5 length=86 lengthError=4',
  '--view', 'beam=0,1,1 g=2,0,0 gAngle=-35 lineAngle=30',
  '--view', 'beam=[1 1 2]; g=2,-2,0; gAngle=30; lineAngle=68.5',
];

describe('thinfoil traces', () => {
  it('finds u near [1 -1 2], the {111} glide plane of 1/2[1 1 0], and a consistent projected length (README example)', () => {
    const r = run('traces', 'Cu', ...VIEWS, '--b', '1/2<110>', '--thickness', '120', '--thickness-error', '6', '--normal', '0,0,1', '--json');
    expect(r.code, r.err).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.nearest.direction).toBe('[1 -1 2]');
    expect(j.nearest.angle_deg).toBeLessThan(2 * j.cone_deg);
    expect(j.dof).toBe(1);
    expect(j.candidates.length).toBe(6);
    const b110 = j.candidates.find((c: any) => c.b === '1/2[1 1 0]');
    expect(b110.commonSlipPlane).toBe('{111}');
    expect(j.lengths[0].consistent).toBe(true);
    expect(j.startingLine.line.length).toBe(3);
    const t = run('traces', 'Cu', ...VIEWS, '--normal', '0,0,1');
    expect(t.code).toBe(0);
    expect(t.out).toMatch(/nearest low-index direction \[1 -1 2\]/);
    expect(t.out).toMatch(/"line": \[/);
  });

  it('takes beam and g from a scenario condition, gAngle from its "micrographs" settings, thickness, normal and candidates from the scenario', () => {
    const dir = mkdtempSync(join(tmpdir(), 'thinfoil-traces-'));
    const file = join(dir, 'traces.json');
    writeFileSync(
      file,
      JSON.stringify({
        name: 'traces', material: 'Cu', kV: 200, foil: { thickness_nm: 120, normal: [0, 0, 1] }, beam: [0, 0, 1],
        conditions: [{ id: 'a', g: [2, 0, 0], w: 0.5 }, { id: 'b', g: [2, 0, 0], w: 0.5, beam: [0, 1, 1] }],
        defects: [{ type: 'dislocation', b: '1/2[1 1 0]', line: [1, -1, 2], point_nm: [0, 0, 60] }],
        candidates: ['1/2[1 1 0]', '1/2[1 -1 0]'],
        micrographs: { a: { pixel_nm: 1, gAngle_deg: 12 } },
      }),
    );
    const r = run('traces', file, '--view', 'condition=a lineAngle=57 length=84.85 lengthError=2', '--view', 'condition=b gAngle=-35 lineAngle=29.76', '--json');
    expect(r.code, r.err).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.nearest.direction).toBe('[1 -1 2]');
    expect(j.nearest.angle_deg).toBeLessThan(0.01);
    expect(j.candidates.map((c: any) => c.b)).toEqual(['1/2[1 1 0]', '1/2[1 -1 0]']);
    expect(j.lengths[0].predictedLength_nm).toBeCloseTo(84.85, 1); // t sqrt(2)/2 for t = 120 (by hand)
    const bad = run('traces', file, '--view', 'condition=NOPE lineAngle=3', '--view', 'condition=b gAngle=0 lineAngle=3');
    expect(bad.code).toBe(2);
    expect(bad.err).toMatch(/--view 1 condition: "NOPE"/);
  });

  it.each([
    [{ a: { gAngle_deg: 400 } }, /^thinfoil: micrographs\.a\.gAngle_deg: must be at most 360 \(degrees\), got 400\n$/],
    [{ a: { gAngle_deg: '12' } }, /^thinfoil: micrographs\.a\.gAngle_deg: must be a finite number \(degrees\)\n$/],
    [{ a: { pixel_nm: -1, gAngle_deg: 12 } }, /^thinfoil: micrographs\.a\.pixel_nm: must be greater than 0/],
    [{ c: { gAngle_deg: 12 } }, /^thinfoil: micrographs\.c: names no condition of the scenario; use one of a, b\n$/],
  ])('a bad "micrographs" setting %j in the scenario: exit code 2 and one sentence naming its JSON path', (micrographs, pattern) => {
    const dir = mkdtempSync(join(tmpdir(), 'thinfoil-traces-'));
    const file = join(dir, 'traces.json');
    writeFileSync(
      file,
      JSON.stringify({
        name: 'traces', material: 'Cu', kV: 200, foil: { thickness_nm: 120, normal: [0, 0, 1] }, beam: [0, 0, 1],
        conditions: [{ id: 'a', g: [2, 0, 0], w: 0.5 }, { id: 'b', g: [2, 0, 0], w: 0.5, beam: [0, 1, 1] }],
        defects: [{ type: 'dislocation', b: '1/2[1 1 0]', line: [1, -1, 2], point_nm: [0, 0, 60] }],
        micrographs,
      }),
    );
    const r = run('traces', file, '--view', 'condition=a lineAngle=57', '--view', 'condition=b gAngle=-35 lineAngle=29.76');
    expect(r.code).toBe(2);
    expect(r.err).toMatch(pattern);
  });

  it.each([
    [['traces', 'Cu', '--view', 'beam=0,0,1 g=2,0,0 gAngle=0 lineAngle=45'], /--view: .*at least two views/],
    [['traces', 'Cu', '--view', 'beam=0,0,1 g=2,0,0 gAngle=0 lineAngle=45', '--view', 'beam=0,1,1 g=2,0,0 gAngle=0'], /--view 2 lineAngle: missing/],
    [['traces', 'Cu', '--view', 'beam=0,0,1 g=2,0,0 gAngle=0 lineAngle=45', '--view', 'beam=0,1,1 g=1,1,1 gAngle=0 lineAngle=3'], /--view 2: g = \(1 1 1\) .* out of the zone/],
    [['traces', 'Cu', '--view', 'beam=0,0,1 g=2,0,0 gAngle=0 lineAngle=45', '--view', 'beam=0,1,1 g=2,0,0 gAngle=0 lineAngle=abc'], /--view 2 lineAngle: "abc" is not a number/],
    [['traces', 'Cu', '--view', 'beam=0,0,1 g=2,0,0 gAngle=0 lineAngle=45', '--view', 'beam=0,1,1 g=2,0,0 gangle=0 lineAngle=3'], /--view 2: unknown key "gangle"/],
    [['traces', 'Cu', '--view', 'beam=0,0,1 g=2,0,0 gAngle=0 lineAngle=45', '--view', 'beam=0,0,1 g=0,2,0 gAngle=90 lineAngle=3'], /--view: the beam directions/],
    [['traces', 'Cu', '--view', 'beam=0,0,1 g=2,0,0 gAngle=0 lineAngle=45 length=50', '--view', 'beam=0,1,1 g=2,0,0 gAngle=0 lineAngle=60'], /--normal/],
    [['traces', 'Cu', '--view', 'beam=0,0,1 g=2,0,0 gAngle=0 lineAngle=45', '--view', 'beam=0,1,1 g=2,0,0 gAngle=0 lineAngle=60', '--b', '{111}'], /--b 1/],
    // extinction rules of the kinematical structure factor (textbook rules, e.g. Williams & Carter, Transmission Electron
    // Microscopy; quoted from memory, exact for whole indices): fcc needs h, k, l all even or all odd; bcc needs h + k + l even; diamond also forbids all-even with h + k + l = 4n + 2
    [['traces', 'Cu', '--view', 'beam=0,0,1 g=1,0,0 gAngle=0 lineAngle=45', '--view', 'beam=0,1,1 g=2,0,0 gAngle=0 lineAngle=60'], /^thinfoil: --view 1 g: \(1 0 0\) is forbidden for the fcc structure of Cu .*give the reflection that was excited, e\.g\. \(2 0 0\)\n$/],
    [['traces', 'alpha-Fe', '--view', 'beam=0,0,1 g=2,0,0 gAngle=0 lineAngle=45', '--view', 'beam=1,-1,0 g=1,1,1 gAngle=0 lineAngle=60'], /^thinfoil: --view 2 g: \(1 1 1\) is forbidden for the bcc structure of alpha-Fe .*e\.g\. \(2 2 2\)\n$/],
    [['traces', 'Si', '--view', 'beam=0,0,1 g=2,0,0 gAngle=0 lineAngle=45', '--view', 'beam=0,1,1 g=4,0,0 gAngle=0 lineAngle=60'], /^thinfoil: --view 1 g: \(2 0 0\) is forbidden for the diamond structure of Si .*e\.g\. \(4 0 0\)\n$/],
    [['traces', 'Cu', '--view', 'beam=0,0,1 g=2.5,0,0 gAngle=0 lineAngle=45', '--view', 'beam=0,1,1 g=2,0,0 gAngle=0 lineAngle=60'], /^thinfoil: --view 1 g: \(2\.5 0 0\) is not a reflection; give whole-number indices/],
    [['traces', 'Unobtainium', '--view', 'beam=0,0,1 g=2,0,0 gAngle=0 lineAngle=45'], /material/],
  ])('bad input %j: exit code 2 and one sentence naming the field', (args, pattern) => {
    const r = run(...(args as string[]));
    expect(r.code).toBe(2);
    expect(r.err).toMatch(pattern);
    expect(r.err.trim().split('\n').length).toBe(1);
    expect(r.err).not.toMatch(/\n\s+at /);
  });
  it('--help of traces states each default once and never "(default: [])"', () => {
    const h = run('traces', '--help');
    expect(h.code).toBe(0);
    expect(h.out).not.toMatch(/default: \[\]/);
    expect(h.out.replace(/\s+/g, ' ')).not.toMatch(/\(default[^()]*\) \(default/);
    expect(h.out.replace(/\s+/g, ' ')).toMatch(/repeat for more \(default: the scenario's candidates\)/);
  });
  it('a line exactly in a symmetry plane prints a zero Cartesian component as 0, not as rounding noise like -6.993e-17', () => {
    // [001] view with g along +x and the trace along g: u lies in the (0 1 0) plane, so its y component is exactly 0
    const r = run('traces', 'Cu', '--view', 'beam=0,0,1 g=2,0,0 gAngle=12 lineAngle=12', '--view', 'beam=0,1,1 g=2,0,0 gAngle=-35 lineAngle=30');
    expect(r.code, r.err).toBe(0);
    expect(r.out).toMatch(/unit Cartesian [-0-9.]+, 0, [-0-9.]+\)/);
    expect(r.out).toMatch(/\(0 1 0\) 0,/);
    expect(r.out).not.toMatch(/e-1\d/);
  });
});
