/**
 * The translation method for straight defects (generalised columns; Head,
 * Humble, Clarebrough, Morton & Forwood 1973, "Computed Electron Micrographs
 * and Defect Identification"), for the two-beam engine (here) and systematic
 * rows (translationColumnsN.ts).
 *
 * When every displacement field is invariant along one direction u (straight
 * dislocations parallel to u) and every jump surface contains u (fault
 * planes, cuts whose edge is parallel to u), a column shifted by a vector of
 * span(u, beam) sees the same beta' and the same crossings, shifted in depth.
 * Pixels one step (p, q) apart along the projected line (p, q small integers,
 * exactly parallel to the projection) are such shifts: the column of pixel
 * k steps along is the stretch [k D, k D + L] of the column of the first
 * pixel (extended beyond the foil, where the infinite-body field is still
 * defined), D the depth shift per step (it includes the change of the entry
 * point in a tilted foil). One long column per class of pixels is cut at every
 * window end and fault crossing; the transfer matrix of each stretch is
 * integrated once (src/dynamics/twoBeamMatrix.ts, the same step control as the
 * column integrator), and every pixel's window product comes from a sliding
 * window of matrix products kept in two stacks (suffix products of the older
 * stretches, one running product of the newer ones), so no matrix is ever
 * inverted (absorbing slab matrices are badly conditioned to invert) and each
 * pixel costs O(1) matrix products.
 *
 * Pixels whose area reaches a dislocation core are averaged over the same
 * sub-columns as in renderRows (cores.ts: those inside a core left out); the sub-columns at one offset
 * within their pixels form classes of their own.
 */
import type { Vec3 } from '../math/vec3.js';
import { cross, dot } from '../math/vec3.js';
import { columnEntryOffset, columnEntryPoint, pixelX } from '../geometry/frames.js';
import { mulMatrix, setIdentity, stretchMatrix, type MatrixParams, type StretchCounters } from '../dynamics/twoBeamMatrix.js';
import { DEFAULT_MAX_SLICE_NM } from '../dynamics/twoBeamColumn.js';
import { activeSurfaces, columnEvaluator, type ColumnEvaluator, type RenderJob, type RowStats } from './renderRows.js';
import { CORE_SUBSAMPLES, coreGeometry } from './cores.js';
import { longColumnEvents, WINDOW_END, WINDOW_START } from './longColumnEvents.js';
import { buildField } from './fieldSpecs.js';
import { columnStrain } from './columnStrain.js';
import { invariantAlongLine } from '../elasticity/surfaceRelaxation.js';
import { classWindowsN } from './translationColumnsN.js';

/**
 * Amplitudes of the K columns through (x0, y0) + k step, k = 0..K-1, from one long column:
 * amp[4k..4k+3] = (re phi0, im phi0, re phig, im phig). stats.slices counts the work.
 */
export type ClassWindows = ((amp: Float64Array, x0: number, y0: number, K: number) => void) & { readonly stats: { slices: number } };

/** Most beams of a systematic row for which columns are shared. */
const MAX_SHARED_BEAMS = 15;

/** Largest integer component of the pixel step along the projected line. */
const MAX_STEP = 8;

export interface TranslationPlan {
  /** Pixel step (di, dj) between columns that share a long column, oriented so that D >= 0. */
  readonly di: number;
  readonly dj: number;
  /** Depth shift of the window per step (nm). */
  readonly D: number;
  /** First pixel (i, j) of every class, as index j * width + i. */
  readonly starts: Int32Array;
  /** Total length of the long columns (nm), a measure of the work. */
  readonly pathLength_nm: number;
}

