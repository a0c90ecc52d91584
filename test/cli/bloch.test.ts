/**
 * `thinfoil bloch` in process: the Bloch-wave table, thickness profiles and
 * rocking curves of src/analysis/bloch*.ts against two-beam dynamical theory
 * (Hirsch, Howie, Nicholson, Pashley & Whelan 1965, Electron Microscopy of
 * Thin Crystals; physics.md sections 3 and 4), and the files the command
 * writes. Crystal data: the library's Cu (fcc); the numbers compared are
 * computed here from the formulas, not typed in.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it, vi } from 'vitest';
import pngjs from 'pngjs';
import { getMaterial } from '../../src/crystal/materials.js';
import { InputError } from '../../src/errors.js';
import { blochRow } from '../../src/imaging/blochRow.js';
import { blochTable, planePositions } from '../../src/analysis/blochTables.js';
import { linspace, rockingCurves, thicknessCurves, waveProfiles } from '../../src/analysis/blochCurves.js';
import { blochCommand, computeBloch, writeBlochFiles } from '../../src/cli/blochCommand.js';
import { perfectCrystal } from '../../src/dynamics/twoBeam.js';

const CU = getMaterial('Cu');
const HKL: [number, number, number] = [1, 1, 1];
const TMP = fs.mkdtempSync(path.join(os.tmpdir(), 'thinfoil-bloch-'));
afterAll(() => fs.rmSync(TMP, { recursive: true, force: true }));

/** Local minima of y (refined by a parabola through the three samples about each). */
function minima(x: Float64Array, y: Float64Array): number[] {
  const out: number[] = [];
  for (let i = 1; i + 1 < y.length; i++) {
    if (y[i] < y[i - 1] && y[i] <= y[i + 1]) {
      const den = y[i - 1] - 2 * y[i] + y[i + 1];
      const off = den > 0 ? (0.5 * (y[i - 1] - y[i + 1])) / den : 0;
      out.push(x[i] + off * (x[1] - x[0]));
    }
  }
  return out;
}

describe('two-beam Bloch waves (Hirsch et al. 1965; physics.md section 3)', () => {
  for (const absorption of [0.1, 0]) {
    it(`at s = 0 (absorption ratio ${absorption}): two waves, excitations |alpha|^2 = 1/2 each`, () => {
      const row = blochRow(CU, HKL, 200, absorption, 2);
      const t = blochTable(row, 0);
      expect(t.waves).toHaveLength(2);
      // two-beam theory at s = 0: C = (1, +-1)/sqrt(2), alpha = 1/sqrt(2) for both waves
      for (const w of t.waves) expect(w.excitationAbs ** 2).toBeCloseTo(0.5, 12);
      // the waves differ in Re gamma by 1/xi_g (Pendelloesung: sigma = 1/xi_g at s = 0)
      expect(t.waves[0].gammaRe_per_nm - t.waves[1].gammaRe_per_nm).toBeCloseTo(1 / row.reflection.xi_nm, 12);
    });
  }

  for (const w of [0, 1, -1]) {
    it(`the wave with the larger Re gamma peaks on the planes and is absorbed more (w = ${w}; anomalous absorption)`, () => {
      const row = blochRow(CU, HKL, 200, 0.1, 2);
      const t = blochTable(row, w / row.reflection.xi_nm);
      const [a, b] = t.waves;
      expect(a.gammaRe_per_nm).toBeGreaterThan(b.gammaRe_per_nm);
      expect(a.site).toBe('on planes');
      expect(b.site).toBe('between planes');
      expect(a.absorptionLength_nm).toBeLessThan(b.absorptionLength_nm);
    });
  }

  it('excitations off the Bragg condition: |alpha1|^2 = (1 - w / sqrt(1 + w^2)) / 2 without absorption', () => {
    // two-beam theory: wave 1 = (sin(beta/2), cos(beta/2)), cot(beta) = w, alpha1 = sin(beta/2)
    const row = blochRow(CU, HKL, 200, 0, 2);
    for (const w of [-2, -0.5, 0.7, 3]) {
      const t = blochTable(row, w / row.reflection.xi_nm);
      expect(t.waves[0].excitationAbs ** 2).toBeCloseTo((1 - w / Math.sqrt(1 + w * w)) / 2, 10);
      expect(t.waves[1].excitationAbs ** 2).toBeCloseTo((1 + w / Math.sqrt(1 + w * w)) / 2, 10);
    }
  });

  it('puts the atomic planes of fcc Cu (atom at the origin) at x/d = 0', () => {
    const p = planePositions(blochRow(CU, HKL, 200, 0.1, 2));
    expect(p).toHaveLength(1);
    expect(Math.min(p[0], 1 - p[0])).toBeLessThan(1e-9);
  });

  it('wave intensities across the period: 1 +- cos(2 pi x/d) at s = 0 (unit-norm waves, mean 1)', () => {
    const row = blochRow(CU, HKL, 200, 0.1, 2);
    const prof = waveProfiles(row, 0, 100);
    prof.x_over_d.forEach((x, k) => {
      expect(prof.intensity[0][k]).toBeCloseTo(1 + Math.cos(2 * Math.PI * x), 10);
      expect(prof.intensity[1][k]).toBeCloseTo(1 - Math.cos(2 * Math.PI * x), 10);
    });
  });
});

