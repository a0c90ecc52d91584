/**
 * The per-column work: for every pixel of a band of rows, integrate the
 * two-beam Howie-Whelan equations down the column through the displacement
 * field, crossing fault planes and dislocation cuts with an exact phase step,
 * and store bright- and dark-field intensities. Pure computation on plain
 * data, so it runs the same in the main thread and in workers.
 */
import type { Vec3 } from '../math/vec3.js';
import { dot } from '../math/vec3.js';
import type { ImageFrame } from '../geometry/frames.js';
import { columnEntryPoint, pixelX } from '../geometry/frames.js';
import { integrateColumn, perfectCrystal, type TwoBeamParams } from '../dynamics/twoBeam.js';
import { rk4Column } from '../dynamics/rk4Reference.js';
import { DEFAULT_MAX_SLICE_NM } from '../dynamics/twoBeamColumn.js';
import { integrateColumnGaussNodes } from '../dynamics/twoBeamColumnGauss.js';
import type { ManyBeamInput } from '../dynamics/manyBeamStructureMatrix.js';
import { integrateColumnNProbe, integrateColumnNVectorProbe, prepareColumnSystem, prepareColumnSystemVector } from '../dynamics/manyBeam.js';
import { columnStrain, type ColumnStrain } from './columnStrain.js';
import { buildField, type DefectModel } from './fieldSpecs.js';
import { CORE_SUBSAMPLES, coreGeometry } from './cores.js';

export interface RenderJob {
  readonly width: number;
  readonly height: number;
  readonly pixel_nm: number;
  readonly frame: ImageFrame;
  /** g in the crystal Cartesian frame, nm^-1. */
  readonly g_cart: Vec3;
  readonly params: TwoBeamParams;
  /** Integrator tolerance (intensity). */
  readonly tol: number;
  readonly model: DefectModel;
  /** Baseline for benchmarks only: plain fixed-step RK4 with this many steps per column. */
  readonly rk4Steps?: number;
  /** Baseline for tests and benchmarks only: the previous two-beam column integrator (Gauss-Legendre samples, twoBeamColumnGauss.ts). */
  readonly gaussNodes?: boolean;
  /** Average pixels that reach a dislocation core over their area outside the core (default true; cores.ts). */
  readonly coreSupersample?: boolean;
  /** Present for a systematic row of more than two beams: the many-beam engine is used instead of the two-beam one. */
  readonly manyBeam?: ManyBeamJob;
  /**
   * false: integrate every column on its own even where columns of straight defects could share one long
   * column (translationColumns.ts); default true (chosen automatically where it applies).
   */
  readonly shareColumns?: boolean;
}

export interface ManyBeamJob {
  readonly input: ManyBeamInput;
  /** Order n of every beam (beam j is n_j g). */
  readonly orders: Float64Array;
  /** Index of the transmitted beam and of the beam g. */
  readonly incident: number;
  readonly darkField: number;
  /** A general beam set: the Cartesian beam vectors g_j (N x 3, nm^-1); `orders` is then unused. */
  readonly beamVectors?: Float64Array;
}

export interface RowStats {
  slices: number;
  columns: number;
}

/** A jump surface reduced to what one image needs: its phase and geometry. */
export interface ActiveSurface {
  /** alpha = 2 pi g.(R behind - R in front) for a column crossing along +normal. */
  readonly alpha: number;
  readonly p: Vec3;
  readonly n: Vec3;
  /** k . n */
  readonly kn: number;
  readonly halfPlane: boolean;
  readonly into: Vec3;
  /** R behind minus R in front for a crossing along +normal (nm). */
  readonly jump: Vec3;
  /**
   * Polygon only: the vertices on in-plane axes a1, a2 about p (interleaved u, v), else null;
   * a crossing counts only inside the polygon.
   */
  readonly poly: Float64Array | null;
  readonly a1: Vec3;
  readonly a2: Vec3;
}

