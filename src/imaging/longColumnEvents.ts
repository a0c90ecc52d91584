/**
 * The events along one long column of the translation method: where each
 * member's window starts and ends, where the column crosses a fault or cut
 * surface, and (many beams) where it passes closest to a dislocation line;
 * sorted by depth, and at equal depth by code (window end 0, fault 1, window
 * start 2, line 3). Arrays are allocated once per job and reused per column.
 */
import type { Vec3 } from '../math/vec3.js';
import { closestApproachDepth, crossingDepth, type ActiveSurface } from './renderRows.js';

export const WINDOW_END = 0;
export const FAULT = 1;
export const WINDOW_START = 2;
export const LINE = 3;

export interface LongColumnEvents {
  /** Depth, code and reference (member k, surface or line index) of event i; `order` lists them sorted. */
  readonly pos: Float64Array;
  readonly code: Int32Array;
  readonly ref: Int32Array;
  readonly order: Int32Array;
  /** Phase of each surface as crossed by the current column (sign from the crossing direction). */
  readonly faultAlpha: Float64Array;
  /**
   * Collect the events of the long column entering at c (Cartesian nm) along k, for K members D apart
   * and columns of length L; returns the number of events (sorted into `order`).
   */
  collect(cx: number, cy: number, cz: number, k: Vec3, K: number, D: number, L: number): number;
}

export function longColumnEvents(surfaces: readonly ActiveSurface[], lines: readonly { p: Vec3; u: Vec3 }[], maxK: number): LongColumnEvents {
  const n = 2 * maxK + surfaces.length + lines.length;
  const pos = new Float64Array(n);
  const code = new Int32Array(n);
  const ref = new Int32Array(n);
  const order = new Int32Array(n);
  const faultAlpha = new Float64Array(surfaces.length);
  return {
    pos,
    code,
    ref,
    order,
    faultAlpha,
    collect(cx, cy, cz, k, K, D, L) {
      const [kx, ky, kz] = k;
      let ne = 0;
      for (let m = 0; m < K; m++) {
        pos[ne] = m * D + L;
        code[ne] = WINDOW_END;
        ref[ne++] = m;
        pos[ne] = m * D;
        code[ne] = WINDOW_START;
        ref[ne++] = m;
      }
      const zEnd = (K - 1) * D + L;
      for (let s = 0; s < surfaces.length; s++) {
        const f = surfaces[s];
        const zc = crossingDepth(f, cx, cy, cz, kx, ky, kz, zEnd);
        if (zc !== zc) continue; // NaN: no crossing
        faultAlpha[s] = f.kn > 0 ? f.alpha : -f.alpha;
        pos[ne] = zc;
        code[ne] = FAULT;
        ref[ne++] = s;
      }
      for (let d = 0; d < lines.length; d++) {
        const zc = closestApproachDepth(lines[d].p, lines[d].u, cx, cy, cz, kx, ky, kz, zEnd);
        if (zc !== zc) continue;
        pos[ne] = zc;
        code[ne] = LINE;
        ref[ne++] = d;
      }
      // stable insertion sort by (depth, code), in place: the same order as a stable sort with that comparator
      // (ties keep the index order), without the temporary copy and boxed keys of TypedArray sort with a comparator
      for (let i = 0; i < ne; i++) {
        const pv = pos[i];
        const cv = code[i];
        let j = i - 1;
        while (j >= 0) {
          const o = order[j];
          if (pos[o] > pv || (pos[o] === pv && code[o] > cv)) {
            order[j + 1] = o;
            j--;
          } else break;
        }
        order[j + 1] = i;
      }
      return ne;
    },
  };
}
