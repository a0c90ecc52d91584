/**
 * The previous column integrator of twoBeamColumn.ts, kept as a baseline for
 * tests and benchmarks (test/imaging/columnIntegrator.test.ts,
 * test/imaging/inclusionColumns.test.ts, bench/columns.mjs); the renderer
 * uses it only when a job asks for it (RenderJob.gaussNodes).
 *
 * Same fourth-order Magnus step, step doubling and guards as integrateColumn
 * (controller safety factor 0.9, every slice matrix with its scalar factor),
 * but every trial slice samples beta' at the two
 * Gauss-Legendre nodes of the whole slice and of each half (Iserles &
 * Norsett 1999): six samples per trial, four new ones after a rejection, no
 * sample shared with a neighbouring trial. It never samples the end of a
 * slice.
 */
import type { TwoBeamParams } from './twoBeamParams.js';
import { stepSlice } from './twoBeamKernel.js';
import {
  checkFinite,
  copy4,
  counters,
  driveColumn,
  MAX_SLICES,
  MIN_SLICE_NM,
  W,
  type ColumnStats,
} from './twoBeamColumn.js';

/** Two-point Gauss-Legendre nodes on [0, 1] and the commutator coefficient of the fourth-order Magnus step with them. */
const G1 = 0.5 - Math.sqrt(3) / 6;
const G2 = 0.5 + Math.sqrt(3) / 6;
const EPS_K = -(Math.sqrt(3) / 6) * Math.PI;

/** The Gauss-node integrator's longest slice (nm): 6 samples per 20 nm (see DEFAULT_MAX_SLICE_NM of twoBeamColumn.ts). */
export const GAUSS_MAX_SLICE_NM = 20;

/** integrateColumn with Gauss-Legendre sampling (same arguments and result contract). */
export function integrateColumnGaussNodes(
  out: Float64Array,
  p: TwoBeamParams,
  t_nm: number,
  betaPrime: (z_nm: number) => number,
  faults: Float64Array,
  tol: number,
  stats?: ColumnStats,
  maxSlice_nm: number = GAUSS_MAX_SLICE_NM,
): void {
  driveColumn(out, p, t_nm, betaPrime, faults, tol, stats, maxSlice_nm, gaussSegment);
}

function gaussSegment(
  a: number,
  end: number,
  hStart: number,
  qr: number,
  qi: number,
  s: number,
  invXi0: number,
  f: (z: number) => number,
  tolLen: number,
  hMax: number,
): number {
  let h = hStart;
  while (a < end) {
    const rest = end - a;
    if (h > rest || rest - h < MIN_SLICE_NM) h = rest;
    if (counters.slices + 2 > MAX_SLICES) {
      // out of budget: the rest of the segment as one forced plain slab
      const b1 = f(a + G1 * rest);
      const b2 = f(a + G2 * rest);
      counters.betaCalls += 2;
      checkFinite(b1 + b2, a);
      stepSlice(W, 0, qr, qi, s + 0.5 * (b1 + b2), 0, rest, invXi0);
      counters.slices += 1;
      counters.forced += 1;
      return hStart;
    }
    let b1 = f(a + G1 * h);
    let b2 = f(a + G2 * h);
    counters.betaCalls += 2;
    let haveFull = false; // W[4..7] holds the one-step trial already
    for (;;) {
      const hh = 0.5 * h;
      const b3 = f(a + G1 * hh);
      const b4 = f(a + G2 * hh);
      const b5 = f(a + hh + G1 * hh);
      const b6 = f(a + hh + G2 * hh);
      counters.betaCalls += 4;
      checkFinite(b1 + b2 + b3 + b4 + b5 + b6, a);
      if (b1 === b2 && b1 === b3 && b1 === b4 && b1 === b5 && b1 === b6) {
        // constant beta' over the slice: the slab matrix is exact
        if (haveFull) copy4(4, 0);
        else stepSlice(W, 0, qr, qi, s + b1, 0, h, invXi0);
        a += h;
        counters.slices += 1;
        h = Math.min(4 * h, hMax);
        break;
      }
      if (!haveFull) {
        copy4(0, 4);
        stepSlice(W, 4, qr, qi, s + 0.5 * (b1 + b2), EPS_K * h * (b2 - b1), h, invXi0);
      }
      copy4(0, 8);
      stepSlice(W, 8, qr, qi, s + 0.5 * (b3 + b4), EPS_K * hh * (b4 - b3), hh, invXi0);
      copy4(8, 12);
      stepSlice(W, 8, qr, qi, s + 0.5 * (b5 + b6), EPS_K * hh * (b6 - b5), hh, invXi0);
      const d0 = W[8] - W[4];
      const d1 = W[9] - W[5];
      const d2 = W[10] - W[6];
      const d3 = W[11] - W[7];
      const err = Math.sqrt(d0 * d0 + d1 * d1 + d2 * d2 + d3 * d3) / 15;
      const tolLocal = tolLen * h;
      if (err <= tolLocal) {
        copy4(8, 0);
        a += h;
        counters.slices += 2;
        let fac = err > 0 ? 0.9 * Math.sqrt(Math.sqrt(tolLocal / err)) : 4;
        if (fac > 4) fac = 4;
        else if (fac < 0.25) fac = 0.25;
        h = Math.min(Math.max(h * fac, MIN_SLICE_NM), hMax);
        break;
      }
      if (hh < MIN_SLICE_NM || counters.slices + 4 > MAX_SLICES) {
        // cannot refine further: accept two plain half slabs (Gauss-Legendre
        // mean of beta', no commutator term). The plain slab stays bounded
        // even where the Magnus correction of an unresolved slice would
        // overflow (err may then be NaN).
        stepSlice(W, 0, qr, qi, s + 0.5 * (b3 + b4), 0, hh, invXi0);
        stepSlice(W, 0, qr, qi, s + 0.5 * (b5 + b6), 0, hh, invXi0);
        a += h;
        counters.slices += 2;
        counters.forced += 1;
        h = Math.min(Math.max(h, MIN_SLICE_NM), hMax);
        break;
      }
      // reject (also when err is NaN): halve, the first half becomes the one-step trial
      counters.rejected += 1;
      h = hh;
      b1 = b3;
      b2 = b4;
      copy4(12, 4);
      haveFull = true;
    }
  }
  return h;
}
