/**
 * Simulated visibility of one dislocation line (or one loop, loopContrast)
 * under one condition: a short strip of columns across the line (two-beam, the scenario's thickness, the
 * line's depth, the condition's s), integrated with the renderer's column
 * evaluator. The verdict follows the peak contrast |I - I_reference| / I_0
 * over the strip, bright or dark field, with I_0 the perfect crystal and
 * I_reference the same strip without strain fields: the perfect crystal, or
 * the fault that a partial bounds, so that a partial's verdict is about the
 * line, not about its fault.
 *
 * Thresholds (common practice, our choice): a line whose peak contrast is at
 * least 10 % is "visible"; 2 % to 10 % is "weak" (a faint line, easily lost in
 * noise or thickness fringes); below 2 % "invisible" (below what a micrograph
 * with ordinary noise and background shows).
 *
 * Columns inside a modified core (two core radii of a line: |b|, or core_nm)
 * are left out, as in the rendered images (imaging/cores.ts).
 */
import { dot } from '../math/vec3.js';
import { coreGeometry } from '../imaging/cores.js';
import type { DefectModel, DislocationFieldSpec, LoopFieldSpec } from '../imaging/fieldSpecs.js';
import { columnEvaluator, type RenderJob } from '../imaging/renderRows.js';
import type { ResolvedCondition } from '../imaging/resolveCondition.js';
import { background, twoBeamParams } from '../imaging/renderScenario.js';

export type SimulatedVerdict = 'visible' | 'weak' | 'invisible';

/** Peak contrast (LineContrast.bf, .df) at or above which a line is called visible (common practice, our choice). */
export const VISIBLE_CONTRAST = 0.1;
/** Peak contrast at or above which a line is called weak (below: invisible; common practice, our choice). */
export const WEAK_CONTRAST = 0.02;
/** Columns in the strip across the line. */
export const STRIP_COLUMNS = 96;
/** Integrator tolerance of the strip (intensity): well below WEAK_CONTRAST times any background that matters. */
export const STRIP_TOLERANCE = 1e-5;

export interface LineContrast {
  /** Peak |I - I_reference| / I_0 in bright and dark field over the strip. */
  readonly bf: number;
  readonly df: number;
  /** Smallest and largest 1 + (I - I_reference) / I_0 in bright field (I / I_0 for a perfect dislocation). */
  readonly bfRange: readonly [number, number];
  readonly verdict: SimulatedVerdict;
  /** The strip runs from -halfWidth_nm to +halfWidth_nm across the line (in the image plane); for a loop, the patch's half side. */
  readonly halfWidth_nm: number;
  readonly columns: number;
}

export function verdictOf(peak: number): SimulatedVerdict {
  return peak >= VISIBLE_CONTRAST ? 'visible' : peak >= WEAK_CONTRAST ? 'weak' : 'invisible';
}

/**
 * Contrast of `line` (one of model.fields) in the strip across it through its point, under condition c
 * (two-beam at c's s). The model may hold other fields (the other partial of a ribbon) and jump surfaces;
 * the reference strip keeps the surfaces and drops every field.
 */
export function lineContrast(c: ResolvedCondition, model: DefectModel, line: DislocationFieldSpec): LineContrast {
  const { ex, ey } = c.frame;
  const p = line.point_nm;
  const u = line.line;
  // image position of the line point (ex, ey, ez orthonormal) and the strip direction across the projected line
  const x0 = dot(p, ex);
  const y0 = dot(p, ey);
  let dx = -dot(u, ey);
  let dy = dot(u, ex);
  let dl = Math.hypot(dx, dy);
  if (dl < 1e-6) {
    // end-on line: across it along g
    dx = dot(c.g_cart, ex);
    dy = dot(c.g_cart, ey);
    dl = Math.hypot(dx, dy);
  }
  dx /= dl;
  dy /= dl;
  const halfWidth = Math.max(10, 0.5 * c.xi_nm);
  const points = new Float64Array(2 * STRIP_COLUMNS);
  for (let k = 0; k < STRIP_COLUMNS; k++) {
    const t = ((k + 0.5) / STRIP_COLUMNS - 0.5) * 2 * halfWidth;
    points[2 * k] = x0 + t * dx;
    points[2 * k + 1] = y0 + t * dy;
  }
  return peakContrast(c, model, model.surfaces, points, halfWidth);
}

/** Columns per side of the square patch over a loop. */
export const PATCH_COLUMNS = 25;

