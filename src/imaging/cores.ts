/**
 * Dislocation cores in an image. Within the modified core (2 core radii of a
 * line; core radius core_nm, default |b|) linear elasticity and the column
 * approximation do not hold, and the computed intensity there changes on the
 * scale of 0.1 nm (narrow bright/dark lines that no microscope resolves).
 * The renderer therefore never shows a column that passes through a core:
 *
 * - a pixel whose area reaches a core is the average of S x S sub-columns
 *   over its area, leaving out the sub-columns inside a core;
 * - a pixel with every sub-column inside a core takes the mean of the two
 *   columns just outside the core, on either side of the nearest line;
 * - those pixels are listed in a mask (render.json and `<id>-core.png`).
 *
 * Pure geometry on plain data (no intensities), so the mask can be computed
 * apart from the rendering.
 */
import { cross } from '../math/vec3.js';
import { columnEntryPoint } from '../geometry/frames.js';
import { loopSegments } from '../elasticity/loopField.js';
import type { RenderJob } from './renderRows.js';

/** Sub-columns per axis averaged in a pixel whose area reaches a core. */
export const CORE_SUBSAMPLES = 3;
/** The modified core: columns closer than this many core radii to a line are inside it. */
export const CORE_RADII = 2;

interface CoreLine {
  readonly p: readonly number[];
  readonly u: readonly number[];
  /** unit normal of the plane spanned by the beam and the line (null for an end-on line) */
  readonly n: readonly number[] | null;
  /** radius of the modified core (nm) */
  readonly r: number;
  /** length of the line from p along u (nm): Infinity for a straight dislocation, the side length for a loop's segment */
  readonly len: number;
}

export interface CoreGeometry {
  /** True when the column through image point (x, y) passes within `margin` nm of a modified core inside the foil. */
  near(x: number, y: number, margin: number): boolean;
  /** near(p[0], p[1], p[2]) with the numbers in an array (nothing boxed per call; the renderer's per-pixel form). */
  nearAt(p: Float64Array): boolean;
  /**
   * For a column inside a core: writes into out the image points (x1, y1, x2, y2) of the two columns just
   * outside the core of the nearest line, on either side of it.
   */
  escape(out: Float64Array, x: number, y: number): void;
}