/** In-plane coordinates of a polygon surface's vertices on axes a1, a2 (a1 any unit vector normal to n, a2 = n x a1). */
function polygonAxes(p: Vec3, n: Vec3, v: readonly number[]): { poly: Float64Array; a1: Vec3; a2: Vec3 } {
  const ax = Math.abs(n[0]) <= Math.abs(n[1]) && Math.abs(n[0]) <= Math.abs(n[2]) ? 0 : Math.abs(n[1]) <= Math.abs(n[2]) ? 1 : 2;
  const e: [number, number, number] = [0, 0, 0];
  e[ax] = 1;
  const d = dot(e, n);
  const r: Vec3 = [e[0] - d * n[0], e[1] - d * n[1], e[2] - d * n[2]];
  const rl = Math.hypot(r[0], r[1], r[2]);
  const a1: Vec3 = [r[0] / rl, r[1] / rl, r[2] / rl];
  const a2: Vec3 = [n[1] * a1[2] - n[2] * a1[1], n[2] * a1[0] - n[0] * a1[2], n[0] * a1[1] - n[1] * a1[0]];
  const m = v.length / 3;
  const poly = new Float64Array(2 * m);
  for (let i = 0; i < m; i++) {
    const wx = v[3 * i] - p[0], wy = v[3 * i + 1] - p[1], wz = v[3 * i + 2] - p[2];
    poly[2 * i] = wx * a1[0] + wy * a1[1] + wz * a1[2];
    poly[2 * i + 1] = wx * a2[0] + wy * a2[1] + wz * a2[2];
  }
  return { poly, a1, a2 };
}

/** True when (u, v) lies inside the polygon (interleaved u, v vertices): crossing-number rule. */
function insidePolygon(poly: Float64Array, u: number, v: number): boolean {
  const m = poly.length / 2;
  let inside = false;
  for (let i = 0, j = m - 1; i < m; j = i++) {
    const ui = poly[2 * i], vi = poly[2 * i + 1];
    const uj = poly[2 * j], vj = poly[2 * j + 1];
    if (vi > v !== vj > v && u < ((uj - ui) * (v - vi)) / (vj - vi) + ui) inside = !inside;
  }
  return inside;
}

/** Surfaces whose phase is not a multiple of 2 pi and that columns actually cross. */
export function activeSurfaces(job: RenderJob): ActiveSurface[] {
  const k = job.frame.ez;
  const out: ActiveSurface[] = [];
  // a general beam set: other beams h may see a phase h.R even where g.R is an integer
  const keepAll = job.manyBeam?.beamVectors !== undefined;
  for (const s of job.model.surfaces) {
    const gR = dot(job.g_cart, s.jump_nm);
    if (!keepAll && Math.abs(gR - Math.round(gR)) < 1e-9) continue; // alpha = 2 pi n: invisible
    const kn = dot(k, s.normal);
    if (Math.abs(kn) < 1e-12) continue; // the beam runs within the plane: columns never cross it
    const pg = s.kind === 'polygon' ? polygonAxes(s.point_nm, s.normal, s.vertices_nm ?? []) : null;
    out.push({
      alpha: 2 * Math.PI * gR,
      p: s.point_nm,
      n: s.normal,
      kn,
      halfPlane: s.kind === 'half-plane',
      into: s.into ?? [0, 0, 0],
      jump: s.jump_nm,
      poly: pg === null ? null : pg.poly,
      a1: pg === null ? ZERO3 : pg.a1,
      a2: pg === null ? ZERO3 : pg.a2,
    });
  }
  return out;
}

/**
 * Depth z in (0, zMax) at which the column c + z k crosses surface f (for a
 * half-plane or a polygon: only on the half-plane or inside the polygon), or NaN when it does not.
 */
