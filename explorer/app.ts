/**
 * The explorer page: reads the served scenario, lets the user change one
 * condition's g, deviation and beams, the foil thickness and surfaces, a defect's depth
 * and Burgers vector, and re-renders with the command line's own renderer
 * (bundled; bands of rows in Web Workers). Every setting is applied to a copy
 * of the scenario JSON, which is parsed by the same parser as the CLI: the
 * saved file is exactly what is shown.
 */
import type { Vec3 } from '../src/math/vec3.js';
import { dot } from '../src/math/vec3.js';
import { parseScenario, PERPENDICULAR_TOLERANCE_DEG } from '../src/scenario/parse.js';
import { beamCount, type Scenario } from '../src/scenario/types.js';
import { resolveCondition, type ResolvedCondition } from '../src/imaging/resolveCondition.js';
import { renderJob } from '../src/imaging/renderScenario.js';
import type { RenderJob } from '../src/imaging/renderRows.js';
import { isForbidden, reflectionParameters } from '../src/scattering/reflection.js';
import { directionToCartesian, planeNormalToCartesian, usesFourIndices } from '../src/crystal/lattice.js';
import { planeToFour } from '../src/crystal/millerBravais.js';
import { identificationCandidates } from '../src/analysis/candidates.js';
import { formatDirectionIn } from '../src/crystal/formatIndices.js';
import { defectTypeNamed, defectTypeOf } from '../src/defects/registry.js';
import { autoStretch, stretchToBytes } from '../src/output/stretch.js';
import { crystalToImagePoint, imagePointToCrystal, pixelX } from '../src/geometry/frames.js';
import { referenceFrame } from '../src/imaging/scenarioFrame.js';
import { drawFigure, figureSvg, type Shape } from './figure.js';

type Raw = Record<string, any>;

interface Settings {
  cond: number;
  mode: 'w' | 's';
  value: number;
  thickness: number;
  defect: number;
  depth: number;
  g: Vec3;
  /** Index into burgersChoices, -1: as in the file. */
  b: number;
  /** 2, an odd systematic-row count, or 0: the beam set of the file. */
  beams: number;
  /** Foil surfaces: relaxed (the default) or the infinite medium (keeps inclined lines on shared columns: faster). */
  surfaces: 'relaxed' | 'infinite';
}

interface Reflection {
  readonly g: Vec3;
  readonly xi_nm: number;
  readonly g_per_nm: number;
}

/** What the page exposes for inspection (tests read the float images from here). */
interface PageState {
  renders: number;
  lastMs: number;
  width: number;
  height: number;
  pixel_nm: number;
  bf: Float32Array | null;
  df: Float32Array | null;
  scenario: Raw | null;
  conditionId: string;
  error: string | null;
  /** Rocking curves received, and the last one (perfect crystal, against w). */
  rockings: number;
  rocking: { thickness_nm: number; w: Float64Array; bf: Float64Array; df: Float64Array } | null;
}

const state: PageState = { renders: 0, lastMs: NaN, width: 0, height: 0, pixel_nm: 0, bf: null, df: null, scenario: null, conditionId: '', error: null, rockings: 0, rocking: null };
(window as unknown as { explorer: PageState }).explorer = state;

const $ = <T extends HTMLElement>(id: string) => document.getElementById(id) as T;
const el = {
  name: $('scenario-name'),
  condition: $<HTMLSelectElement>('condition'),
  reflection: $<HTMLSelectElement>('reflection'),
  modeW: $<HTMLInputElement>('mode-w'),
  modeS: $<HTMLInputElement>('mode-s'),
  deviation: $<HTMLInputElement>('deviation'),
  deviationValue: $<HTMLInputElement>('deviation-value'),
  thickness: $<HTMLInputElement>('thickness'),
  thicknessValue: $<HTMLInputElement>('thickness-value'),
  defect: $<HTMLSelectElement>('defect'),
  depth: $<HTMLInputElement>('depth'),
  depthValue: $<HTMLInputElement>('depth-value'),
  burgers: $<HTMLSelectElement>('burgers'),
  beams: $<HTMLSelectElement>('beams'),
  surfaces: $<HTMLSelectElement>('surfaces'),
  modelNote: $('model-note'),
  info: $('info'),
  status: $('status'),
  figure: $<HTMLCanvasElement>('figure'),
};

// ---------------------------------------------------------------- workers

interface BandReply {
  ok: boolean;
  gen: number;
  row0: number;
  row1: number;
  bf?: Float32Array;
  df?: Float32Array;
  error?: string;
}