/** The cores of a job's dislocation lines, or null when it has none. */
export function coreGeometry(job: RenderJob): CoreGeometry | null {
  const { frame } = job;
  const k = frame.ez;
  const L = frame.columnLength_nm;
  const lines: CoreLine[] = job.model.fields.flatMap((f) => {
    if (f.kind !== 'dislocation') return [];
    const rc = f.coreRadius_nm ?? Math.hypot(f.b_nm[0], f.b_nm[1], f.b_nm[2]);
    const n = cross(k, f.line);
    const nl = Math.hypot(n[0], n[1], n[2]);
    return [{ p: f.point_nm, u: f.line, n: nl > 1e-9 ? [n[0] / nl, n[1] / nl, n[2] / nl] : null, r: CORE_RADII * rc, len: Infinity }];
  });
  // the sides of loop polygons: finite segments with the same core
  for (const f of job.model.fields) {
    if (f.kind !== 'loop') continue;
    const rc = f.coreRadius_nm ?? Math.hypot(f.b_nm[0], f.b_nm[1], f.b_nm[2]);
    for (const s of loopSegments(f.vertices_nm)) {
      const n = cross(k, s.u);
      const nl = Math.hypot(n[0], n[1], n[2]);
      lines.push({ p: s.p, u: s.u, n: nl > 1e-9 ? [n[0] / nl, n[1] / nl, n[2] / nl] : null, r: CORE_RADII * rc, len: s.length });
    }
  }
  if (lines.length === 0) return null;
  const [ex0, ex1, ex2] = frame.ex;
  const [ey0, ey1, ey2] = frame.ey;
  // Per-pixel code: the query (x, y, margin) comes in q and the results go out in w and res, so that no
  // double is passed to or returned from a helper (V8 boxes such a double when it does not inline the call).
  const w = new Float64Array(3);
  const q = new Float64Array(3);
  const res = new Float64Array(1);
  // offset of the column (q[0], q[1]) from line l: writes w = c0 - p and res[0] = the signed distance (w.n) or, end-on, the distance
  const offset = (l: CoreLine): void => {
    columnEntryPoint(w, frame, q[0], q[1]);
    w[0] -= l.p[0];
    w[1] -= l.p[1];
    w[2] -= l.p[2];
    if (l.n !== null) {
      res[0] = w[0] * l.n[0] + w[1] * l.n[1] + w[2] * l.n[2];
      return;
    }
    const t = w[0] * l.u[0] + w[1] * l.u[1] + w[2] * l.u[2];
    const ax = w[0] - t * l.u[0], ay = w[1] - t * l.u[1], az = w[2] - t * l.u[2];
    res[0] = Math.sqrt(ax * ax + ay * ay + az * az);
  };
  // res[0] = the distance of the column (q[0], q[1]) from line l's core when it passes within q[2] of it, else Infinity
  const reach = (l: CoreLine): void => {
    offset(l);
    const d = Math.abs(res[0]);
    if (l.len !== Infinity) {
      segmentReach(l);
      return;
    }
    const m = l.r + q[2];
    // depth of closest approach of the column to the line (the column runs along k from the entrance surface)
    let z = L / 2;
    if (l.n !== null) {
      const b = k[0] * l.u[0] + k[1] * l.u[1] + k[2] * l.u[2];
      z = (b * (l.u[0] * w[0] + l.u[1] * w[1] + l.u[2] * w[2]) - (k[0] * w[0] + k[1] * w[1] + k[2] * w[2])) / (1 - b * b);
    }
    res[0] = d < m && z > -m && z < L + m ? d : Infinity;
  };
  // a finite segment (w = c0 - p left by offset): res[0] = distance of the column from the nearest point of the segment
  const segmentReach = (l: CoreLine): void => {
    const m = l.r + q[2];
    const b = k[0] * l.u[0] + k[1] * l.u[1] + k[2] * l.u[2];
    const wu = w[0] * l.u[0] + w[1] * l.u[1] + w[2] * l.u[2];
    const wk = w[0] * k[0] + w[1] * k[1] + w[2] * k[2];
    const den = 1 - b * b;
    // parameter along the segment of the closest approach of the two lines, clamped to the segment
    let s = den < 1e-9 ? 0 : (wu - b * wk) / den;
    if (s < 0) s = 0;
    if (s > l.len) s = l.len;
    // the point p + s u, seen from the column c0 + z k: nearest column depth and distance
    const qx = l.p[0] + s * l.u[0] - (l.p[0] + w[0]);
    const qy = l.p[1] + s * l.u[1] - (l.p[1] + w[1]);
    const qz = l.p[2] + s * l.u[2] - (l.p[2] + w[2]);
    const z = qx * k[0] + qy * k[1] + qz * k[2];
    const ax = qx - z * k[0], ay = qy - z * k[1], az = qz - z * k[2];
    const d = Math.sqrt(ax * ax + ay * ay + az * az);
    res[0] = d < m && z > -m && z < L + m ? d : Infinity;
  };
  // whether the query in q reaches a core
  const nearQ = (): boolean => {
    for (let i = 0; i < lines.length; i++) {
      reach(lines[i]);
      if (res[0] < Infinity) return true;
    }
    return false;
  };
  return {
    near(x, y, margin) {
      q[0] = x;
      q[1] = y;
      q[2] = margin;
      return nearQ();
    },
    nearAt(p) {
      q[0] = p[0];
      q[1] = p[1];
      q[2] = p[2];
      return nearQ();
    },
    escape(out, x, y) {
      q[0] = x;
      q[1] = y;
      q[2] = 0;
      let best = lines[0];
      let bestD = Infinity;
      for (const l of lines) {
        reach(l);
        const d = res[0];
        if (d < bestD) {
          bestD = d;
          best = l;
        }
      }
      offset(best);
      const s = res[0];
      const r = best.r * (1 + 1e-6);
      // image-plane direction across the line, and the shifts that put the column at distance r on each side
      let dx: number;
      let dy: number;
      let a: number;
      let b: number;
      if (best.n !== null) {
        dx = best.n[0] * ex0 + best.n[1] * ex1 + best.n[2] * ex2;
        dy = best.n[0] * ey0 + best.n[1] * ey1 + best.n[2] * ey2;
        const side = s >= 0 ? 1 : -1;
        a = side * r - s;
        b = -side * r - s;
      } else {
        // end-on: radially away from the line in the image plane, and the opposite side
        dx = w[0] * ex0 + w[1] * ex1 + w[2] * ex2;
        dy = w[0] * ey0 + w[1] * ey1 + w[2] * ey2;
        const dl = Math.hypot(dx, dy);
        if (dl > 1e-12) {
          dx /= dl;
          dy /= dl;
        } else {
          dx = 1;
          dy = 0;
        }
        a = r - dl;
        b = -r - dl;
      }
      out[0] = x + a * dx;
      out[1] = y + a * dy;
      out[2] = x + b * dx;
      out[3] = y + b * dy;
    },
  };
}

/** The pixels of a job whose area reaches a core (1) and the others (0), row-major. */
export function coreMask(job: RenderJob): Uint8Array {
  const { width, height, pixel_nm } = job;
  const mask = new Uint8Array(width * height);
  const cores = coreGeometry(job);
  if (cores === null) return mask;
  const margin = Math.SQRT1_2 * pixel_nm;
  for (let j = 0, q = 0; j < height; j++) {
    const y = (j + 0.5 - height / 2) * pixel_nm;
    for (let i = 0; i < width; i++, q++) {
      if (cores.near((i + 0.5 - width / 2) * pixel_nm, y, margin)) mask[q] = 1;
    }
  }
  return mask;
}