describe('thickness profiles', () => {
  it('without absorption the bright field oscillates with period xi_g at s = 0 (Pendelloesung)', () => {
    const row = blochRow(CU, HKL, 200, 0, 2);
    const xi = row.reflection.xi_nm;
    const t = linspace(0, 5 * xi, 4777); // a grid that does not fall on the minima: the parabola refines them
    const bf = thicknessCurves(row, 0, t)[row.incident];
    const m = minima(t, bf);
    // BF = cos^2(pi t / xi_g): minima at t = (k + 1/2) xi_g
    expect(m).toHaveLength(5);
    m.forEach((tm, k) => expect(Math.abs(tm / ((k + 0.5) * xi) - 1)).toBeLessThan(1e-3));
    for (let k = 1; k < m.length; k++) expect(Math.abs((m[k] - m[k - 1]) / xi - 1)).toBeLessThan(1e-3);
  });

  it('off the Bragg condition the period is xi_eff = xi_g / sqrt(1 + w^2) (Hirsch et al. 1965)', () => {
    const row = blochRow(CU, HKL, 200, 0, 2);
    const xi = row.reflection.xi_nm;
    const w = 1.3;
    const xiEff = xi / Math.sqrt(1 + w * w);
    const t = linspace(0, 5 * xiEff, 5001);
    const m = minima(t, thicknessCurves(row, w / xi, t)[row.incident]);
    for (let k = 1; k < m.length; k++) expect(Math.abs((m[k] - m[k - 1]) / xiEff - 1)).toBeLessThan(1e-3);
  });

  it('two beams with absorption agree with the two-beam slab matrix of physics.md section 3 (the two engines, 1e-10)', () => {
    const row = blochRow(CU, HKL, 200, 0.1, 2);
    const p = { xi_nm: row.reflection.xi_nm, xiAbs_nm: row.reflection.xiAbs_nm, xiAbs0_nm: row.reflection.xiAbs0_nm, s_per_nm: 0.004 };
    const t = linspace(0, 300, 31);
    const c = thicknessCurves(row, p.s_per_nm, t);
    const out = new Float64Array(4);
    t.forEach((tv, k) => {
      perfectCrystal(out, p, tv);
      expect(c[row.incident][k]).toBeCloseTo(out[0] ** 2 + out[1] ** 2, 10);
      expect(c[row.darkField][k]).toBeCloseTo(out[2] ** 2 + out[3] ** 2, 10);
    });
  });

  it('a systematic row of 5 beams without absorption keeps sum |phi_g|^2 = 1 (physics.md section 4)', () => {
    const row = blochRow(CU, HKL, 200, 0, 5);
    const t = linspace(0, 200, 41);
    for (const s of [0, 0.01, -0.02]) {
      const c = thicknessCurves(row, s, t);
      t.forEach((_, k) => expect(c.reduce((a, b) => a + b[k], 0)).toBeCloseTo(1, 10));
    }
  });
});

describe('rocking curve', () => {
  it('without absorption equals sin^2(pi t s_eff) / (xi_g s_eff)^2 to 1e-8 (Hirsch et al. 1965)', () => {
    const row = blochRow(CU, HKL, 200, 0, 2);
    const xi = row.reflection.xi_nm;
    const thickness = 2.3 * xi;
    const s = linspace(-5 / xi, 5 / xi, 401);
    const rc = rockingCurves(row, s, thickness);
    let worst = 0;
    s.forEach((sv, k) => {
      const sEff = Math.sqrt(sv * sv + 1 / (xi * xi));
      const df = Math.sin(Math.PI * thickness * sEff) ** 2 / (xi * sEff) ** 2;
      worst = Math.max(worst, Math.abs(rc[row.darkField][k] - df), Math.abs(rc[row.incident][k] - (1 - df)));
    });
    expect(worst).toBeLessThan(1e-8);
  });
});

describe('bad input (InputError, exit code 2 in the CLI)', () => {
  it.each([
    ['unknown material', 'Unobtainium', '1,1,1', {}],
    ['forbidden reflection (fcc 100)', 'Cu', '1,0,0', {}],
    ['g = 000', 'Cu', '0,0,0', {}],
    ['even beam count', 'Cu', '1,1,1', { beams: '4' }],
    ['beam count not a number', 'Cu', '1,1,1', { beams: 'many' }],
    ['negative thickness', 'Cu', '1,1,1', { thickness: '-5' }],
    ['both --s and --w', 'Cu', '1,1,1', { s: '0.01', w: '1' }],
    ['bad s', 'Cu', '1,1,1', { s: 'zero' }],
    ['absorption out of range', 'Cu', '1,1,1', { absorption: '2' }],
  ])('%s', (_what, m, hkl, opts) => {
    expect(() => computeBloch(m, hkl, opts)).toThrow(InputError);
  });
});