/**
 * Contrast of a loop (one of model.fields, kind 'loop') under condition c: a square patch of
 * PATCH_COLUMNS x PATCH_COLUMNS columns centred on the loop's projection, reaching max(5 nm, xi_g / 4)
 * beyond the loop's projected outline on every side. The reference is the perfect crystal (no fields,
 * no jump surfaces), so a fault the loop encloses counts as the loop's contrast: a microscopist calls a
 * Frank loop visible by its fringes as much as by its strain.
 */
export function loopContrast(c: ResolvedCondition, model: DefectModel, loop: LoopFieldSpec): LineContrast {
  const { points, halfWidth_nm } = loopPatch(c, loop);
  return peakContrast(c, model, [], points, halfWidth_nm);
}

/**
 * The patch over a loop under condition c: PATCH_COLUMNS x PATCH_COLUMNS image points (x, y interleaved, nm,
 * rows of constant y) centred on the loop's projection, reaching max(5 nm, xi_g / 4) beyond its projected
 * outline on every side.
 */
export function loopPatch(c: ResolvedCondition, loop: LoopFieldSpec): { points: Float64Array; halfWidth_nm: number } {
  const { ex, ey } = c.frame;
  const v = loop.vertices_nm;
  const m = v.length / 3;
  const xs = new Float64Array(m);
  const ys = new Float64Array(m);
  let cx = 0;
  let cy = 0;
  for (let i = 0; i < m; i++) {
    xs[i] = v[3 * i] * ex[0] + v[3 * i + 1] * ex[1] + v[3 * i + 2] * ex[2];
    ys[i] = v[3 * i] * ey[0] + v[3 * i + 1] * ey[1] + v[3 * i + 2] * ey[2];
    cx += xs[i] / m;
    cy += ys[i] / m;
  }
  let reach = 0;
  for (let i = 0; i < m; i++) reach = Math.max(reach, Math.abs(xs[i] - cx), Math.abs(ys[i] - cy));
  const halfWidth_nm = reach + Math.max(5, 0.25 * c.xi_nm);
  const n = PATCH_COLUMNS;
  const points = new Float64Array(2 * n * n);
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < n; i++) {
      points[2 * (j * n + i)] = cx + ((i + 0.5) / n - 0.5) * 2 * halfWidth_nm;
      points[2 * (j * n + i) + 1] = cy + ((j + 0.5) / n - 0.5) * 2 * halfWidth_nm;
    }
  }
  return { points, halfWidth_nm };
}

/**
 * Peak contrast of `model` over the columns at image points (x, y interleaved) under condition c, against
 * the same columns with no strain fields and only the jump surfaces `referenceSurfaces`; columns inside a
 * modified core are left out.
 */
function peakContrast(c: ResolvedCondition, model: DefectModel, referenceSurfaces: DefectModel['surfaces'], points: Float64Array, halfWidth: number): LineContrast {
  const job: RenderJob = { width: 1, height: 1, pixel_nm: 1, frame: c.frame, g_cart: c.g_cart, params: twoBeamParams(c), tol: STRIP_TOLERANCE, model };
  const full = columnEvaluator(job);
  // without jump surfaces every reference column is the perfect crystal
  const ref = referenceSurfaces.length === 0 ? null : columnEvaluator({ ...job, model: { fields: [], surfaces: referenceSurfaces } });
  const a = new Float64Array(4);
  const b = new Float64Array(4);
  const { bf: i0b, df: i0d } = background(job);
  const cores = coreGeometry(job);
  let bf = 0;
  let df = 0;
  let lo = Infinity;
  let hi = -Infinity;
  let columns = 0;
  for (let k = 0; k < points.length; k += 2) {
    const x = points[k];
    const y = points[k + 1];
    if (cores !== null && cores.near(x, y, 0)) continue;
    full.column(a, x, y);
    const ib = a[0] * a[0] + a[1] * a[1];
    const id = a[2] * a[2] + a[3] * a[3];
    let rb = i0b;
    let rd = i0d;
    if (ref !== null) {
      ref.column(b, x, y);
      rb = b[0] * b[0] + b[1] * b[1];
      rd = b[2] * b[2] + b[3] * b[3];
    }
    const q = 1 + (ib - rb) / i0b;
    lo = Math.min(lo, q);
    hi = Math.max(hi, q);
    bf = Math.max(bf, Math.abs(q - 1));
    df = Math.max(df, Math.abs(id - rd) / i0d);
    columns++;
  }
  return { bf, df, bfRange: [lo, hi], verdict: verdictOf(Math.max(bf, df)), halfWidth_nm: halfWidth, columns };
}