export function crossingDepth(f: ActiveSurface, cx: number, cy: number, cz: number, kx: number, ky: number, kz: number, zMax: number): number {
  const zc = ((f.p[0] - cx) * f.n[0] + (f.p[1] - cy) * f.n[1] + (f.p[2] - cz) * f.n[2]) / f.kn;
  if (!(zc > 0 && zc < zMax)) return NaN;
  if (f.halfPlane) {
    const t = (cx + zc * kx - f.p[0]) * f.into[0] + (cy + zc * ky - f.p[1]) * f.into[1] + (cz + zc * kz - f.p[2]) * f.into[2];
    if (t <= 0) return NaN;
  } else if (f.poly !== null) {
    const hx = cx + zc * kx - f.p[0], hy = cy + zc * ky - f.p[1], hz = cz + zc * kz - f.p[2];
    if (!insidePolygon(f.poly, hx * f.a1[0] + hy * f.a1[1] + hz * f.a1[2], hx * f.a2[0] + hy * f.a2[1] + hz * f.a2[2])) return NaN;
  }
  return zc;
}

/**
 * Depth z in (0, zMax) of the column c + z k's closest approach to the line
 * through p along unit u, or NaN when the column runs parallel to the line or
 * the closest approach lies outside.
 */
export function closestApproachDepth(p: Vec3, u: Vec3, cx: number, cy: number, cz: number, kx: number, ky: number, kz: number, zMax: number): number {
  const b = kx * u[0] + ky * u[1] + kz * u[2];
  const den = 1 - b * b;
  if (den < 1e-9) return NaN; // column parallel to the line
  const w0x = cx - p[0], w0y = cy - p[1], w0z = cz - p[2];
  const zc = (b * (u[0] * w0x + u[1] * w0y + u[2] * w0z) - (kx * w0x + ky * w0y + kz * w0z)) / den;
  return zc > 0 && zc < zMax ? zc : NaN;
}

/** Evaluates single columns of one job: amplitudes at the exit surface for the column through image point (x, y). */
export interface ColumnEvaluator {
  /** Writes (re phi0, im phi0, re phig, im phig) into out; returns nothing. */
  column(out: Float64Array, x: number, y: number): void;
  /**
   * The same for the image point (out[0], out[1]), read before out is written: nothing is boxed per call
   * (V8 boxes the double arguments of a call it does not inline). The renderer's per-pixel form.
   */
  columnAt(out: Float64Array): void;
  /** True when the job has no defect at all (every column is the perfect crystal). */
  readonly perfect: boolean;
  readonly stats: { slices: number };
}