/** RFC 4180 lines of our own CSV (no quoted commas in these files): header and rows of cells. */
function readCsv(file: string): { header: string[]; rows: string[][] } {
  const text = fs.readFileSync(file, 'utf8');
  expect(text.endsWith('\r\n')).toBe(true);
  const lines = text.slice(0, -2).split('\r\n');
  return { header: lines[0].split(','), rows: lines.slice(1).map((l) => l.split(',')) };
}

describe('files', () => {
  it('writes the CSV tables and PNG/SVG plots; CSV parses, PNG decodes, SVG has no <text>', () => {
    const run = computeBloch('Cu', '2,0,0', { beams: 5, w: '0.5', thickness: '150', kv: 300 });
    const dir = path.join(TMP, 'run1');
    const files = writeBlochFiles(run, dir);
    const names = [
      'bloch-waves.csv',
      'thickness.csv',
      'thickness.png',
      'thickness.svg',
      'rocking.csv',
      'rocking.png',
      'rocking.svg',
      'profiles.csv',
      'profiles.png',
      'profiles.svg',
    ];
    expect(files.map((f) => path.basename(f)).sort()).toEqual([...names].sort());
    for (const n of names) expect(fs.statSync(path.join(dir, n)).size).toBeGreaterThan(100);

    const waves = readCsv(path.join(dir, 'bloch-waves.csv'));
    expect(waves.rows).toHaveLength(5);
    expect(waves.header.slice(0, 9)).toEqual([
      'j',
      'gamma_re_per_nm',
      'gamma_im_per_nm',
      'absorption_length_nm',
      'excitation_abs',
      'excitation_re',
      'excitation_im',
      'plane_intensity_ratio',
      'peaks',
    ]);
    expect(waves.header).toHaveLength(9 + 2 * 5);
    for (const r of waves.rows) {
      expect(r).toHaveLength(waves.header.length);
      expect(['on planes', 'between planes']).toContain(r[8]);
      expect(Number.isFinite(Number(r[1]))).toBe(true);
    }

    const thick = readCsv(path.join(dir, 'thickness.csv'));
    expect(thick.header.slice(0, 3)).toEqual(['thickness_nm', 'bright_field', 'dark_field']);
    expect(thick.header).toHaveLength(1 + 5);
    expect(Number(thick.rows[0][0])).toBe(0);
    expect(Number(thick.rows[0][1])).toBeCloseTo(1, 12); // t = 0: all intensity in the transmitted beam
    expect(Number(thick.rows[thick.rows.length - 1][0])).toBe(150);
    for (const r of thick.rows) for (const c of r) expect(Number.isFinite(Number(c))).toBe(true);

    const rock = readCsv(path.join(dir, 'rocking.csv'));
    expect(rock.header.slice(0, 4)).toEqual(['s_per_nm', 'w', 'bright_field', 'dark_field']);
    const xi = run.row.reflection.xi_nm;
    for (const r of rock.rows.slice(0, 20)) expect(Number(r[1])).toBeCloseTo(Number(r[0]) * xi, 9);

    const prof = readCsv(path.join(dir, 'profiles.csv'));
    expect(prof.header).toEqual(['x_over_d', 'wave_1', 'wave_2', 'wave_3', 'wave_4', 'wave_5', 'potential_relative']);
    expect(Number(prof.rows[0][0])).toBe(0);
    expect(Number(prof.rows[prof.rows.length - 1][0])).toBe(1);
    // unit-norm waves have mean intensity 1 over the period (trapezoid rule on the periodic samples)
    const mean = prof.rows.slice(0, -1).reduce((a, r) => a + Number(r[1]), 0) / (prof.rows.length - 1);
    expect(mean).toBeCloseTo(1, 10);

    for (const n of ['thickness', 'rocking', 'profiles']) {
      const png = pngjs.PNG.sync.read(fs.readFileSync(path.join(dir, `${n}.png`)));
      expect([png.width, png.height]).toEqual([820, 520]);
      const svg = fs.readFileSync(path.join(dir, `${n}.svg`), 'utf8');
      expect(svg.startsWith('<?xml')).toBe(true);
      expect(svg).not.toMatch(/<text[\s>]/);
      expect(svg).toMatch(/aria-label="intensity|aria-label="Bloch-wave intensity/);
    }
  });

  it('blochCommand --json prints one JSON object with the table and the file names', () => {
    const dir = path.join(TMP, 'run2');
    let out = '';
    const spy = vi.spyOn(process.stdout, 'write').mockImplementation((s: string | Uint8Array) => {
      out += String(s);
      return true;
    });
    try {
      blochCommand('Cu', '1 1 1', { json: true, out: dir, s: '0' });
    } finally {
      spy.mockRestore();
    }
    const j = JSON.parse(out);
    expect(j.material).toBe('Cu');
    expect(j.hkl).toEqual([1, 1, 1]);
    expect(j.beams).toBe(2);
    expect(j.waves).toHaveLength(2);
    expect(j.files).toHaveLength(10);
    for (const f of j.files) expect(fs.existsSync(f)).toBe(true);
    expect(j.thickness_nm).toBeCloseTo(3 * j.xi_nm, 9); // default profile range: 3 xi_g
  });
});