/** Hands the bands of the newest job to the workers; results of an older job are dropped. */
class BandPool {
  private readonly workers: Worker[];
  private readonly idle: Worker[] = [];
  private gen = 0;
  private job: RenderJob | null = null;
  private queue: [number, number][] = [];
  private pending = 0;
  private bf = new Float32Array(0);
  private df = new Float32Array(0);
  private done: ((bf: Float32Array, df: Float32Array) => void) | null = null;
  private fail: ((msg: string) => void) | null = null;

  constructor(n: number) {
    this.workers = Array.from({ length: n }, () => new Worker(new URL('./worker.js', import.meta.url), { type: 'module' }));
    for (const w of this.workers) {
      w.onmessage = (e: MessageEvent<BandReply>) => this.reply(w, e.data);
      this.idle.push(w);
    }
  }

  submit(job: RenderJob, done: (bf: Float32Array, df: Float32Array) => void, fail: (msg: string) => void): void {
    this.gen++;
    this.job = job;
    this.done = done;
    this.fail = fail;
    const bandRows = Math.max(1, Math.floor(job.height / (this.workers.length * 6)));
    this.queue = [];
    for (let r = 0; r < job.height; r += bandRows) this.queue.push([r, Math.min(job.height, r + bandRows)]);
    this.pending = this.queue.length;
    this.bf = new Float32Array(job.width * job.height);
    this.df = new Float32Array(job.width * job.height);
    while (this.idle.length > 0 && this.queue.length > 0) this.next(this.idle.pop()!);
  }

  private next(w: Worker): void {
    const band = this.queue.shift();
    if (band === undefined || this.job === null) {
      this.idle.push(w);
      return;
    }
    w.postMessage({ gen: this.gen, job: this.job, row0: band[0], row1: band[1] });
  }

  private reply(w: Worker, m: BandReply): void {
    if (m.gen === this.gen) {
      if (!m.ok) {
        this.queue = [];
        this.fail?.(m.error ?? 'the renderer failed');
      } else {
        const width = this.job!.width;
        this.bf.set(m.bf!, m.row0 * width);
        this.df.set(m.df!, m.row0 * width);
        if (--this.pending === 0) this.done?.(this.bf, this.df);
      }
    }
    this.next(w);
  }
}

// ---------------------------------------------------------------- scenario

let raw: Raw = {};
let base: Scenario;
const settings: Settings = { cond: 0, mode: 'w', value: 0, thickness: 100, defect: -1, depth: 0, g: [0, 0, 0], b: -1, beams: 2, surfaces: 'relaxed' };
/** Settings the user has changed: only these are written into the scenario copy, so untouched entries keep the file's own form (weakBeam, 4 indices, ...). */
const touched = { deviation: false, g: false, beams: false, thickness: false, depth: false, surfaces: false };
let reflections: Reflection[] = [];
let burgersChoices: Vec3[] = [];

function defectDepthKey(d: Raw): string {
  return defectTypeNamed(String(d.type))?.positionKey ?? 'point_nm';
}

/** The scenario JSON with the current settings applied (a copy; the served file is never changed). */
export function variantRaw(): Raw {
  const r = structuredClone(raw);
  if (touched.thickness) r.foil.thickness_nm = settings.thickness;
  if (touched.surfaces) r.surfaces = settings.surfaces;
  const c = r.conditions[settings.cond];
  if (touched.deviation) {
    delete c.s_per_nm;
    delete c.w;
    delete c.weakBeam;
    if (settings.mode === 'w') c.w = settings.value;
    else c.s_per_nm = settings.value;
  }
  if (touched.g) c.g = gIndices(settings.g);
  if (touched.beams) {
    if (settings.beams === 2) delete c.beams;
    else if (settings.beams > 2) c.beams = { row: settings.beams };
  }
  if (settings.defect >= 0) {
    const d = r.defects[settings.defect];
    const key = defectDepthKey(d);
    if (touched.depth) {
      const p = Array.isArray(d[key]) ? [...d[key]] : [0, 0, 0];
      p[2] = settings.depth;
      d[key] = p;
    }
    if (settings.b >= 0 && 'b' in d) d.b = burgersText(burgersChoices[settings.b]);
  }
  return r;
}

function fmt(x: number, digits = 3): string {
  return Number.isFinite(x) ? String(Number(x.toPrecision(digits))) : String(x);
}

/** Whether the scenario's material is written with four (Miller-Bravais) indices. */
let fourIndices = false;

/** A reflection as written in files and labels: (hkil) for hexagonal crystals. */
const gIndices = (g: Vec3): number[] => (fourIndices ? [...planeToFour(g)] : [...g]).map((x) => Math.round(x) + 0);
const idx = (g: Vec3) => gIndices(g).join(' ');