export function columnEvaluator(job: RenderJob): ColumnEvaluator {
  const { frame, g_cart, params, tol } = job;
  const L = frame.columnLength_nm;
  const stats = { slices: 0 };
  const field = buildField(job.model.fields);
  const surfaces = activeSurfaces(job);
  const mb = job.manyBeam === undefined ? null : manyBeamColumn(job.manyBeam, tol);
  const vector = job.manyBeam?.beamVectors !== undefined;
  if (field === null && surfaces.length === 0) {
    const p = new Float64Array(4);
    if (mb === null) perfectCrystal(p, params, L);
    else mb.integrate(p, L, columnStrain(null, g_cart, frame.ez), new Float64Array(0));
    const columnAt = (out: Float64Array): void => {
      out.set(p);
      stats.slices++;
    };
    return { perfect: true, stats, column: columnAt, columnAt };
  }
  // beta'(z) = g . (grad R) . ez along the column r(z) = c0 + z ez (and dR/dz for general beam sets);
  // the column entry point lives in strain.c0 (a typed array: mutable closure variables would be boxed)
  const [kx, ky, kz] = frame.ez;
  const strain = columnStrain(field, g_cart, frame.ez);
  const { c0, betaPrime } = strain;
  // Many-beam only: each dislocation line's depth of closest approach is a breakpoint (a zero phase step),
  // so that the stepper restarts with a small step where the strain peaks.
  const lines = mb === null ? [] : job.model.fields.flatMap((f) => (f.kind === 'dislocation' ? [{ p: f.point_nm, u: f.line }] : []));
  // Both engines: beta' jumps where a column enters and leaves an inclusion sphere (the strain inside is
  // uniform, outside it is the Ashby-Brown 1/r^3 field), so both depths are breakpoints (zero phase steps).
  // A jump inside a slice is a first-order error: a step error estimate of 4th order misses it (many-beam) or
  // refines down to its shortest slice to meet the tolerance (two-beam, which samples the ends of its slices).
  const spheres = job.model.fields.flatMap((f) => (f.kind === 'inclusion' ? [{ c: f.centre_nm, r2: f.radius_nm * f.radius_nm }] : []));
  // Both engines: the plane of each loop is a breakpoint (a zero phase step) where a column crosses it, so that
  // the stepper restarts with a small step where the loop's strain peaks (the crossing inside the polygon is
  // also a phase step when g.b is not an integer; the two then sit at the same depth, which the engines allow).
  // Only near the loop (within LOOP_BREAK_RADII loop radii of its centre): elsewhere a restart costs steps and gains nothing.
  const loopPlanes = job.model.surfaces.flatMap((f) => (f.kind === 'polygon' ? [{ p: f.point_nm, n: f.normal, reach2: loopReach2(f.point_nm, f.vertices_nm ?? []) }] : []));
  const nMax = surfaces.length + lines.length + 2 * spheres.length + loopPlanes.length;
  // fault crossings of the current column: [z, alpha] pairs sorted by z, one array per count
  const stride = vector ? 4 : 2;
  const crossings = Array.from({ length: nMax }, (_, i) => new Float64Array(stride * (i + 1)));
  const none = new Float64Array(0);
  const zs = new Float64Array(nMax);
  const as = new Float64Array(nMax);
  const columnAt = (out: Float64Array): void => {
    columnEntryPoint(c0, frame, out[0], out[1]);
    const cx = c0[0];
    const cy = c0[1];
    const cz = c0[2];
    let count = 0;
    for (let s = 0; s < surfaces.length; s++) {
      const f = surfaces[s];
      const zc = crossingDepth(f, cx, cy, cz, kx, ky, kz, L);
      if (zc !== zc) continue; // NaN: no crossing
      // vector mode keeps the signed surface number (its jump is looked up below), else the phase
      zs[count] = zc;
      as[count] = vector ? (f.kn > 0 ? s + 1 : -(s + 1)) : f.kn > 0 ? f.alpha : -f.alpha;
      count = insertByDepth(zs, as, count);
    }
    for (let d = 0; d < lines.length; d++) {
      const zc = closestApproachDepth(lines[d].p, lines[d].u, cx, cy, cz, kx, ky, kz, L);
      if (zc === zc) {
        zs[count] = zc;
        as[count] = 0;
        count = insertByDepth(zs, as, count);
      }
    }
    for (let d = 0; d < spheres.length; d++) {
      // |c0 + z k - centre|^2 = r0^2  ->  z = -w.k +- sqrt((w.k)^2 - |w|^2 + r0^2), w = c0 - centre
      const { c, r2 } = spheres[d];
      const wx = cx - c[0], wy = cy - c[1], wz = cz - c[2];
      const wk = wx * kx + wy * ky + wz * kz;
      const disc = wk * wk - (wx * wx + wy * wy + wz * wz) + r2;
      if (!(disc > 0)) continue; // the column misses the sphere (or touches it)
      const root = Math.sqrt(disc);
      const z1 = -wk - root;
      const z2 = -wk + root;
      if (z1 > 0 && z1 < L) {
        zs[count] = z1;
        as[count] = 0;
        count = insertByDepth(zs, as, count);
      }
      if (z2 > 0 && z2 < L) {
        zs[count] = z2;
        as[count] = 0;
        count = insertByDepth(zs, as, count);
      }
    }
    for (let d = 0; d < loopPlanes.length; d++) {
      const { p, n, reach2 } = loopPlanes[d];
      const kn = kx * n[0] + ky * n[1] + kz * n[2];
      if (Math.abs(kn) < 1e-12) continue;
      const zc = ((p[0] - cx) * n[0] + (p[1] - cy) * n[1] + (p[2] - cz) * n[2]) / kn;
      if (!(zc > 0 && zc < L)) continue;
      const hx = cx + zc * kx - p[0], hy = cy + zc * ky - p[1], hz = cz + zc * kz - p[2];
      if (hx * hx + hy * hy + hz * hz < reach2) {
        zs[count] = zc;
        as[count] = 0;
        count = insertByDepth(zs, as, count);
      }
    }
    let faults = none;
    if (count > 0) {
      faults = crossings[count - 1];
      for (let q = 0; q < count; q++) {
        if (!vector) {
          faults[2 * q] = zs[q];
          faults[2 * q + 1] = as[q];
          continue;
        }
        const code = as[q];
        const jump = code === 0 ? ZERO3 : surfaces[Math.abs(code) - 1].jump;
        const sign = code < 0 ? -1 : 1;
        faults[4 * q] = zs[q];
        faults[4 * q + 1] = sign * jump[0];
        faults[4 * q + 2] = sign * jump[1];
        faults[4 * q + 3] = sign * jump[2];
      }
    }
    if (mb !== null) stats.slices += mb.integrate(out, L, strain, faults);
    else if (job.gaussNodes === true) integrateColumnGaussNodes(out, params, L, betaPrime, faults, tol, stats);
    else if (job.rk4Steps === undefined) integrateColumn(out, params, L, betaPrime, faults, tol, stats, DEFAULT_MAX_SLICE_NM);
    else {
      rk4Column(out, params, L, betaPrime, job.rk4Steps);
      stats.slices += job.rk4Steps;
    }
  };
  return {
    perfect: false,
    stats,
    column(out, x, y) {
      out[0] = x;
      out[1] = y;
      columnAt(out);
    },
    columnAt,
  };
}