/** The common invariant direction of every field and jump surface of the job, or null. */
function invariantDirection(job: RenderJob): Vec3 | null {
  let u: Vec3 | null = null;
  for (const f of job.model.fields) {
    if (f.kind !== 'dislocation') return null;
    // the surface corrections of lines that meet the surfaces change along the line (the images of a parallel line do not)
    if (f.surfaceCorrection !== undefined && !invariantAlongLine(f.surfaceCorrection.kind)) return null;
    const l = f.line;
    if (u === null) u = l;
    else {
      const c = cross(u, l);
      if (Math.hypot(c[0], c[1], c[2]) > 1e-12) return null;
    }
  }
  const surfaces = activeSurfaces(job);
  if (u === null) {
    if (surfaces.length === 0) return null;
    // planes only: a direction within the first plane whose projection runs along x (or y)
    const n = surfaces[0].n;
    for (const a of [job.frame.ey, job.frame.ex]) {
      const c = cross(n, a);
      const cl = Math.hypot(c[0], c[1], c[2]);
      if (cl < 1e-9) continue;
      const cand: Vec3 = [c[0] / cl, c[1] / cl, c[2] / cl];
      if (Math.abs(dot(cand, job.frame.ez)) < 1 - 1e-9) {
        u = cand;
        break;
      }
    }
    if (u === null) return null;
  }
  for (const s of surfaces) {
    if (Math.abs(dot(s.n, u)) > 1e-12) return null;
    if (s.halfPlane) {
      const e = cross(s.into, s.n); // the edge direction of the half-plane
      const c = cross(e, u);
      if (Math.hypot(c[0], c[1], c[2]) > 1e-12 * Math.hypot(e[0], e[1], e[2])) return null;
    }
  }
  return u;
}

/**
 * Whether the job can use the translation method, and its plan; null when it
 * cannot (general beam sets, other defects, a projected direction that is not a
 * small pixel step, an end-on line) or would gain little (ignoreGain: plan
 * anyway, for tests on small images).
 */
export function translationPlan(job: RenderJob, options: { readonly ignoreGain?: boolean } = {}): TranslationPlan | null {
  // two beams, or a systematic row (translationColumnsN.ts); general beam sets go column by column
  if (job.manyBeam?.beamVectors !== undefined || job.rk4Steps !== undefined || job.gaussNodes === true || job.shareColumns === false) return null;
  // N beams: a stretch matrix costs N propagations and a window product N^3; beyond 15 beams columns are cheaper
  const beams = job.manyBeam?.input.excitationErrors_per_nm.length ?? 1;
  if (beams > MAX_SHARED_BEAMS) return null;
  const u = invariantDirection(job);
  if (u === null) return null;
  const { frame, width, height, pixel_nm } = job;
  const ux = dot(u, frame.ex);
  const uy = dot(u, frame.ey);
  const uz = dot(u, frame.ez);
  const ui = Math.hypot(ux, uy);
  if (ui < 1e-6) return null; // end-on: every column sees beta' = constant along it
  let best: [number, number] | null = null;
  for (let m = 1; m <= MAX_STEP && best === null; m++) {
    for (let a = -m; a <= m && best === null; a++) {
      for (const [p, q] of [[a, m], [a, -m], [m, a], [-m, a]] as const) {
        if (gcd(Math.abs(p), Math.abs(q)) !== 1) continue;
        if (Math.abs(ux * q - uy * p) <= 1e-12 * ui * Math.hypot(p, q) && ux * p + uy * q > 0) {
          best = [p, q];
          break;
        }
      }
    }
  }
  if (best === null) return null;
  let [di, dj] = best;
  // one step moves the column by mu (u - uz ez) in 3D; its entry offset changes by dtau
  const stepLen = Math.hypot(di, dj) * pixel_nm;
  const mu = stepLen / ui;
  const dtau = columnEntryOffset(frame, di * pixel_nm, dj * pixel_nm) - columnEntryOffset(frame, 0, 0);
  let D = -mu * uz + dtau;
  if (D < 0) {
    di = -di;
    dj = -dj;
    D = -D;
  }
  const starts: number[] = [];
  let pathLength = 0;
  const L = frame.columnLength_nm;
  for (let j = 0; j < height; j++) {
    for (let i = 0; i < width; i++) {
      const pi = i - di;
      const pj = j - dj;
      if (pi >= 0 && pi < width && pj >= 0 && pj < height) continue;
      starts.push(j * width + i);
      let k = 1;
      while (i + k * di >= 0 && i + k * di < width && j + k * dj >= 0 && j + k * dj < height) k++;
      pathLength += (k - 1) * D + L;
    }
  }
  // worth it only when the long columns are much shorter than all columns together
  if (!options.ignoreGain && (starts.length > (width * height) / 4 || beams * pathLength > 0.5 * width * height * L)) return null;
  return { di, dj, D, starts: Int32Array.from(starts), pathLength_nm: pathLength };
}

/**
 * Whether the escape points esc (image nm) of the pixel centred at (x, y) are the offsets off (from a pixel
 * centre) of the class's escape long columns, in either order (the two sides swap when the line passes
 * through the pixel centres), to 1e-9 pixel.
 */