/** A Burgers vector as text, "1/3[1 1 -2 0]" for hexagonal crystals (the notation the scenario parser reads back). */
function burgersText(b: Vec3): string {
  return formatDirectionIn(base.material.lattice, b);
}

/** Reflections within the parser's tolerance of perpendicular to the condition's beam, allowed by the structure, shortest first. */
function allowedReflections(sc: Scenario, beam: Vec3, own: Vec3): Reflection[] {
  const m = sc.material;
  const b = directionToCartesian(m.lattice, beam);
  const bn = Math.hypot(b[0], b[1], b[2]);
  const sinTol = Math.sin((PERPENDICULAR_TOLERANCE_DEG * Math.PI) / 180);
  const found: Vec3[] = [];
  const N = 4;
  for (let h = -N; h <= N; h++)
    for (let k = -N; k <= N; k++)
      for (let l = -N; l <= N; l++) {
        if (h === 0 && k === 0 && l === 0) continue;
        const g: Vec3 = [h, k, l];
        const gc = planeNormalToCartesian(m.lattice, g);
        const gn = Math.hypot(gc[0], gc[1], gc[2]);
        if (Math.abs(dot(gc, b)) / (gn * bn) > sinTol) continue;
        if (isForbidden(m, g)) continue;
        found.push(g);
      }
  const withLength = found.map((g) => ({ g, len: Math.hypot(...planeNormalToCartesian(m.lattice, g)) })).sort((a, c) => a.len - c.len);
  const keep = withLength.slice(0, 24).map((x) => x.g);
  if (!keep.some((g) => g[0] === own[0] && g[1] === own[1] && g[2] === own[2])) keep.unshift(own);
  return keep.map((g) => {
    const r = reflectionParameters(m, g, sc.kV, { absorption: sc.absorption });
    return { g, xi_nm: r.xi_nm, g_per_nm: r.g_per_nm };
  });
}

function option(sel: HTMLSelectElement, value: string, text: string): void {
  const o = document.createElement('option');
  o.value = value;
  o.textContent = text;
  sel.append(o);
}

/** Fill the controls from the scenario for condition `ci` (and the defect choice). */
function loadCondition(ci: number): void {
  const sc = parseScenario(raw); // the condition as the file has it
  const c = sc.conditions[ci];
  const rc = resolveCondition(sc, c);
  settings.cond = ci;
  touched.deviation = touched.g = touched.beams = false;
  settings.g = [...c.g] as Vec3;
  if (c.deviation.kind === 'w') {
    settings.mode = 'w';
    settings.value = c.deviation.w;
  } else {
    settings.mode = 's';
    settings.value = rc.s_per_nm;
  }
  // a symmetric row -m g .. m g is offered as its beam count; any other row (a weak-beam row such as -3g .. 5g) or set as the file's
  const symmetricRow = c.beams.kind === 'row' && c.beams.nMin === -c.beams.nMax;
  settings.beams = c.beams.kind === 'two' ? 2 : c.beams.kind === 'row' && symmetricRow ? c.beams.nMax - c.beams.nMin + 1 : 0;
  reflections = allowedReflections(sc, c.beam, c.g);
  el.reflection.replaceChildren();
  reflections.forEach((r, i) => option(el.reflection, String(i), `${idx(r.g)}   (xi_g ${fmt(r.xi_nm, 4)} nm)`));
  el.reflection.value = String(reflections.findIndex((r) => r.g.every((x, k) => x === c.g[k])));
  el.beams.replaceChildren();
  if (c.beams.kind === 'set') option(el.beams, '0', `the file's beam set (${beamCount(c.beams)} beams)`);
  if (c.beams.kind === 'row' && !symmetricRow) option(el.beams, '0', `the file's row ${c.beams.nMin}g .. ${c.beams.nMax}g (${c.beams.nMax - c.beams.nMin + 1} beams)`);
  option(el.beams, '2', '2 (two-beam)');
  for (const n of [3, 5, 7, 9, 11]) option(el.beams, String(n), `${n} (systematic row)`);
  el.beams.value = String(settings.beams);
  showDeviation();
}


