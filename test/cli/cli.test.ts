/**
 * The command line end to end, run as a user runs it: the compiled CLI in a
 * child process (`npm test` builds dist/ first).
 */
import { describe, expect, it, beforeAll } from 'vitest';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync, existsSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createRequire } from 'node:module';

// npm utif (independent TIFF reader); it ships no type declarations
const UTIF = createRequire(import.meta.url)('utif') as {
  decode(buf: ArrayBuffer): Record<string, unknown>[];
  decodeImage(buf: ArrayBuffer, ifd: Record<string, unknown>): void;
};

const ROOT = join(import.meta.dirname, '..', '..');
const CLI = join(ROOT, 'dist', 'cli', 'main.js');

function run(...args: string[]) {
  const r = spawnSync(process.execPath, [CLI, ...args], { cwd: ROOT, encoding: 'utf8' });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

beforeAll(() => {
  if (!existsSync(CLI)) throw new Error('dist/cli/main.js is missing: run `npm run build` (npm test does it)');
});

describe('thinfoil reflection', () => {
  it('Al 111 at 100 kV: xi_g near 56 nm (Hirsch et al. 1965 table, from memory, +-10 %)', () => {
    // the constant ratio is given explicitly (the default is now the thermal-diffuse model, tested below)
    const r = run('reflection', 'Al', '1,1,1', '--kv', '100', '--absorption', '0.1', '--json');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.xi_nm).toBeGreaterThan(56 * 0.9);
    expect(j.xi_nm).toBeLessThan(56 * 1.1);
    // lambda at 100 kV from CODATA 2018 (physics.md check value 3.7014 pm)
    expect(j.lambda_pm).toBeCloseTo(3.7014, 3);
    // d(111) = a/sqrt(3) with a(Al) = 0.40495 nm (handbook, from memory)
    expect(j.d_nm).toBeCloseTo(0.40495 / Math.sqrt(3), 3);
    for (const k of ['braggAngle_mrad', 'xiAbs_nm']) expect(Number.isFinite(j[k])).toBe(true);
    expect(j.xiAbs_nm).toBeCloseTo(j.xi_nm / 0.1, 6);
  });

  it("reports xi'_g and xi'_0 of the thermal-diffuse model by default (scripts/ref_absorptive_form_factor.py, 1e-6)", () => {
    // Cu 220 at 100 kV: U'_g / U_g and U'_0 from the numerical quadrature of the same model (gemmi + scipy)
    const ref = JSON.parse(readFileSync(new URL('../reference/absorptive-form-factors.json', import.meta.url), 'utf8')) as {
      crystals: { material: string; kV: number; U0abs_per_nm2: number; reflections: { hkl: number[]; ratioRe: number }[] }[];
    };
    const cu = ref.crystals.find((c) => c.material === 'Cu' && c.kV === 100)!;
    const row = cu.reflections.find((x) => x.hkl.join() === '2,2,0')!;
    const r = run('reflection', 'Cu', '2,2,0', '--kv', '100', '--json');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.absorption).toBe('thermal-diffuse');
    expect(j.absorptionModel).toMatch(/thermal diffuse/);
    expect(Math.abs(j.xi_nm / j.xiAbs_nm / row.ratioRe - 1)).toBeLessThan(1e-6);
    expect(Math.abs(1 / (j.lambda_pm * 1e-3 * j.xiAbs0_nm) / cu.U0abs_per_nm2 - 1)).toBeLessThan(1e-6);
    expect(j.Uabs0_per_nm2).toBeCloseTo(cu.U0abs_per_nm2, 9);
    const bad = run('reflection', 'Cu', '2,2,0', '--absorption', 'tds');
    expect(bad.code).toBe(2);
    expect(bad.err).toMatch(/--absorption.*thermal-diffuse/);
  });

  it('prints a readable table without --json', () => {
    const r = run('reflection', 'Cu', '2 0 0');
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/xi_g/);
  });

  it('without absorption the absorption lengths are "none", never null (issue 10: JSON holds no null for a number)', () => {
    const r = run('reflection', 'Cu', '2,0,0', '--absorption', '0', '--json');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.xiAbs_nm).toBe('none');
    expect(j.xiAbs0_nm).toBe('none');
    expect(r.out).not.toMatch(/null/);
  });

  it('takes four indices for a hexagonal material', () => {
    const r = run('reflection', 'Mg', '1,0,-1,1', '--json');
    expect(r.code).toBe(0);
    expect(JSON.parse(r.out).hkl).toEqual([1, 0, 1]);
  });

  it.each([
    [['reflection', 'Unobtainium', '1,1,1'], /materials/],
    [['reflection', 'Al', '1,1'], /indices|index/i],
    [['reflection', 'Al', 'one,1,1'], /indices|index/i],
    [['reflection', 'Al', '1,0,0'], /forbidden/i],
    [['reflection', 'Si', '2,0,0'], /forbidden/i],
    [['reflection', 'Al', '1,1,1', '--kv', '5'], /kV|--kv/],
    [['reflection', 'Al', '1,1,1', '--kv', 'abc'], /--kv/],
    [['reflection', 'Al', '1,1,1', '--kv', '5000'], /--kv/],
    [['reflection', 'Al', '1,1,1', '--kv', '0x10'], /--kv/],
    [['reflection', 'Cu', '500,0,0'], /exceed 100 in magnitude/],
    [['bloch', 'Cu', '2,0,0', '--s', '1e308'], /--s/],
    [['reflection', 'Al', '{111}'], /^thinfoil: reflection indices: "\{111\}" is a family .*one plane .*"\(111\)"/],
  ])('bad input %j: exit code 2, one clear sentence', (args, pattern) => {
    const r = run(...(args as string[]));
    expect(r.code).toBe(2);
    expect(r.err).toMatch(pattern);
    expect(r.err).not.toMatch(/\n\s+at /); // no stack trace
    expect(r.err.trim().split('\n').length).toBe(1);
  });
});

