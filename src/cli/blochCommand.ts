/**
 * `thinfoil bloch <material> <h,k,l>`: the Bloch waves of a perfect crystal
 * for two beams or a systematic row, with a thickness profile of the beam
 * intensities, a rocking curve and the intensity of every Bloch wave across
 * one period of the planes, as CSV tables and PNG/SVG plots.
 */
import path from 'node:path';
import { getMaterial } from '../crystal/materials.js';
import { readPlane } from '../scenario/parse.js';
import { InputError } from '../errors.js';
import { beamName, blochRow, type BlochRow } from '../imaging/blochRow.js';
import { blochTable, projectedPotential, type BlochTable } from '../analysis/blochTables.js';
import { linspace, rockingCurves, thicknessCurves, waveProfiles } from '../analysis/blochCurves.js';
import { toCsv, type CsvCell } from '../output/csv.js';
import { OutputSet } from '../output/outputSet.js';
import { plotFigure } from '../output/graphics/figure.js';
import { PALETTE, type PlotSeries, type PlotSpec } from '../output/graphics/plot.js';
import { parseAbsorption, parseKv } from './options.js';
import { type AbsorptionSetting, DEFAULT_ABSORPTION, describeAbsorption } from '../scattering/absorption.js';
import { printJson, sig, table } from './run.js';

export interface BlochOptions {
  kv?: number | string;
  absorption?: number | string;
  s?: number | string;
  w?: number | string;
  beams?: number | string;
  thickness?: number | string;
  json?: boolean;
  out?: string;
}

/** Everything the command computes, before any file is written. */
export interface BlochRun {
  readonly row: BlochRow;
  readonly s_per_nm: number;
  readonly w: number;
  /** whether the user gave w (the rocking curve is then plotted against w) */
  readonly byW: boolean;
  readonly thickness_nm: number;
  readonly table: BlochTable;
  /** files by name: CSV text, PNG bytes or SVG text */
  readonly files: ReadonlyMap<string, string | Uint8Array>;
}

const PROFILE_SAMPLES = 360;
/** x/d range of the profile plot. */
const PROFILE_VIEW: [number, number] = [-0.25, 1.25];

/** Samples of one period (x from 0 to 1, last = first) repeated over the range view. */
function periodicExtension(x: Float64Array, ys: Float64Array[], view: [number, number]): { x: Float64Array; y: Float64Array[] } {
  const n = x.length - 1; // samples per period
  const k0 = Math.floor(view[0] * n);
  const k1 = Math.ceil(view[1] * n);
  const xs = new Float64Array(k1 - k0 + 1);
  for (let k = k0; k <= k1; k++) xs[k - k0] = k / n;
  return { x: xs, y: ys.map((a) => Float64Array.from(xs, (_, i) => a[(((k0 + i) % n) + n) % n])) };
}
const MAX_THICKNESS_NM = 1e5;
/** Budget of rocking-curve samples times N^3 (N beams): keeps a 41-beam run to a few seconds. */
const ROCKING_BUDGET = 4e6;

function numberFrom(v: number | string, name: string, what: string): number {
  const x = typeof v === 'number' ? v : Number(v);
  if ((typeof v === 'string' && v.trim() === '') || !Number.isFinite(x)) {
    throw new InputError(`${name}: "${v}" is not a number; give ${what}.`);
  }
  return x;
}

/** Check and convert the options (InputError on bad input). */
export function readBlochOptions(opts: BlochOptions): {
  kV: number;
  absorption: AbsorptionSetting;
  beams: number;
  s?: number;
  w?: number;
  thickness_nm?: number;
} {
  const kV = opts.kv === undefined ? 200 : parseKv(String(opts.kv));
  const absorption = opts.absorption === undefined ? DEFAULT_ABSORPTION : parseAbsorption(String(opts.absorption));
  const beams = opts.beams === undefined ? 2 : numberFrom(opts.beams, '--beams', '2 or an odd number of beams such as 3, 5, 7');
  if (opts.s !== undefined && opts.w !== undefined) {
    throw new InputError('--s and --w both given: give the deviation either as s in nm^-1 or as w = s xi_g, not both.');
  }
  const s = opts.s === undefined ? undefined : numberFrom(opts.s, '--s', 'the deviation parameter s in nm^-1, e.g. 0.01');
  const w = opts.w === undefined ? undefined : numberFrom(opts.w, '--w', 'the dimensionless deviation w = s xi_g, e.g. 0.5');
  // the same limits as a scenario's conditions
  if (s !== undefined && Math.abs(s) > 10) throw new InputError(`--s: ${s} nm^-1 is out of range; give |s| up to 10 nm^-1.`);
  if (w !== undefined && Math.abs(w) > 1000) throw new InputError(`--w: ${w} is out of range; give |w| up to 1000.`);
  let thickness_nm: number | undefined;
  if (opts.thickness !== undefined) {
    thickness_nm = numberFrom(opts.thickness, '--thickness', 'the foil thickness in nm, e.g. 100');
    if (!(thickness_nm > 0 && thickness_nm <= MAX_THICKNESS_NM)) {
      throw new InputError(`--thickness: ${thickness_nm} nm is out of range; give a positive thickness up to ${MAX_THICKNESS_NM} nm.`);
    }
  }
  return { kV, absorption, beams, s, w, thickness_nm };
}