function loadDefect(di: number): void {
  settings.defect = di;
  settings.b = -1;
  touched.depth = false;
  el.burgers.replaceChildren();
  option(el.burgers, '-1', 'as in the file');
  burgersChoices = [];
  if (di < 0) {
    el.depth.disabled = true;
    el.depthValue.disabled = true;
    el.burgers.disabled = true;
    return;
  }
  const d = base.defects[di];
  settings.depth = defectTypeOf(d).position(d)[2];
  el.depth.disabled = false;
  el.depthValue.disabled = false;
  el.depth.max = String(settings.thickness);
  setPair(el.depth, el.depthValue, settings.depth);
  if ('b' in d) {
    try {
      for (const cand of identificationCandidates(base, di)) {
        if (cand.kind !== 'burgers' || cand.b === undefined) continue;
        const b = cand.b;
        if (burgersChoices.some((x) => x[0] === b[0] && x[1] === b[1] && x[2] === b[2])) continue;
        burgersChoices.push(b);
        option(el.burgers, String(burgersChoices.length - 1), `b = ${burgersText(b)}`);
      }
    } catch {
      // no candidates in the scenario: only the file's own b
    }
  }
  el.burgers.disabled = burgersChoices.length === 0;
  el.burgers.value = '-1';
}

function setPair(range: HTMLInputElement, num: HTMLInputElement, v: number): void {
  range.value = String(v);
  num.value = String(Number(v.toPrecision(6)));
}

function showDeviation(): void {
  el.modeW.checked = settings.mode === 'w';
  el.modeS.checked = settings.mode === 's';
  // the slider reaches at least the file's value (a weak-beam w can be 10 or more)
  const range = settings.mode === 'w' ? Math.max(4, Math.ceil(Math.abs(settings.value)) + 1) : Math.max(0.2, Math.ceil(Math.abs(settings.value) * 10 + 1) / 10);
  el.deviation.min = String(-range);
  el.deviation.max = String(range);
  el.deviation.step = settings.mode === 'w' ? '0.01' : '0.0005';
  setPair(el.deviation, el.deviationValue, settings.value);
}

// ---------------------------------------------------------------- rendering

let pool: BandPool;
let changeTime = 0;

function setStatus(text: string, error = false): void {
  el.status.textContent = text;
  el.status.className = error ? 'error' : '';
}

function update(): void {
  changeTime = performance.now();
  let sc: Scenario;
  let rv: Raw;
  try {
    rv = variantRaw();
    sc = parseScenario(rv);
  } catch (e) {
    state.error = (e as Error).message;
    setStatus(`cannot render: ${(e as Error).message}`, true);
    return;
  }
  state.error = null;
  const cond = resolveCondition(sc, sc.conditions[settings.cond]);
  const job = renderJob(sc, cond);
  const t0 = changeTime;
  setStatus('rendering ...');
  showInfo(sc, cond);
  requestRocking(rv, Math.max(4, Math.ceil(Math.abs(cond.w)) + 1));
  pool.submit(
    job,
    (bf, df) => {
      state.bf = bf;
      state.df = df;
      state.width = job.width;
      state.height = job.height;
      state.pixel_nm = job.pixel_nm;
      state.scenario = rv;
      state.conditionId = cond.id;
      lastView = { sc, cond, job, bf, df };
      redraw();
      state.lastMs = performance.now() - t0;
      state.renders++;
      setStatus(`${job.width} x ${job.height} pixels rendered in ${fmt(state.lastMs, 3)} ms (${navigatorThreads()} workers)`);
    },
    (msg) => {
      state.error = msg;
      setStatus(`cannot render: ${msg}`, true);
    },
  );
}

function navigatorThreads(): number {
  return Math.max(1, Math.min(8, navigator.hardwareConcurrency || 2));
}

function showInfo(sc: Scenario, c: ResolvedCondition): void {
  const lines = [
    `${sc.material.name}, ${sc.kV} kV, t = ${fmt(sc.thickness_nm)} nm`,
    `g = ${idx(c.g)}: xi_g = ${fmt(c.xi_nm, 4)} nm, xi'_g = ${fmt(c.xiAbs_nm, 4)} nm`,
    `s = ${fmt(c.s_per_nm, 4)} nm^-1, w = ${fmt(c.w, 4)}`,
  ];
  if (settings.defect >= 0) {
    const d = sc.defects[settings.defect];
    if ('b' in d) {
      const gb = dot(c.g, d.b);
      lines.push(`${d.label}: b = ${burgersText(d.b)}, g.b = ${fmt(gb, 3)}`);
    }
  }
  el.info.textContent = lines.join('\n');
  // what the images are: the same words as render.json's note
  el.modelNote.textContent = `Simulated images (column approximation, ${sc.elasticity} elasticity, ${sc.surfaces === 'relaxed' ? 'relaxed foil surfaces' : 'infinite medium'}): a model, not a measurement.`;
}

