/**
 * Simulated visibility of one dislocation line under one condition: a short
 * strip of columns across the line (two-beam, the scenario's thickness, the
 * line's depth, the condition's s), integrated with the renderer's column
 * evaluator. The verdict follows the peak relative contrast
 * |I / I_reference - 1| over the strip, bright or dark field, with
 * I_reference the same strip without the line's strain field (the perfect
 * crystal, or the fault that a partial bounds, so that a partial's verdict is
 * about the line, not about its fault).
 *
 * Thresholds (common practice, our choice): a line whose peak contrast is at
 * least 10 % is "visible"; 2 % to 10 % is "weak" (a faint line, easily lost in
 * noise or thickness fringes); below 2 % "invisible" (below what a micrograph
 * with ordinary noise and background shows).
 *
 * Columns within two core radii of the line (|b|, or core_nm) are left out: there
 * the column approximation and linear elasticity do not hold (README).
 */
import type { Vec3 } from '../math/vec3.js';
import { cross, dot, norm } from '../math/vec3.js';
import type { DefectModel, DislocationFieldSpec } from '../imaging/fieldSpecs.js';
import { columnEvaluator, type RenderJob } from '../imaging/renderRows.js';
import type { ResolvedCondition } from '../imaging/resolveCondition.js';
import { twoBeamParams } from '../imaging/renderScenario.js';

export type SimulatedVerdict = 'visible' | 'weak' | 'invisible';

/** Peak |I / I_reference - 1| at or above which a line is called visible (common practice, our choice). */
export const VISIBLE_CONTRAST = 0.1;
/** Peak contrast at or above which a line is called weak (below: invisible; common practice, our choice). */
export const WEAK_CONTRAST = 0.02;
/** Columns in the strip across the line. */
export const STRIP_COLUMNS = 96;
/** Integrator tolerance of the strip (intensity): well below WEAK_CONTRAST times any background that matters. */
export const STRIP_TOLERANCE = 1e-5;

export interface LineContrast {
  /** Peak |I / I_reference - 1| in bright and dark field over the strip. */
  readonly bf: number;
  readonly df: number;
  /** Smallest and largest I / I_reference in bright field. */
  readonly bfRange: readonly [number, number];
  readonly verdict: SimulatedVerdict;
  /** The strip runs from -halfWidth_nm to +halfWidth_nm across the line (in the image plane). */
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
  const frame = c.frame;
  const job: RenderJob = { width: 1, height: 1, pixel_nm: 1, frame, g_cart: c.g_cart, params: twoBeamParams(c), tol: STRIP_TOLERANCE, model };
  const full = columnEvaluator(job);
  const ref = columnEvaluator({ ...job, model: { fields: [], surfaces: model.surfaces } });
  const { ex, ey, ez } = frame;
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
  const rc = line.coreRadius_nm ?? norm(line.b_nm);
  const n = cross(ez, u);
  const nl = norm(n);
  const a = new Float64Array(4);
  const b = new Float64Array(4);
  let bf = 0;
  let df = 0;
  let lo = Infinity;
  let hi = -Infinity;
  let columns = 0;
  for (let k = 0; k < STRIP_COLUMNS; k++) {
    const t = ((k + 0.5) / STRIP_COLUMNS - 0.5) * 2 * halfWidth;
    const x = x0 + t * dx;
    const y = y0 + t * dy;
    // distance of the column from the line (3D); the column runs along ez through (x, y)
    const w: Vec3 = [x * ex[0] + y * ey[0] - p[0], x * ex[1] + y * ey[1] - p[1], x * ex[2] + y * ey[2] - p[2]];
    const d = nl > 1e-9 ? Math.abs(dot(w, n)) / nl : norm(cross(w, u));
    if (d < 2 * rc) continue;
    full.column(a, x, y);
    ref.column(b, x, y);
    const ib = a[0] * a[0] + a[1] * a[1];
    const id = a[2] * a[2] + a[3] * a[3];
    const rb = b[0] * b[0] + b[1] * b[1];
    const rd = b[2] * b[2] + b[3] * b[3];
    const q = ib / rb;
    lo = Math.min(lo, q);
    hi = Math.max(hi, q);
    bf = Math.max(bf, Math.abs(q - 1));
    df = Math.max(df, Math.abs(id / rd - 1));
    columns++;
  }
  return { bf, df, bfRange: [lo, hi], verdict: verdictOf(Math.max(bf, df)), halfWidth_nm: halfWidth, columns };
}