function hklText(hkl: readonly number[]): string {
  return hkl.join(' ');
}

/** Folder-name form of the indices: "111", "2-20", "10_0_1" when an index has two digits. */
export function hklTag(hkl: readonly number[]): string {
  return hkl.every((v) => Math.abs(v) < 10) ? hkl.join('') : hkl.join('_');
}

function clampInt(v: number, lo: number, hi: number): number {
  return Math.max(lo, Math.min(hi, Math.ceil(v)));
}

const SUP_MINUS_ONE = '\u207b\u00b9';

function beamLabel(n: number): string {
  if (n === 0) return 'bright field (0)';
  if (n === 1) return 'dark field (g)';
  return `beam ${beamName(n).replace('-', '\u2212')}`;
}

/** Column name of beam n's intensity. */
function beamColumn(n: number): string {
  if (n === 0) return 'bright_field';
  if (n === 1) return 'dark_field';
  return `I_${beamName(n)}`;
}

/** Beam indices in display order: 0, g, then the others by order. */
function beamOrder(row: BlochRow): number[] {
  const rest = Array.from(row.orders.keys()).filter((i) => i !== row.incident && i !== row.darkField);
  return [row.incident, row.darkField, ...rest];
}

function seriesOf(row: BlochRow, x: Float64Array, curves: Float64Array[], all: boolean): PlotSeries[] {
  const idx = all ? beamOrder(row) : [row.incident, row.darkField];
  return idx.map((i, k) => ({
    x,
    y: curves[i],
    label: beamLabel(row.orders[i]),
    color: PALETTE[k % PALETTE.length],
    dashed: k >= 2,
    lineWidth: k >= 2 ? 1.25 : 1.75,
  }));
}