interface Rocking {
  readonly thickness_nm: number;
  readonly w: Float64Array;
  readonly bf: Float64Array;
  readonly df: Float64Array;
}

let rockingWorker: Worker;
let rockingGen = 0;
let rockingKey = '';
let rocking: Rocking | null = null;
let lastView: { sc: Scenario; cond: ResolvedCondition; job: RenderJob; bf: Float32Array; df: Float32Array } | null = null;

/** Ask the rocking-curve worker for the perfect-crystal curve on -wMax..wMax, unless the last one still holds (it does not depend on w, s or the defects). */
function requestRocking(rv: Raw, wMax: number): void {
  const c = { ...rv.conditions[settings.cond] };
  delete c.s_per_nm;
  delete c.w;
  delete c.weakBeam;
  const key = JSON.stringify([settings.cond, wMax, { ...rv, defects: [], conditions: [c] }]);
  if (key === rockingKey) return;
  rockingKey = key;
  rockingWorker.postMessage({ gen: ++rockingGen, scenario: rv, cond: settings.cond, wMax });
}

function rockingReply(m: { ok: boolean; gen: number; error?: string } & Partial<Rocking>): void {
  if (m.gen !== rockingGen) return;
  if (!m.ok) {
    rocking = null;
    setStatus(`no rocking curve: ${m.error}`, true);
  } else {
    rocking = { thickness_nm: m.thickness_nm!, w: m.w!, bf: m.bf!, df: m.df! };
  }
  state.rocking = rocking;
  state.rockings++;
  redraw();
}

function redraw(): void {
  if (lastView !== null) draw(lastView.sc, lastView.cond, lastView.job, lastView.bf, lastView.df, rocking);
}

/** The chosen defect's position in this condition's image (x, y in nm) and the direction of the profile across it. */
function profileLine(sc: Scenario, c: ResolvedCondition): { x: number; y: number; dx: number; dy: number; label: string } {
  const gx = dot(c.g_cart, c.frame.ex);
  const gy = dot(c.g_cart, c.frame.ey);
  const gl = Math.hypot(gx, gy) || 1;
  if (settings.defect < 0) return { x: 0, y: 0, dx: gx / gl, dy: gy / gl, label: 'through the centre, along g' };
  const d = sc.defects[settings.defect];
  const p = defectTypeOf(d).position(d);
  const r = crystalToImagePoint(c.frame, imagePointToCrystal(referenceFrame(sc), p));
  if ('line' in d) {
    const u = directionToCartesian(sc.material.lattice, d.line);
    const ux = dot(u, c.frame.ex);
    const uy = dot(u, c.frame.ey);
    const ul = Math.hypot(ux, uy);
    if (ul > 1e-6) return { x: r[0], y: r[1], dx: -uy / ul, dy: ux / ul, label: `across ${d.label}` };
  }
  return { x: r[0], y: r[1], dx: gx / gl, dy: gy / gl, label: `through ${d.label}, along g` };
}

function sample(img: Float32Array, w: number, h: number, pixel: number, x: number, y: number): number {
  const fi = x / pixel + w / 2 - 0.5;
  const fj = y / pixel + h / 2 - 0.5;
  if (fi < 0 || fj < 0 || fi > w - 1 || fj > h - 1) return NaN;
  const i = Math.min(w - 2, Math.floor(fi));
  const j = Math.min(h - 2, Math.floor(fj));
  const a = fi - i;
  const b = fj - j;
  return (1 - b) * ((1 - a) * img[j * w + i] + a * img[j * w + i + 1]) + b * ((1 - a) * img[(j + 1) * w + i] + a * img[(j + 1) * w + i + 1]);
}

function niceLength(maxLen: number): number {
  const p = 10 ** Math.floor(Math.log10(maxLen));
  for (const m of [5, 2, 1]) if (m * p <= maxLen) return m * p;
  return p;
}

let lastFigure: { width: number; height: number; shapes: Shape[] } | null = null;