/** Loop-plane breakpoints are added within this many loop radii of the loop's centre. */
const LOOP_BREAK_RADII = 3;

/** (LOOP_BREAK_RADII times the largest distance of a vertex from the centre)^2. */
function loopReach2(p: Vec3, v: readonly number[]): number {
  let r2 = 0;
  for (let i = 0; i + 2 < v.length; i += 3) r2 = Math.max(r2, (v[i] - p[0]) ** 2 + (v[i + 1] - p[1]) ** 2 + (v[i + 2] - p[2]) ** 2);
  return LOOP_BREAK_RADII * LOOP_BREAK_RADII * r2;
}

/**
 * Insert the entry (z, alpha) that the caller wrote at index `count` of zs/as into the first `count`
 * entries kept sorted by z; returns the new count. (Written there rather than passed: a double argument
 * is boxed when V8 does not inline the call, once per crossing of every column.)
 */
function insertByDepth(zs: Float64Array, as: Float64Array, count: number): number {
  const z = zs[count];
  const alpha = as[count];
  let q = count;
  while (q > 0 && zs[q - 1] > z) {
    zs[q] = zs[q - 1];
    as[q] = as[q - 1];
    q--;
  }
  zs[q] = z;
  as[q] = alpha;
  return count + 1;
}

/** Tolerance of the many-beam stepper per unit of the image tolerance (its tol is a local error per step). */
export const MANY_BEAM_TOL_FACTOR = 0.1;

/** A many-beam column integrator for one job: writes the transmitted and g amplitudes into out[0..3]. */
const ZERO3: Vec3 = [0, 0, 0];