function sameEscape(esc: Float64Array, off: Float64Array, x: number, y: number, pixel_nm: number): boolean {
  const eps = 1e-9 * pixel_nm;
  const close = (e: number, o: number): boolean =>
    Math.abs(esc[e] - x - off[o]) <= eps && Math.abs(esc[e + 1] - y - off[o + 1]) <= eps;
  return (close(0, 0) && close(2, 2)) || (close(0, 2) && close(2, 0));
}

function gcd(a: number, b: number): number {
  while (b !== 0) [a, b] = [b, a % b];
  return a;
}

/**
 * Renders the pixels of the classes c with c % parts === part into bf and df
 * (full-size images; other pixels are left untouched).
 */
export function renderTranslated(job: RenderJob, plan: TranslationPlan, part: number, parts: number, bf: Float32Array, df: Float32Array): RowStats {
  const { width, height, pixel_nm } = job;
  const cores = job.coreSupersample === false ? null : coreGeometry(job);
  const margin = Math.SQRT1_2 * pixel_nm;
  const windows = job.manyBeam === undefined ? classWindows(job, plan) : classWindowsN(job, plan);
  const maxK = Math.max(width, height) + 1;
  const amp = new Float64Array(4 * maxK);
  const isNear = new Uint8Array(maxK);
  const sumB = new Float64Array(maxK);
  const sumD = new Float64Array(maxK);
  const count = new Float64Array(maxK);
  const S = CORE_SUBSAMPLES;
  const { di, dj } = plan;
  // pixels wholly inside a core take columns just outside it (cores.ts): two long columns of their own, or
  // the column-by-column evaluator, made on first need
  let single: ColumnEvaluator | null = null;
  const esc = new Float64Array(4);
  const one = new Float64Array(4);
  // which pixels of a class use each sub-column offset; escape offsets and the two escape long columns
  const uses = new Uint8Array(S * S * maxK);
  const esc0 = new Float64Array(4);
  const ampEsc1 = new Float64Array(4 * maxK);
  const ampEsc2 = new Float64Array(4 * maxK);
  const L = job.frame.columnLength_nm;
  const beams = job.manyBeam?.input.excitationErrors_per_nm.length ?? 2;
  let columns = 0;
  for (let c = part; c < plan.starts.length; c += parts) {
    const s0 = plan.starts[c];
    const i0 = s0 % width;
    const j0 = (s0 - i0) / width;
    let K = 1;
    while (i0 + K * di >= 0 && i0 + K * di < width && j0 + K * dj >= 0 && j0 + K * dj < height) K++;
    const x0 = pixelX(i0, width, pixel_nm);
    const y0 = pixelX(j0, height, pixel_nm);
    let anyNear = false;
    for (let k = 0; k < K; k++) {
      const v = cores !== null && cores.near(pixelX(i0 + k * di, width, pixel_nm), pixelX(j0 + k * dj, height, pixel_nm), margin);
      isNear[k] = v ? 1 : 0;
      anyNear ||= v;
    }
    if (!anyNear) {
      windows(amp, x0, y0, K);
      for (let k = 0; k < K; k++) {
        const pixel = (j0 + k * dj) * width + (i0 + k * di);
        bf[pixel] = amp[4 * k] * amp[4 * k] + amp[4 * k + 1] * amp[4 * k + 1];
        df[pixel] = amp[4 * k + 2] * amp[4 * k + 2] + amp[4 * k + 3] * amp[4 * k + 3];
      }
      columns += K;
      continue;
    }
    // pixels reaching a core: the S x S sub-columns over the pixel's area that lie outside every core
    // (as renderRows does), each offset a class of its own; the centre sub-column (S odd) is the pixel
    // centre, used alone by the other pixels. A sub-column's long column is integrated only when some
    // pixel of the class uses it (a class running inside a core uses none).
    const near = cores as NonNullable<typeof cores>;
    count.fill(0, 0, K);
    for (let q = 0; q < S; q++) {
      for (let r = 0; r < S; r++) {
        const ox = ((r + 0.5) / S - 0.5) * pixel_nm;
        const oy = ((q + 0.5) / S - 0.5) * pixel_nm;
        const centre = 2 * r + 1 === S && 2 * q + 1 === S;
        const o = (q * S + r) * maxK;
        for (let k = 0; k < K; k++) {
          let use = false;
          if (isNear[k] === 1) {
            use = !near.near(pixelX(i0 + k * di, width, pixel_nm) + ox, pixelX(j0 + k * dj, height, pixel_nm) + oy, 0);
            if (use) count[k]++;
          } else if (centre) {
            use = true;
            count[k] = 1;
          }
          uses[o + k] = use ? 1 : 0;
        }
      }
    }
    sumB.fill(0, 0, K);
    sumD.fill(0, 0, K);
    for (let q = 0; q < S; q++) {
      for (let r = 0; r < S; r++) {
        const o = (q * S + r) * maxK;
        // any member using this sub-column (a plain loop: subarray would allocate a view per call)
        let used = false;
        for (let k = 0; k < K && !used; k++) used = uses[o + k] === 1;
        if (!used) continue;
        windows(amp, x0 + ((r + 0.5) / S - 0.5) * pixel_nm, y0 + ((q + 0.5) / S - 0.5) * pixel_nm, K);
        for (let k = 0; k < K; k++) {
          if (uses[o + k] === 0) continue;
          sumB[k] += amp[4 * k] * amp[4 * k] + amp[4 * k + 1] * amp[4 * k + 1];
          sumD[k] += amp[4 * k + 2] * amp[4 * k + 2] + amp[4 * k + 3] * amp[4 * k + 3];
        }
      }
    }
    // pixels wholly inside a core: the mean of the two columns just outside it on either side of the line.
    // Those of a class are translates of each other (the line runs along the class), so when there are many
    // they come from two long columns of their own (a core's steep strain is then integrated once per
    // side, not once per pixel); otherwise, and for a pixel whose escape points are not the translates,
    // column by column
    let inCore = 0;
    let firstInCore = -1;
    for (let k = 0; k < K; k++) {
      if (count[k] === 0) {
        inCore++;
        if (firstInCore < 0) firstInCore = k;
      }
    }
    let shared = false;
    if (inCore * L > 2 * beams * ((K - 1) * plan.D + L)) {
      const xf = pixelX(i0 + firstInCore * di, width, pixel_nm);
      const yf = pixelX(j0 + firstInCore * dj, height, pixel_nm);
      near.escape(esc0, xf, yf);
      for (let e = 0; e < 4; e += 2) {
        esc0[e] -= xf;
        esc0[e + 1] -= yf;
      }
      windows(ampEsc1, x0 + esc0[0], y0 + esc0[1], K);
      windows(ampEsc2, x0 + esc0[2], y0 + esc0[3], K);
      shared = true;
    }
    for (let k = 0; k < K; k++) {
      if (count[k] !== 0) continue;
      const xk = pixelX(i0 + k * di, width, pixel_nm);
      const yk = pixelX(j0 + k * dj, height, pixel_nm);
      near.escape(esc, xk, yk);
      if (shared && sameEscape(esc, esc0, xk, yk, pixel_nm)) {
        for (const a of [ampEsc1, ampEsc2]) {
          sumB[k] += a[4 * k] * a[4 * k] + a[4 * k + 1] * a[4 * k + 1];
          sumD[k] += a[4 * k + 2] * a[4 * k + 2] + a[4 * k + 3] * a[4 * k + 3];
        }
      } else {
        single ??= columnEvaluator(job);
        for (let e = 0; e < 4; e += 2) {
          single.column(one, esc[e], esc[e + 1]);
          sumB[k] += one[0] * one[0] + one[1] * one[1];
          sumD[k] += one[2] * one[2] + one[3] * one[3];
        }
        columns += 2;
      }
      count[k] = 2;
    }
    for (let k = 0; k < K; k++) {
      const pixel = (j0 + k * dj) * width + (i0 + k * di);
      bf[pixel] = sumB[k] / count[k];
      df[pixel] = sumD[k] / count[k];
    }
    let nNear = 0;
    for (let k = 0; k < K; k++) nNear += isNear[k];
    columns += K + (S * S - 1) * nNear;
  }
  return { slices: windows.stats.slices, columns };
}