describe('hexagonal scenarios take four-index vectors', () => {
  it('Mg: b = 1/3[1 1 -2 0], line [1 -1 0 0], g = (1 -1 0 0)... renders and tabulates', () => {
    const dir = mkdtempSync(join(tmpdir(), 'thinfoil-hex-'));
    const f = join(dir, 's.json');
    writeFileSync(f, JSON.stringify({
      name: 'hex', material: 'Mg', kV: 200, foil: { thickness_nm: 60, normal: [0, 0, 0, 1] }, beam: [0, 0, 0, 1],
      image: { width_px: 16, height_px: 16, pixel_nm: 1 },
      conditions: [{ id: 'g1m100', g: [1, -1, 0, 0], w: 0.5 }, { id: 'g11m20', g: [1, 1, -2, 0], w: 0.5 }],
      defects: [{ type: 'dislocation', b: '1/3[1 1 -2 0]', line: [1, -1, 0, 0], point_nm: [0, 0, 30] }],
    }));
    const r = run('visibility', f, '--json');
    expect(r.code, r.err).toBe(0);
    const rows = JSON.parse(r.out).rows;
    // (1 -1 0 0) . 1/3[1 1 -2 0]: in 3-index (1 -1 0) . [1 1 0] = 0 (Miller-Bravais conversion, Williams & Carter ch. 18)
    expect(rows[0].entries[0].gb).toBeCloseTo(0, 12);
    // (1 1 -2 0) -> (1 1 0) . [1 1 0] = 2
    expect(rows[0].entries[1].gb).toBeCloseTo(2, 12);
    expect(run('render', f, '--out', join(dir, 'o')).code).toBe(0);
  });
});

describe('thinfoil materials', () => {
  it('lists at least 20 materials', () => {
    const r = run('materials', '--json');
    expect(r.code).toBe(0);
    expect(JSON.parse(r.out).materials.length).toBeGreaterThanOrEqual(20);
  });
});

const GOOD = {
  name: 'cli test',
  material: 'Cu',
  kV: 200,
  foil: { thickness_nm: 60, normal: [0, 0, 1] },
  beam: [0, 0, 1],
  imageX: [1, 0, 0],
  image: { width_px: 24, height_px: 20, pixel_nm: 1 },
  conditions: [{ id: 'g200', g: [2, 0, 0], w: 0.5 }],
  defects: [{ type: 'dislocation', b: '1/2[1 1 0]', line: [1, 1, 2], point_nm: [0, 0, 30] }],
  candidates: ['1/2<110>'],
};

function scenarioFile(obj: unknown): { dir: string; file: string } {
  const dir = mkdtempSync(join(tmpdir(), 'thinfoil-cli-'));
  const file = join(dir, 'scenario.json');
  writeFileSync(file, JSON.stringify(obj));
  return { dir, file };
}