function manyBeamColumn(mb: ManyBeamJob, tol: number) {
  const vector = mb.beamVectors !== undefined;
  const sys = vector
    ? prepareColumnSystemVector(mb.input, mb.beamVectors as Float64Array, { incident: mb.incident })
    : prepareColumnSystem(mb.input, mb.orders, { incident: mb.incident });
  const amp = new Float64Array(2 * mb.input.excitationErrors_per_nm.length);
  const t0 = 2 * mb.incident;
  const tg = 2 * mb.darkField;
  return {
    integrate(
      out: Float64Array,
      L: number,
      strain: ColumnStrain,
      faults: Float64Array,
    ): number {
      const steps = vector
        ? integrateColumnNVectorProbe(amp, sys, L, strain.dRdzProbe, tol * MANY_BEAM_TOL_FACTOR, faults)
        : integrateColumnNProbe(amp, sys, L, strain.betaProbe, tol * MANY_BEAM_TOL_FACTOR, faults);
      out[0] = amp[t0];
      out[1] = amp[t0 + 1];
      out[2] = amp[tg];
      out[3] = amp[tg + 1];
      return steps;
    },
  };
}

/**
 * Fill rows [row0, row1) of the image into bf and df (offset 0 = first pixel
 * of row0). Returns slice statistics. Pixels whose area reaches a dislocation
 * core are averaged over their area outside the core (see cores.ts).
 */
export function renderRows(job: RenderJob, row0: number, row1: number, bf: Float32Array, df: Float32Array): RowStats {
  const { width, height, pixel_nm } = job;
  const ev = columnEvaluator(job);
  const out = new Float64Array(4);
  const n = (row1 - row0) * width;
  if (ev.perfect) {
    ev.column(out, 0, 0);
    bf.fill(out[0] * out[0] + out[1] * out[1], 0, n);
    df.fill(out[2] * out[2] + out[3] * out[3], 0, n);
    return { slices: n, columns: n };
  }
  const cores = job.coreSupersample === false ? null : coreGeometry(job);
  const margin = Math.SQRT1_2 * pixel_nm;
  const S = CORE_SUBSAMPLES;
  const esc = new Float64Array(4);
  // the query of cores.nearAt: image point and margin (numbers go through arrays, see columnAt)
  const at = new Float64Array(3);
  let columns = 0;
  let k = 0;
  for (let j = row0; j < row1; j++) {
    const y = pixelX(j, height, pixel_nm);
    for (let i = 0; i < width; i++, k++) {
      const x = pixelX(i, width, pixel_nm);
      at[0] = x;
      at[1] = y;
      at[2] = margin;
      if (cores !== null && cores.nearAt(at)) {
        // average over the pixel's area outside the cores (S x S sub-columns; those inside a core are left out)
        let a = 0;
        let b = 0;
        let m = 0;
        for (let q = 0; q < S; q++) {
          for (let r = 0; r < S; r++) {
            const xs = x + ((r + 0.5) / S - 0.5) * pixel_nm;
            const ys = y + ((q + 0.5) / S - 0.5) * pixel_nm;
            at[0] = xs;
            at[1] = ys;
            at[2] = 0;
            if (cores.nearAt(at)) continue;
            out[0] = xs;
            out[1] = ys;
            ev.columnAt(out);
            a += out[0] * out[0] + out[1] * out[1];
            b += out[2] * out[2] + out[3] * out[3];
            m++;
          }
        }
        if (m === 0) {
          // the whole pixel lies in a core: the mean of the columns just outside it on either side of the line
          cores.escape(esc, x, y);
          for (let e = 0; e < 4; e += 2) {
            ev.column(out, esc[e], esc[e + 1]);
            a += out[0] * out[0] + out[1] * out[1];
            b += out[2] * out[2] + out[3] * out[3];
            m++;
          }
        }
        bf[k] = a / m;
        df[k] = b / m;
        columns += m;
      } else {
        out[0] = x;
        out[1] = y;
        ev.columnAt(out);
        bf[k] = out[0] * out[0] + out[1] * out[1];
        df[k] = out[2] * out[2] + out[3] * out[3];
        columns++;
      }
    }
  }
  return { slices: ev.stats.slices, columns };
}