/** Compute the tables and figures (no file system, no printing). */
export function computeBloch(materialName: string, indices: string, opts: BlochOptions): BlochRun {
  const o = readBlochOptions(opts);
  const m = getMaterial(materialName);
  const hkl = readPlane(indices, 'reflection indices', m);
  const row = blochRow(m, hkl, o.kV, o.absorption, o.beams);
  const xi = row.reflection.xi_nm;
  const s = o.s ?? (o.w !== undefined ? o.w / xi : 0);
  const w = s * xi;
  const byW = o.w !== undefined;
  const T = o.thickness_nm ?? 3 * xi;
  const tbl = blochTable(row, s);
  const head = `${m.name} (${hklText(hkl)}), ${o.kV} kV, ${row.beams === 2 ? 'two beams' : `${row.beams} beams`}`;
  const files = new Map<string, string | Uint8Array>();

  // the Bloch-wave table
  const orderNames = Array.from(row.orders, (n) => beamName(n));
  const waveHeader = [
    'j',
    'gamma_re_per_nm',
    'gamma_im_per_nm',
    'absorption_length_nm',
    'excitation_abs',
    'excitation_re',
    'excitation_im',
    'plane_intensity_ratio',
    'peaks',
    ...orderNames.flatMap((n) => [`C_${n}_re`, `C_${n}_im`]),
  ];
  const waveRows: CsvCell[][] = tbl.waves.map((r) => [
    r.j,
    r.gammaRe_per_nm,
    r.gammaIm_per_nm,
    Number.isFinite(r.absorptionLength_nm) ? r.absorptionLength_nm : '',
    r.excitationAbs,
    r.excitationRe,
    r.excitationIm,
    r.planeIntensityRatio,
    r.site,
    ...r.amplitudes.flatMap((a) => [a.re, a.im]),
  ]);
  files.set('bloch-waves.csv', toCsv(waveHeader, waveRows));

  // thickness profile
  const xiEff = xi / Math.sqrt(1 + w * w);
  const t = linspace(0, T, clampInt((200 * T) / xiEff + 1, 401, 8001));
  const tc = thicknessCurves(row, s, t);
  const order = beamOrder(row);
  files.set(
    'thickness.csv',
    toCsv(
      ['thickness_nm', ...order.map((i) => beamColumn(row.orders[i]))],
      Array.from(t, (tv, k) => [tv, ...order.map((i) => tc[i][k])]),
    ),
  );
  const sText = `s = ${sig(s, 4)} nm${SUP_MINUS_ONE} (w = ${sig(w, 4)})`;
  const thicknessSpec: PlotSpec = {
    title: `${head}, ${sText}`,
    xLabel: 'thickness t (nm)',
    yLabel: 'intensity',
    series: seriesOf(row, t, tc, true),
    xRange: [0, T],
  };
  const fThick = plotFigure(thicknessSpec);
  files.set('thickness.png', fThick.png);
  files.set('thickness.svg', fThick.svg);

  // rocking curve at thickness T
  const half = Math.max(5 / xi, 1.5 * Math.abs(s));
  // about 40 samples per fringe (period 1/t in s), within a budget of eigen-solutions (cost ~ N^3)
  let ns = clampInt(Math.min(2 * half * T * 40 + 1, ROCKING_BUDGET / row.beams ** 3), 801, 8001);
  if (ns % 2 === 0) ns++;
  const sv = linspace(-half, half, ns);
  const rc = rockingCurves(row, sv, T);
  const wv = Float64Array.from(sv, (x) => x * xi);
  files.set(
    'rocking.csv',
    toCsv(
      ['s_per_nm', 'w', ...order.map((i) => beamColumn(row.orders[i]))],
      Array.from(sv, (x, k) => [x, wv[k], ...order.map((i) => rc[i][k])]),
    ),
  );
  const rockingSpec: PlotSpec = {
    title: `${head}, t = ${sig(T, 4)} nm`,
    xLabel: byW ? 'w = s \u00b7 \u03be_g' : `deviation parameter s (nm${SUP_MINUS_ONE})`,
    yLabel: 'intensity',
    series: seriesOf(row, byW ? wv : sv, rc, false),
    xRange: byW ? [-half * xi, half * xi] : [-half, half],
    markers: [{ x: byW ? w : s }],
    markerLabel: byW ? `w = ${sig(w, 4)}` : `s = ${sig(s, 4)}`,
  };
  const fRock = plotFigure(rockingSpec);
  files.set('rocking.png', fRock.png);
  files.set('rocking.svg', fRock.svg);

  // Bloch-wave intensity across one period
  const prof = waveProfiles(row, s, PROFILE_SAMPLES);
  const pot = projectedPotential(row, PROFILE_SAMPLES);
  let potMax = 0;
  for (const v of pot) potMax = Math.max(potMax, Math.abs(v));
  files.set(
    'profiles.csv',
    toCsv(
      ['x_over_d', ...tbl.waves.map((r) => `wave_${r.j}`), 'potential_relative'],
      Array.from(prof.x_over_d, (x, k) => [
        x,
        ...prof.intensity.map((a) => a[k]),
        potMax > 0 ? pot[k % PROFILE_SAMPLES] / potMax : 0,
      ]),
    ),
  );
  // the plot shows 1.5 periods (the profile is periodic) so that planes at x/d = 0 and 1 stand clear of the frame
  const ext = periodicExtension(prof.x_over_d, prof.intensity, PROFILE_VIEW);
  const planeMarks: number[] = [];
  for (const p of tbl.planes) for (let k = -1; k <= 2; k++) if (p + k >= PROFILE_VIEW[0] && p + k <= PROFILE_VIEW[1]) planeMarks.push(p + k);
  const profileSpec: PlotSpec = {
    title: `Bloch waves across the planes, ${head}, ${sText}`,
    xLabel: 'position across the planes x/d',
    yLabel: 'Bloch-wave intensity (mean 1)',
    series: tbl.waves.map((r, k) => ({
      x: ext.x,
      y: ext.y[k],
      label: `wave ${r.j}: |\u03b1|\u00b2 = ${sig(r.excitationAbs ** 2, 3)}, ${r.site}`,
      color: PALETTE[k % PALETTE.length],
      dashed: k >= PALETTE.length,
    })),
    xRange: PROFILE_VIEW,
    markers: planeMarks.map((x) => ({ x })),
    markerLabel: 'atomic plane',
  };
  const fProf = plotFigure(profileSpec);
  files.set('profiles.png', fProf.png);
  files.set('profiles.svg', fProf.svg);

  return { row, s_per_nm: s, w, byW, thickness_nm: T, table: tbl, files };
}