describe('thinfoil render', () => {
  it('writes PNG and float TIFF files whose values match the JSON statistics (read back with npm utif)', () => {
    const { dir, file } = scenarioFile(GOOD);
    const before = readFileSync(file, 'utf8');
    const out = join(dir, 'out');
    const r = run('render', file, '--out', out, '--json');
    expect(r.code, r.err).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.images.length).toBe(2);
    for (const e of j.images) {
      expect(existsSync(e.png)).toBe(true);
      expect(existsSync(e.tiff)).toBe(true);
      const buf = readFileSync(e.tiff);
      const ifds = UTIF.decode(buf.buffer.slice(buf.byteOffset, buf.byteOffset + buf.byteLength));
      UTIF.decodeImage(buf.buffer.slice(buf.byteOffset, buf.byteOffset + buf.byteLength), ifds[0]);
      const ifd = ifds[0] as unknown as { width: number; height: number; data: Uint8Array };
      expect(ifd.width).toBe(24);
      expect(ifd.height).toBe(20);
      const f = new Float32Array(ifd.data.buffer, ifd.data.byteOffset, 24 * 20);
      let min = Infinity, max = -Infinity, sum = 0;
      for (const v of f) { min = Math.min(min, v); max = Math.max(max, v); sum += v; }
      expect(min).toBeCloseTo(e.min, 6);
      expect(max).toBeCloseTo(e.max, 6);
      expect(sum / f.length).toBeCloseTo(e.mean, 6);
      expect(e.background).toBeGreaterThan(0);
      expect(e.background).toBeLessThan(1);
      expect(['bf', 'df']).toContain(e.field);
    }
    expect(readFileSync(file, 'utf8')).toBe(before); // the input is never modified
    expect(existsSync(join(out, 'render.json'))).toBe(true);
    // pixels reaching the dislocation core are marked (src/imaging/cores.ts): a mask PNG and a count in render.json
    const summary = JSON.parse(readFileSync(join(out, 'render.json'), 'utf8'));
    const core = summary.conditions[0].corePixels;
    expect(core.count).toBeGreaterThan(0);
    expect(core.count).toBeLessThan(24 * 20 / 4);
    expect(existsSync(core.mask)).toBe(true);
    // --each-column integrates every column on its own: the same images within the integrator tolerance (1e-4)
    const each = run('render', file, '--out', join(dir, 'each'), '--json', '--each-column');
    expect(each.code, each.err).toBe(0);
    const je = JSON.parse(each.out);
    je.images.forEach((e: { mean: number; min: number; max: number }, k: number) => {
      expect(Math.abs(e.mean - j.images[k].mean)).toBeLessThan(1e-4);
      expect(Math.abs(e.max - j.images[k].max)).toBeLessThan(1e-4);
    });
  });

  const bad: [string, (s: any) => void, RegExp][] = [
    ['missing foil', (s) => delete s.foil, /foil/],
    ['missing thickness', (s) => delete s.foil.thickness_nm, /foil\.thickness_nm/],
    ['zero b', (s) => (s.defects[0].b = [0, 0, 0]), /defects\[0\]\.b/],
    ['g not perpendicular to the beam', (s) => (s.conditions[0].g = [0, 0, 2]), /conditions\[0\]\.g/],
    ['thickness <= 0', (s) => (s.foil.thickness_nm = 0), /foil\.thickness_nm/],
    ['negative thickness', (s) => (s.foil.thickness_nm = -5), /foil\.thickness_nm/],
    ['image above the memory guard', (s) => (s.image = { width_px: 4000, height_px: 4000, pixel_nm: 1 }), /image/],
    ['both s and w', (s) => (s.conditions[0].s_per_nm = 0.1), /conditions\[0\]/],
    ['unknown defect type', (s) => (s.defects[0].type = 'wormhole'), /defects\[0\]\.type/],
    ['misspelt field', (s) => ((s.foil.thicknes_nm = 3), delete s.foil.thickness_nm), /foil\.thicknes_nm|foil\.thickness_nm/],
    ['forbidden reflection', (s) => (s.conditions[0].g = [1, 0, 0]), /forbidden/],
    ['unknown material', (s) => (s.material = 'Kryptonite'), /materials/],
    ['condition beam against the electron path', (s) => (s.conditions[0].beam = [0, 0, -1]), /conditions\[0\]\.beam/],
    ['condition beam tilted 90 degrees', (s) => ((s.conditions[0].beam = [0, 1, 0]), (s.conditions[0].g = [2, 0, 0])), /conditions\[0\]\.beam/],
    ['non-integer g', (s) => (s.conditions[0].g = [1.5, 0, 0]), /conditions\[0\]\.g/],
    ['g beyond the scattering tables', (s) => (s.conditions[0].g = [200, 0, 0]), /conditions\[0\]\.g/],
    ['absurd point', (s) => (s.defects[0].point_nm = [1e300, 0, 30]), /defects\[0\]\.point_nm/],
    ['intrinsic fault in a bcc metal', (s) => ((s.material = 'alpha-Fe'), (s.conditions[0].g = [2, 0, 0]), (s.defects = [{ type: 'fault', plane: [1, 1, 1], nature: 'intrinsic', point_nm: [0, 0, 30] }])), /defects\[0\]\.nature/],
  ];
  it.each(bad)('bad scenario (%s): exit code 2 naming the field', (_name, mutate, pattern) => {
    const s = structuredClone(GOOD) as any;
    mutate(s);
    const { file } = scenarioFile(s);
    const r = run('render', file, '--json');
    expect(r.code).toBe(2);
    expect(r.err).toMatch(pattern);
    expect(r.err).not.toMatch(/\n\s+at /);
  });

  it('a family as a Burgers vector and a key in the wrong case: exit code 2, the field named with the fix', () => {
    const fam = scenarioFile({ ...GOOD, defects: [{ ...GOOD.defects[0], b: '1/2<110>' }] });
    const r1 = run('render', fam.file, '--out', join(fam.dir, 'o'));
    expect(r1.code).toBe(2);
    expect(r1.err).toMatch(/^thinfoil: defects\[0\]\.b: "1\/2<110>" is a family .*write one member, e\.g\. "1\/2\[110\]"/);
    expect(r1.err.trim().split('\n')).toHaveLength(1);
    const typo = scenarioFile({ ...GOOD, conditions: [{ id: 'wb', g: [2, 0, 0], weakbeam: 3 }] });
    const r2 = run('render', typo.file, '--out', join(typo.dir, 'o'));
    expect(r2.code).toBe(2);
    expect(r2.err).toBe('thinfoil: conditions[0].weakbeam: is not a known field; did you mean "weakBeam"?\n');
  });

  it('a file that is not JSON, and a missing file: exit code 2', () => {
    const dir = mkdtempSync(join(tmpdir(), 'thinfoil-cli-'));
    const f = join(dir, 'x.json');
    writeFileSync(f, '{ not json');
    expect(run('render', f).code).toBe(2);
    expect(run('render', join(dir, 'nothing.json')).code).toBe(2);
  });
});