/**
 * For one job: a function that fills amp[4k..4k+3] (re phi0, im phi0, re phig, im phig) for the K
 * columns through (x0, y0) + k step, k = 0..K-1, from one long column.
 */
function classWindows(job: RenderJob, plan: TranslationPlan): ClassWindows {
  const { width, height, frame, g_cart, params, tol } = job;
  const L = frame.columnLength_nm;
  const field = buildField(job.model.fields);
  const surfaces = activeSurfaces(job);
  const mp: MatrixParams = { qr: 1 / params.xi_nm, qi: 1 / params.xiAbs_nm, s: params.s_per_nm, invXi0: 1 / params.xiAbs0_nm };
  const tolLen = (0.5 * tol) / L;
  const counters: StretchCounters = { slices: 0, forced: 0 };
  const [kx, ky, kz] = frame.ez;
  const { c0, betaPrime } = columnStrain(field, g_cart, frame.ez);
  const { D } = plan;
  const maxK = Math.max(width, height) + 1;
  // events: positions and codes (0 end of window k, 1 fault, 2 start of window k) sorted by (position, code)
  const events = longColumnEvents(surfaces, [], maxK);
  const { pos: evPos, code: evCode, ref: evRef, order, faultAlpha } = events;
  const nMaxEvents = evPos.length;
  const first = new Int32Array(maxK); // element index where window k starts
  const last = new Int32Array(maxK); // element index where window k ends (exclusive)
  const nMaxElements = nMaxEvents + 1;
  const E = new Float64Array(8 * nMaxElements);
  const F = new Float64Array(8 * nMaxElements);
  const B = new Float64Array(8);
  const T = new Float64Array(8);
  const run = (amp: Float64Array, x: number, y: number, K: number): void => {
    columnEntryPoint(c0, frame, x, y);
    const cx = c0[0];
    const cy = c0[1];
    const cz = c0[2];
    // events of this long column
    const n = events.collect(cx, cy, cz, frame.ez, K, D, L);
    // elements: stretches between consecutive events, and fault phases
    let m = 0;
    let zPrev = 0;
    let h = DEFAULT_MAX_SLICE_NM;
    for (let e = 0; e < n; e++) {
      const ev0 = order[e];
      const z = evPos[ev0];
      if (z > zPrev) {
        h = stretchMatrix(E, 8 * m, mp, zPrev, z, betaPrime, tolLen, h, DEFAULT_MAX_SLICE_NM, counters);
        m++;
        zPrev = z;
      }
      const code = evCode[ev0];
      if (code === WINDOW_END) last[evRef[ev0]] = m;
      else if (code === WINDOW_START) first[evRef[ev0]] = m;
      else {
        const a = faultAlpha[evRef[ev0]];
        setIdentity(E, 8 * m);
        E[8 * m + 6] = Math.cos(a);
        E[8 * m + 7] = Math.sin(a);
        m++;
      }
    }
    // sliding window products: front holds suffix products F[t] = E[frontEnd-1] ... E[t], back the product B of [frontEnd, backEnd)
    let frontEnd = 0;
    let backEnd = 0;
    setIdentity(B, 0);
    for (let k = 0; k < K; k++) {
      const a = first[k];
      const b = last[k];
      while (backEnd < b) {
        mulMatrix(T, 0, E, 8 * backEnd, B, 0);
        B.set(T);
        backEnd++;
      }
      if (a >= frontEnd) {
        // flip: the back's elements become the front (suffix products from the right)
        if (backEnd > frontEnd) {
          for (let i = 0; i < 8; i++) F[8 * (backEnd - 1) + i] = E[8 * (backEnd - 1) + i];
          for (let t = backEnd - 2; t >= frontEnd; t--) mulMatrix(F, 8 * t, F, 8 * (t + 1), E, 8 * t);
        }
        frontEnd = backEnd;
        setIdentity(B, 0);
      }
      // first column of B x F[a] (F[a] = identity when the front is empty at a)
      let f0r = 1, f0i = 0, f1r = 0, f1i = 0;
      if (a < frontEnd) {
        const o = 8 * a;
        f0r = F[o];
        f0i = F[o + 1];
        f1r = F[o + 4];
        f1i = F[o + 5];
      }
      amp[4 * k] = B[0] * f0r - B[1] * f0i + B[2] * f1r - B[3] * f1i;
      amp[4 * k + 1] = B[0] * f0i + B[1] * f0r + B[2] * f1i + B[3] * f1r;
      amp[4 * k + 2] = B[4] * f0r - B[5] * f0i + B[6] * f1r - B[7] * f1i;
      amp[4 * k + 3] = B[4] * f0i + B[5] * f0r + B[6] * f1i + B[7] * f1r;
    }
  };
  return Object.assign(run, { stats: counters });
}