/** The Bloch-wave table as text. */
export function formatBlochTable(run: BlochRun): string {
  const r = run.row;
  const orders = Array.from(r.orders);
  const lines = [
    `Bloch waves of ${r.material.name} (${hklText(r.hkl)}) at ${r.kV} kV, ${r.beams === 2 ? 'two beams 0, g' : `systematic row ${orders.map(beamName).join(', ')}`}`,
    `xi_g = ${sig(r.reflection.xi_nm, 4)} nm, xi'_g = ${Number.isFinite(r.reflection.xiAbs_nm) ? `${sig(r.reflection.xiAbs_nm, 4)} nm` : 'none (no absorption)'} (xi_g/xi'_g = ${sig(r.absorptionRatio, 3)}, ${typeof r.absorptionSetting === 'number' ? 'constant ratio' : "thermal diffuse scattering, U' per beam"}), ` +
      `s = ${sig(run.s_per_nm, 4)} nm^-1 (w = ${sig(run.w, 4)}), profiles to t = ${sig(run.thickness_nm, 4)} nm`,
    '',
  ];
  const header = ['j', 'Re gamma (nm^-1)', 'Im gamma (nm^-1)', 'absorption length (nm)', '|alpha|', 'peaks', ...orders.map((n) => `C(${beamName(n)})`)];
  // |Im gamma| below 1e-12 of the largest |gamma| is round-off of an exact zero
  const scale = Math.max(...run.table.waves.map((w) => Math.hypot(w.gammaRe_per_nm, w.gammaIm_per_nm)));
  const rows = run.table.waves.map((w) => [
    String(w.j),
    sig(w.gammaRe_per_nm, 5),
    sig(roundoffToZero(w.gammaIm_per_nm, scale), 4),
    Number.isFinite(w.absorptionLength_nm) ? sig(w.absorptionLength_nm, 4) : 'none',
    sig(w.excitationAbs, 4),
    w.site,
    ...w.amplitudes.map((a) => complexText(a.re, a.im)),
  ]);
  return (
    lines.join('\n') +
    table(header, rows) +
    `absorption length: depth over which the wave's intensity falls by 1/e, 1/(4 pi Im gamma).\n` +
    `atomic planes at x/d = ${run.table.planes.map((p) => sig(p, 4)).join(', ')} (maxima of the projected potential).\n`
  );
}

function roundoffToZero(v: number, scale: number): number {
  return Math.abs(v) <= 1e-12 * scale ? 0 : v;
}

function complexText(re: number, im: number): string {
  const r = Math.abs(re) < 5e-5 ? 0 : re;
  const i = Math.abs(im) < 5e-5 ? 0 : im;
  if (i === 0) return r.toFixed(4);
  return `${r.toFixed(4)}${i < 0 ? '-' : '+'}${Math.abs(i).toFixed(4)}i`;
}

/** Write the files of a run into dir as one output set (see src/output/outputSet.ts); returns their paths. */
export function writeBlochFiles(run: BlochRun, dir: string): string[] {
  const set = OutputSet.begin(dir);
  try {
    const out = [...run.files].map(([name, data]) => set.write(name, data));
    set.commit();
    return out;
  } catch (e) {
    set.abort();
    throw e;
  }
}

export function blochCommand(materialName: string, indices: string, opts: BlochOptions): void {
  const run = computeBloch(materialName, indices, opts);
  const r = run.row;
  const dir = opts.out ?? path.join('out', `bloch-${r.material.name}-${hklTag(r.hkl)}`);
  const written = writeBlochFiles(run, dir);
  if (opts.json) {
    printJson({
      material: r.material.name,
      structure: r.material.structure,
      hkl: r.hkl,
      kV: r.kV,
      absorption: r.absorptionSetting,
      absorptionModel: describeAbsorption(r.absorptionSetting),
      absorptionRatio: r.absorptionRatio,
      beams: r.beams,
      orders: Array.from(r.orders),
      s_per_nm: run.s_per_nm,
      w: run.w,
      xi_nm: r.reflection.xi_nm,
      // printJson writes a non-finite number as "none" (output/json.ts)
      xiAbs_nm: r.reflection.xiAbs_nm,
      xiAbs0_nm: r.reflection.xiAbs0_nm,
      thickness_nm: run.thickness_nm,
      planes_x_over_d: run.table.planes,
      waves: run.table.waves,
      out: dir,
      files: written,
    });
    return;
  }
  process.stdout.write(formatBlochTable(run));
  process.stdout.write(`wrote ${written.length} files to ${dir}: ${[...run.files.keys()].join(', ')}\n`);
}