describe('thinfoil visibility', () => {
  it('tabulates the defect and the expanded family with verdicts', () => {
    const { file } = scenarioFile(GOOD);
    const r = run('visibility', file, '--json');
    expect(r.code, r.err).toBe(0);
    const j = JSON.parse(r.out);
    // the defect + 6 members of 1/2<110> with signs collapsed
    expect(j.rows.length).toBe(7);
    const d = j.rows[0];
    expect(d.entries[0].gb).toBeCloseTo(1, 12); // (200).1/2[110] = 1
    expect(d.entries[0].verdict).toBe('visible');
    const inv = j.rows.filter((row: any) => row.kind === 'candidate' && Math.abs(row.entries[0].gb) < 1e-9);
    expect(inv.length).toBe(2); // 1/2[011] and 1/2[01-1] have g.b = 0 for g = 200
    const text = run('visibility', file);
    expect(text.code).toBe(0);
    expect(text.out).toMatch(/g200/);
  });
  it('--help of render states each default once and never "(default: [])"', () => {
    const h = run('render', '--help');
    expect(h.code).toBe(0);
    expect(h.out).not.toMatch(/default: \[\]/);
    expect(h.out.replace(/\s+/g, ' ')).not.toMatch(/\(default[^()]*\) \(default/);
    expect(h.out.replace(/\s+/g, ' ')).toMatch(/"each" \(default: "shared"\)/);
    expect(h.out.replace(/\s+/g, ' ')).toMatch(/simulated images \(default: 0\)/);
  });
});

describe('render warns about a loop smaller than two pixels, with its size and the pixel size', () => {
  it('a 1.2 nm loop at 1 nm pixels', () => {
    const dir = mkdtempSync(join(tmpdir(), 'thinfoil-tinyloop-'));
    const file = join(dir, 'tiny.json');
    writeFileSync(file, JSON.stringify({
      name: 'tiny loop (invented)', material: 'Cu', kV: 200,
      foil: { thickness_nm: 40, normal: [0, 0, 1] }, beam: [0, 0, 1], imageX: [1, 0, 0],
      image: { width_px: 16, height_px: 16, pixel_nm: 1 },
      conditions: [{ id: 'g220', g: [2, 2, 0], w: 1 }],
      defects: [{ type: 'loop', label: 'L', b: '1/3[1 1 1]', normal: [1, 1, 1], centre_nm: [0, 0, 20], radius_nm: 0.6 }],
    }));
    const r = run('render', file, '--out', join(dir, 'out'));
    expect(r.code, r.err).toBe(0);
    expect(r.err).toMatch(/defects\[0\] \(L\): the loop \([0-9.]+ nm across in the image\) is smaller than two pixels of 1 nm; its image is only its strain field/);
  });
});