function plot(shapes: Shape[], x0: number, y0: number, w: number, h: number, xs: ArrayLike<number>, series: { ys: ArrayLike<number>; colour: string; name: string }[], xLabel: string, title: string, marker?: number): void {
  const finite = (v: number) => Number.isFinite(v);
  let xmin = Infinity, xmax = -Infinity, ymin = Infinity, ymax = -Infinity;
  for (let i = 0; i < xs.length; i++) {
    for (const s of series) {
      if (!finite(s.ys[i])) continue;
      xmin = Math.min(xmin, xs[i]);
      xmax = Math.max(xmax, xs[i]);
      ymin = Math.min(ymin, s.ys[i]);
      ymax = Math.max(ymax, s.ys[i]);
    }
  }
  if (!(xmax > xmin)) return;
  ymin = Math.min(0, ymin);
  if (!(ymax > ymin)) ymax = ymin + 1;
  const L = 44, R = 8, T = 22, B = 30;
  const pw = w - L - R, ph = h - T - B;
  const X = (v: number) => x0 + L + ((v - xmin) / (xmax - xmin)) * pw;
  const Y = (v: number) => y0 + T + ph - ((v - ymin) / (ymax - ymin)) * ph;
  shapes.push({ kind: 'text', x: x0 + L, y: y0 + 14, text: title, size: 12, fill: '#111' });
  shapes.push({ kind: 'rect', x: x0 + L, y: y0 + T, w: pw, h: ph, stroke: '#888' });
  for (const v of [ymin, (ymin + ymax) / 2, ymax]) {
    shapes.push({ kind: 'text', x: x0 + L - 4, y: Y(v) + 4, text: fmt(v, 2), size: 10, fill: '#333', anchor: 'end' });
  }
  for (const v of [xmin, (xmin + xmax) / 2, xmax]) {
    shapes.push({ kind: 'text', x: X(v), y: y0 + T + ph + 13, text: fmt(v, 3), size: 10, fill: '#333', anchor: 'middle' });
  }
  shapes.push({ kind: 'text', x: x0 + L + pw / 2, y: y0 + h - 3, text: xLabel, size: 11, fill: '#111', anchor: 'middle' });
  if (marker !== undefined && marker >= xmin && marker <= xmax) {
    shapes.push({ kind: 'line', points: [X(marker), y0 + T, X(marker), y0 + T + ph], stroke: '#999', width: 1, dash: [3, 3] });
  }
  let lx = x0 + L + pw - 4;
  for (const s of [...series].reverse()) {
    const pts: number[] = [];
    for (let i = 0; i < xs.length; i++) if (finite(s.ys[i])) pts.push(X(xs[i]), Y(s.ys[i]));
    if (pts.length >= 4) shapes.push({ kind: 'line', points: pts, stroke: s.colour, width: 1.5 });
    shapes.push({ kind: 'text', x: lx, y: y0 + T + 13, text: s.name, size: 11, fill: s.colour, anchor: 'end', halo: '#ffffff' });
    lx -= 8 * s.name.length + 12;
  }
}

function draw(sc: Scenario, c: ResolvedCondition, job: RenderJob, bf: Float32Array, df: Float32Array, rocking: Rocking | null): void {
  const { width, height, pixel_nm } = job;
  const P = 320;
  const scale = P / Math.max(width, height);
  const pw = width * scale, ph = height * scale;
  const M = 12, TOP = 26;
  const shapes: Shape[] = [];
  const gx = dot(c.g_cart, c.frame.ex);
  const gy = dot(c.g_cart, c.frame.ey);
  const gl = Math.hypot(gx, gy) || 1;
  const bar = niceLength(0.3 * width * pixel_nm);
  const line = profileLine(sc, c);
  const dev = settings.mode === 'w' ? `w = ${fmt(c.w, 3)}` : `s = ${fmt(c.s_per_nm, 3)} nm^-1`;
  const panels: [string, Float32Array][] = [['bright field', bf], ['dark field', df]];
  panels.forEach(([name, img], k) => {
    const x0 = M + k * (P + M);
    const win = autoStretch(img);
    shapes.push({ kind: 'text', x: x0, y: 18, text: `${name}, g = ${idx(c.g)}, ${dev}`, size: 13, fill: '#111', bold: true });
    shapes.push({ kind: 'image', x: x0, y: TOP, w: pw, h: ph, image: { width, height, grey: stretchToBytes(img, win.lo, win.hi) } });
    // scale bar
    const bl = (bar / pixel_nm) * scale;
    shapes.push({ kind: 'rect', x: x0 + 10, y: TOP + ph - 16, w: bl, h: 5, fill: '#ffffff', stroke: '#000000' });
    shapes.push({ kind: 'text', x: x0 + 10 + bl / 2, y: TOP + ph - 21, text: `${fmt(bar)} nm`, size: 12, fill: '#ffffff', halo: '#000000', anchor: 'middle' });
    // g arrow
    const ax = x0 + pw - 34, ay = TOP + 34, len = 22;
    const ux = gx / gl, uy = gy / gl;
    const tx = ax + ux * len, ty = ay + uy * len;
    shapes.push({ kind: 'line', points: [ax - ux * len, ay - uy * len, tx - ux * 6, ty - uy * 6], stroke: '#ffd400', width: 2.5 });
    shapes.push({ kind: 'polygon', points: [tx, ty, tx - ux * 9 - uy * 5, ty - uy * 9 + ux * 5, tx - ux * 9 + uy * 5, ty - uy * 9 - ux * 5], fill: '#ffd400', stroke: '#000000' });
    shapes.push({ kind: 'text', x: ax - ux * len - 4, y: ay - uy * len + 4, text: 'g', size: 13, fill: '#ffd400', halo: '#000000', anchor: 'end', bold: true });
    // profile line
    const half = 0.5 * Math.hypot(width, height) * pixel_nm;
    const toPx = (x: number, y: number): [number, number] => [x0 + (x / pixel_nm + width / 2) * scale, TOP + (y / pixel_nm + height / 2) * scale];
    const [p0x, p0y] = toPx(line.x - half * line.dx, line.y - half * line.dy);
    const [p1x, p1y] = toPx(line.x + half * line.dx, line.y + half * line.dy);
    shapes.push({ kind: 'line', points: [p0x, p0y, p1x, p1y], stroke: 'rgba(0,160,255,0.55)', width: 1, dash: [4, 4] });
    shapes.push({ kind: 'text', x: x0 + pw - 6, y: TOP + ph - 8, text: `lo ${fmt(win.lo, 3)}  hi ${fmt(win.hi, 3)}`, size: 10, fill: '#ffffff', halo: '#000000', anchor: 'end' });
  });
  // clip rectangles around panels are implied: lines leaving the panel are drawn over the white margin, so cover them
  const y1 = TOP + ph;
  shapes.push({ kind: 'rect', x: 0, y: y1, w: 2 * P + 3 * M, h: 4 * M, fill: '#ffffff' });
  shapes.push({ kind: 'rect', x: M + pw, y: TOP, w: M + P - pw, h: ph, fill: '#ffffff' });
  shapes.push({ kind: 'rect', x: 0, y: 0, w: M, h: y1, fill: '#ffffff' });
  shapes.push({ kind: 'rect', x: 2 * M + P + pw, y: TOP, w: P - pw + M, h: ph, fill: '#ffffff' });
  shapes.push({ kind: 'rect', x: 0, y: 22, w: 2 * P + 3 * M, h: TOP - 22, fill: '#ffffff' });
  // profile across the defect
  const half = 0.5 * Math.hypot(width, height) * pixel_nm;
  const n = 2 * Math.ceil((2 * half) / pixel_nm) + 1;
  const ts = new Float64Array(n);
  const pb = new Float64Array(n);
  const pd = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const t = -half + (2 * half * i) / (n - 1);
    ts[i] = t;
    pb[i] = sample(bf, width, height, pixel_nm, line.x + t * line.dx, line.y + t * line.dy);
    pd[i] = sample(df, width, height, pixel_nm, line.x + t * line.dx, line.y + t * line.dy);
  }
  const y2 = y1 + 14;
  plot(shapes, M, y2, P, 210, ts, [{ ys: pb, colour: '#1f4e9c', name: 'BF' }, { ys: pd, colour: '#c0392b', name: 'DF' }], 'distance along the dashed line (nm)', `profile ${line.label}`, 0);
  if (rocking !== null) {
    plot(shapes, 2 * M + P, y2, P, 210, rocking.w, [{ ys: rocking.bf, colour: '#1f4e9c', name: 'BF' }, { ys: rocking.df, colour: '#c0392b', name: 'DF' }], 'w = s xi_g', `perfect crystal, t = ${fmt(rocking.thickness_nm)} nm`, c.w);
  } else {
    shapes.push({ kind: 'text', x: 2 * M + P + 44, y: y2 + 14, text: 'perfect crystal: computing ...', size: 12, fill: '#111' });
  }
  lastFigure = { width: 2 * P + 3 * M, height: Math.ceil(y2 + 220), shapes };
  drawFigure(el.figure, lastFigure);
}

// ---------------------------------------------------------------- save and export

function slug(name: string): string {
  return name.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '') || 'scenario';
}

function download(name: string, blob: Blob): void {
  const a = document.createElement('a');
  a.href = URL.createObjectURL(blob);
  a.download = name;
  document.body.append(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(a.href), 10_000);
}

function save(): void {
  const rv = variantRaw();
  try {
    parseScenario(rv);
  } catch (e) {
    setStatus(`not saved: ${(e as Error).message}`, true);
    return;
  }
  download(`${slug(String(raw.name ?? 'scenario'))}-explored.json`, new Blob([`${JSON.stringify(rv, null, 2)}\n`], { type: 'application/json' }));
}

function exportPng(): void {
  if (lastFigure === null) return;
  el.figure.toBlob((b) => {
    if (b) download(`${slug(String(raw.name ?? 'scenario'))}-${state.conditionId}-figure.png`, b);
  }, 'image/png');
}

function exportSvg(): void {
  if (lastFigure === null) return;
  download(`${slug(String(raw.name ?? 'scenario'))}-${state.conditionId}-figure.svg`, new Blob([figureSvg(lastFigure)], { type: 'image/svg+xml' }));
}

// ---------------------------------------------------------------- wiring

function numberFrom(input: HTMLInputElement): number | null {
  const v = Number(input.value);
  return input.value.trim() !== '' && Number.isFinite(v) ? v : null;
}

function bindPair(range: HTMLInputElement, num: HTMLInputElement, apply: (v: number) => void): void {
  range.addEventListener('input', () => {
    const v = Number(range.value);
    num.value = String(v);
    apply(v);
    update();
  });
  num.addEventListener('change', () => {
    const v = numberFrom(num);
    if (v === null) {
      setStatus(`"${num.value}" is not a number; type a number`, true);
      return;
    }
    range.value = String(v);
    apply(v);
    update();
  });
}

async function main(): Promise<void> {
  const res = await fetch('scenario.json', { cache: 'no-store' });
  raw = (await res.json()) as Raw;
  base = parseScenario(raw);
  fourIndices = usesFourIndices(base.material.lattice);
  el.name.textContent = base.name;
  settings.thickness = base.thickness_nm;
  settings.surfaces = base.surfaces;
  el.surfaces.value = base.surfaces;
  base.conditions.forEach((c, i) => option(el.condition, String(i), `${c.id}  (g = ${idx(c.g)})`));
  option(el.defect, '-1', '(none chosen)');
  base.defects.forEach((d, i) => option(el.defect, String(i), `${d.label} (${d.type})`));
  el.thickness.max = String(Math.max(400, Math.ceil(2 * base.thickness_nm)));
  setPair(el.thickness, el.thicknessValue, settings.thickness);
  loadCondition(0);
  loadDefect(base.defects.length > 0 ? 0 : -1);
  el.defect.value = String(settings.defect);
  pool = new BandPool(navigatorThreads());
  rockingWorker = new Worker(new URL('./rocking.js', import.meta.url), { type: 'module' });
  rockingWorker.onmessage = (e) => rockingReply(e.data);

  el.condition.addEventListener('change', () => {
    loadCondition(Number(el.condition.value));
    update();
  });
  el.reflection.addEventListener('change', () => {
    const r = reflections[Number(el.reflection.value)];
    // the deviation control keeps its value: with w, s follows the new xi_g
    settings.g = [...r.g] as Vec3;
    touched.g = true;
    update();
  });
  for (const radio of [el.modeW, el.modeS]) {
    radio.addEventListener('change', () => {
      const sc = parseScenario(variantRaw());
      const rc = resolveCondition(sc, sc.conditions[settings.cond]);
      settings.mode = el.modeW.checked ? 'w' : 's';
      settings.value = settings.mode === 'w' ? rc.w : rc.s_per_nm;
      touched.deviation = true;
      showDeviation();
      update();
    });
  }
  bindPair(el.deviation, el.deviationValue, (v) => {
    settings.value = v;
    touched.deviation = true;
  });
  bindPair(el.thickness, el.thicknessValue, (v) => {
    settings.thickness = v;
    touched.thickness = true;
    el.depth.max = String(v);
  });
  bindPair(el.depth, el.depthValue, (v) => {
    settings.depth = v;
    touched.depth = true;
  });
  el.defect.addEventListener('change', () => {
    loadDefect(Number(el.defect.value));
    update();
  });
  el.burgers.addEventListener('change', () => {
    settings.b = Number(el.burgers.value);
    update();
  });
  el.beams.addEventListener('change', () => {
    settings.beams = Number(el.beams.value);
    touched.beams = true;
    update();
  });
  el.surfaces.addEventListener('change', () => {
    settings.surfaces = el.surfaces.value === 'infinite' ? 'infinite' : 'relaxed';
    touched.surfaces = true;
    update();
  });
  $('controls').addEventListener('submit', (e) => e.preventDefault());
  $('save').addEventListener('click', save);
  $('export-png').addEventListener('click', exportPng);
  $('export-svg').addEventListener('click', exportSvg);
  update();
}

main().catch((e) => {
  state.error = (e as Error).message;
  setStatus(`the scenario could not be loaded: ${(e as Error).message}`, true);
});
