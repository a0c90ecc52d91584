/**
 * Adaptive integration of one column through a strained foil with planar
 * faults (two-beam Howie-Whelan equations, "beta form", physics.md section 3).
 *
 * Slicing. Each trial slice [a, a + h] (h at most maxSlice_nm) is propagated
 * once with the fourth-order Magnus step of twoBeamKernel.ts and once as two
 * half slices (step doubling, Hairer, Norsett & Wanner, Solving ODEs I,
 * section II.4). For a method of order 4 the error of the two-half result is
 * |two halves - one step| / (2^4 - 1). A slice is accepted when that error is
 * below (tol / 2) * h / t (error per unit length, so the sum over the column
 * stays below tol / 2 in amplitude, i.e. about tol in intensity since
 * |d|phi|^2| <= 2 |phi| |d phi|). The next trial length follows the usual
 * controller h * 0.8 (tolLocal / err)^(1/4), clamped to [h/4, 4h] (0.8:
 * half the rejections of 0.9 at the same number of slices, measured on the
 * benchmark images). A rejected
 * slice is halved and its first half, already computed, becomes the new
 * single-step trial. The accepted result is the product of the two half-slice
 * matrices (no extrapolation), so without absorption every slice is unitary.
 *
 * Samples of beta' (Simpson nodes). The Magnus step needs the mean of beta'
 * over the slice and its first moment int beta'(z) (h - 2 (z - a)) dz (the
 * commutator term); both are taken by Simpson's rule (exact for beta' of
 * degree 3 and 2, so the step keeps order 4; twoBeamKernel.ts). A trial then
 * samples beta' at a, a + h/4, a + h/2, a + 3h/4 and a + h: the value at a is
 * the previous slice's end, and after a rejection the new trial's middle and
 * end are the old first quarter and middle, so a trial costs 4 new samples and
 * a rejection 2 (the Gauss-Legendre nodes used before cost 6 and 4:
 * twoBeamColumnGauss.ts keeps that integrator as a baseline). Because the
 * ends of a slice are sampled, a jump of beta' inside a slice is always seen;
 * the error estimate of a slice holding a jump stays above the tolerance down
 * to MIN_SLICE_NM, so jumps should be breakpoints (the renderer makes them
 * faults with a zero phase). The samples at the two ends of a stretch between
 * breakpoints sit END_NUDGE_NM inside it, so each side of a jump at a
 * breakpoint is sampled on its own side.
 *
 * Scalar factor. exp(Omega) of a slice is e^{-pi h/xi'0} e^{i pi h s_e}
 * times a matrix (twoBeamKernel.ts); the factor is the same for both
 * amplitudes, so the trial slices leave it out (stepSliceNoScalar): the
 * damping multiplies the state once per accepted slice (and the error
 * estimate), the phases are summed and applied at the exit surface, and the
 * one step and the two halves are compared with their phase difference
 * pi h (mean beta' of the one step - mean of the halves).
 *
 * A slice whose five samples of beta' are identical is treated as a slab of
 * constant s_e and propagated exactly in one piece, so a column far from any
 * defect (beta' = 0) costs ceil(t / maxSlice_nm) slab matrices.
 *
 * Guards: no slice is shorter than MIN_SLICE_NM (a slice at that length is
 * accepted whatever its error, counted in stats.forced); after MAX_SLICES
 * slices the rest of each segment is one forced slice. Forced slices are
 * plain slabs with the Simpson mean of beta' (no commutator term,
 * which can overflow with absorption on an unresolved slice). So a near-singular
 * beta' (a column through a dislocation core) returns finite values in
 * bounded time.
 *
 * What the integrator sees of beta' are its values at the nodes of the
 * trial slices: a feature much narrower than the node spacing whose tails
 * stay below the tolerance is not seen. Elastic fields of defects have
 * algebraic tails and are found when the slices are not too long (see
 * DEFAULT_MAX_SLICE_NM); a field cut off to exactly zero away from a defect
 * may not be.
 *
 * Planar faults (sign convention of the whole project).
 * With phig_A = phig exp(-i alpha(z)), alpha(z) = 2 pi g.R(z), the beta form
 *   dphi0/dz = -(pi/xi'0) phi0 + pi i q phig
 *   dphig/dz =  pi i q phi0 + [-(pi/xi'0) + 2 pi i (s + beta')] phig,
 *   beta' = d(g.R)/dz,
 * becomes the alpha form (the coupling carries the phase, as in Hirsch et
 * al. 1965)
 *   dphi0/dz   = -(pi/xi'0) phi0 + pi i q e^{+i alpha} phig_A
 *   dphig_A/dz =  pi i q e^{-i alpha} phi0 + [-(pi/xi'0) + 2 pi i s] phig_A,
 * because d(phig_A)/dz = e^{-i alpha} dphig/dz - i alpha' phig_A and
 * alpha' = 2 pi beta' cancels the beta' term (conversely phig = phig_A
 * e^{+2 pi i g.R} takes the alpha form to the beta form). In the beta form
 * a step of g.R by Delta at depth z0 is beta' = Delta delta(z - z0); across
 * it the term 2 pi i beta' phig dominates, so
 *   phig(z0+) = exp(2 pi i Delta) phig(z0-),  phi0 continuous,
 * i.e. the fault matrix in the beta form is
 *   F(alpha) = diag(1, e^{+i alpha}),  alpha = 2 pi g.(R_below - R_above),
 * R_below the displacement of the crystal on the exit side (larger z).
 * (In the alpha form the same fault appears as the coupling phases
 * e^{+-i alpha} below z0; the exit amplitudes of the two forms differ only by
 * the factor e^{i alpha(t)} on phig, which no intensity sees.)
 * test/dynamics/twoBeamFault.test.ts checks that a steep smooth ramp of g.R in
 * the beta form converges to F(alpha) and not to F(-alpha).
 */

import { checkThickness, checkTwoBeamParams, type TwoBeamParams } from './twoBeamParams.js';
import { applyFaultPhase, stepSlice, stepSliceNoScalar } from './twoBeamKernel.js';

/** Counters added to (not reset) by integrateColumn. */
export interface ColumnStats {
  /** slab matrices in the accepted product (one per accepted slice) */
  slices: number;
  /** rejected trial slices */
  rejected?: number;
  /** calls of beta' */
  betaCalls?: number;
  /** slices accepted without meeting the tolerance (MIN_SLICE_NM or MAX_SLICES reached) */
  forced?: number;
}

/** Shortest slice the integrator uses (nm). */
export const MIN_SLICE_NM = 1e-4;
/**
 * Slice budget of a column: once it is spent, the rest of each segment is
 * one forced slice (so at most MAX_SLICES + number of faults slices).
 */
export const MAX_SLICES = 4000;
/**
 * Longest slice (nm), the default of integrateColumn and what the renderer's
 * columns and shared long columns use. It bounds the spacing of the beta'
 * samples, so that the tail of a narrow peak of beta' (a column passing within
 * ~0.1 nm of a dislocation line) is seen and refined: 4 new samples per 13 nm,
 * the density of the Gauss-node integrator's 6 per 20 nm (twoBeamColumnGauss.ts,
 * which keeps 20 nm). A peak much narrower than the sample spacing with a small
 * area can still fall between samples: on random sums of 1-3 Lorentzian peaks
 * (bench/columns.mjs, 450 columns x 4 tolerances against fixed-step RK4) this
 * integrator with 13 nm missed the tolerance on 32 and the Gauss-node one with
 * 20 nm on 27 of the 1800 column-tolerance pairs with widths down to 0.01 nm,
 * 1 and 1 from 0.1 nm up (the renderer never integrates through a modified
 * core, cores.ts, so its peaks are wider); with 20 nm this integrator missed
 * 1.6x as often. 13 instead of 20 nm costs no measurable time on the benchmark
 * images (few slices reach the bound; fewer rejections at the top of a column).
 */
export const DEFAULT_MAX_SLICE_NM = 13;

/** Safety factor of the step controller (shared with twoBeamMatrix.ts). */
export const CONTROLLER_SAFETY = 0.8;

/** One-sided samples at a stretch's ends: beta' may jump there (an inclusion's surface), so the end samples sit this far inside (nm; at most 1e-3 of the stretch). */
export const END_NUDGE_NM = 1e-7;

const PI = Math.PI;
/** The commutator coefficient of the fourth-order Magnus step with Simpson nodes: eps = SIMPSON_EPS_K h (beta'(a + h) - beta'(a)). */
export const SIMPSON_EPS_K = -PI / 6;

/**
 * Scratch of the column integrators: [0..3] state, [4..7] one-step trial,
 * [8..11] two-half trial, [12..15] state after the first half. Not
 * re-entrant (beta' must not call integrateColumn).
 */
export const W = new Float64Array(16);

/**
 * Integrates the column 0 <= z <= t_nm from phi0 = 1, phig = 0 and writes the
 * exit amplitudes (re phi0, im phi0, re phig, im phig) to out[0..3].
 * betaPrime(z) = d(g.R)/dz in nm^-1 along the column; faults = pairs
 * [z_nm, alpha_rad] sorted by z, alpha = 2 pi g.(R_below - R_above); faults
 * outside [0, t] do not cut the column. tol: target absolute error of the
 * intensities |phi0|^2, |phig|^2 (e.g. 1e-4). maxSlice_nm: upper bound on
 * the slice length (default DEFAULT_MAX_SLICE_NM; Infinity lets a smooth
 * column be one slice, at the risk of missing narrow peaks of beta').
 */
export function integrateColumn(
  out: Float64Array,
  p: TwoBeamParams,
  t_nm: number,
  betaPrime: (z_nm: number) => number,
  faults: Float64Array,
  tol: number,
  stats?: ColumnStats,
  maxSlice_nm: number = DEFAULT_MAX_SLICE_NM,
): void {
  driveColumn(out, p, t_nm, betaPrime, faults, tol, stats, maxSlice_nm, segment);
}

/**
 * Advances W[0..3] over [a, end] adaptively and returns the suggested length
 * of the next slice; counts into counters. Arguments: the first trial slice,
 * q = qr + i qi, s, 1/xi'_0, beta', the error per unit length, the longest slice.
 */
export type SegmentStepper = (
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
) => number;

/**
 * The column walk shared by integrateColumn and the previous integrator kept
 * as a reference (twoBeamColumnGauss.ts): checks the input, integrates each
 * stretch between faults with `step`, applies the fault phases.
 */
export function driveColumn(
  out: Float64Array,
  p: TwoBeamParams,
  t_nm: number,
  betaPrime: (z_nm: number) => number,
  faults: Float64Array,
  tol: number,
  stats: ColumnStats | undefined,
  maxSlice_nm: number,
  step: SegmentStepper,
): void {
  checkTwoBeamParams(p);
  checkThickness(t_nm);
  if (!(tol > 0) || tol === Infinity) {
    throw new RangeError(`integrateColumn: tol must be a finite positive number, got ${tol}`);
  }
  if (!(maxSlice_nm > 0)) {
    throw new RangeError(`integrateColumn: maxSlice_nm must be > 0, got ${maxSlice_nm}`);
  }
  if (faults.length % 2 !== 0) {
    throw new RangeError('integrateColumn: faults must hold pairs [z_nm, alpha_rad]');
  }
  for (let k = 0; k < faults.length; k += 2) {
    if (!Number.isFinite(faults[k]) || !Number.isFinite(faults[k + 1])) {
      throw new RangeError(`integrateColumn: fault ${k / 2} has a non-finite depth or phase`);
    }
    if (k > 0 && faults[k] < faults[k - 2]) {
      throw new RangeError('integrateColumn: faults must be sorted by depth');
    }
  }

  const qr = 1 / p.xi_nm;
  const qi = 1 / p.xiAbs_nm;
  const invXi0 = 1 / p.xiAbs0_nm;
  const s = p.s_per_nm;
  const tolLen = t_nm > 0 ? (0.5 * tol) / t_nm : 0;

  W[0] = 1;
  W[1] = 0;
  W[2] = 0;
  W[3] = 0;
  counters.slices = 0;
  counters.rejected = 0;
  counters.betaCalls = 0;
  counters.forced = 0;
  counters.phase = 0;

  let z = 0;
  let hCarry = maxSlice_nm;
  for (let k = 0; k < faults.length; k += 2) {
    const zf = faults[k];
    if (zf < 0) continue;
    if (zf > t_nm) break;
    if (zf > z) hCarry = step(z, zf, hCarry, qr, qi, s, invXi0, betaPrime, tolLen, maxSlice_nm);
    z = zf;
    // F(alpha) = diag(1, e^{+i alpha}) on (phi0, phig): see the header.
    applyFaultPhase(W, faults[k + 1]);
  }
  if (t_nm > z) step(z, t_nm, hCarry, qr, qi, s, invXi0, betaPrime, tolLen, maxSlice_nm);

  // the phases e^{i pi h s_e} of the slices that left them out (a common factor of both amplitudes)
  const cp = Math.cos(counters.phase);
  const sp = Math.sin(counters.phase);
  out[0] = cp * W[0] - sp * W[1];
  out[1] = cp * W[1] + sp * W[0];
  out[2] = cp * W[2] - sp * W[3];
  out[3] = cp * W[3] + sp * W[2];
  if (!(Number.isFinite(out[0] + out[1] + out[2] + out[3]))) {
    throw new RangeError('integrateColumn: the amplitudes are not finite (check the reflection parameters)');
  }
  if (stats) {
    stats.slices += counters.slices;
    stats.rejected = (stats.rejected ?? 0) + counters.rejected;
    stats.betaCalls = (stats.betaCalls ?? 0) + counters.betaCalls;
    stats.forced = (stats.forced ?? 0) + counters.forced;
  }
}

/** Counters of the column being integrated (reset by driveColumn, added to the caller's stats at the end). */
export const counters = { slices: 0, rejected: 0, betaCalls: 0, forced: 0, phase: 0 };

/** Parameter block of stepSliceNoScalar: [qr, qi, se, eps, h]. */
const P = new Float64Array(5);

/** W[to..to+3] = W[from..from+3]. */
export function copy4(from: number, to: number): void {
  W[to] = W[from];
  W[to + 1] = W[from + 1];
  W[to + 2] = W[from + 2];
  W[to + 3] = W[from + 3];
}

/**
 * Integrates W[0..3] over [a, end] adaptively; returns the suggested length
 * of the next slice. Simpson nodes: a trial slice [a, a + h] samples beta' at
 * a, a + h/4, a + h/2, a + 3h/4, a + h; the value at a is the previous
 * trial's end, and after a rejection the new trial's end and middle are the
 * old middle and first quarter, so a trial costs 4 new samples and a
 * rejection 2.
 */
function segment(
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
  const nudge = Math.min(END_NUDGE_NM, 1e-3 * (end - a));
  let fa = f(a + nudge);
  counters.betaCalls += 1;
  P[0] = qr;
  P[1] = qi;
  let h = hStart;
  while (a < end) {
    const rest = end - a;
    if (h > rest || rest - h < MIN_SLICE_NM) h = rest;
    let last = h === rest; // this trial ends the segment: its end sample is one-sided
    if (counters.slices + 2 > MAX_SLICES) {
      // out of budget: the rest of the segment as one forced plain slab (Simpson mean of beta')
      const bm = f(a + 0.5 * rest);
      const be = f(end - nudge);
      counters.betaCalls += 2;
      checkFinite(fa + bm + be, a);
      stepSlice(W, 0, qr, qi, s + (fa + 4 * bm + be) / 6, 0, rest, invXi0);
      counters.slices += 1;
      counters.forced += 1;
      return hStart;
    }
    let fq1 = f(a + 0.25 * h);
    let fm = f(a + 0.5 * h);
    let fq3 = f(a + 0.75 * h);
    let fe = f(last ? end - nudge : a + h);
    counters.betaCalls += 4;
    // W[4..7]: the one-step trial without its scalar factor (twoBeamKernel.ts stepSliceNoScalar), mFull its mean beta'
    let haveFull = false;
    let mFull = 0;
    for (;;) {
      const hh = 0.5 * h;
      checkFinite(fa + fq1 + fm + fq3 + fe, a);
      // the damping e^{-pi h/xi'0} of this trial slice, applied once to the accepted result
      const damp = Math.exp(-PI * h * invXi0);
      if (fa === fq1 && fa === fm && fa === fq3 && fa === fe) {
        // constant beta' over the slice: the slab matrix is exact
        if (haveFull) acceptScaled(4, damp, h * (s + mFull));
        else stepSlice(W, 0, qr, qi, s + fa, 0, h, invXi0);
        a = last ? end : a + h;
        fa = fe;
        counters.slices += 1;
        h = Math.min(4 * h, hMax);
        break;
      }
      if (!haveFull) {
        mFull = (fa + 4 * fm + fe) / 6;
        copy4(0, 4);
        P[2] = s + mFull;
        P[3] = SIMPSON_EPS_K * h * (fe - fa);
        P[4] = h;
        stepSliceNoScalar(W, 4, P);
      }
      const m1 = (fa + 4 * fq1 + fm) / 6;
      const m2 = (fm + 4 * fq3 + fe) / 6;
      copy4(0, 8);
      P[2] = s + m1;
      P[3] = SIMPSON_EPS_K * hh * (fm - fa);
      P[4] = hh;
      stepSliceNoScalar(W, 8, P);
      copy4(8, 12);
      P[2] = s + m2;
      P[3] = SIMPSON_EPS_K * hh * (fe - fm);
      stepSliceNoScalar(W, 8, P);
      // the two results differ also in their phases e^{i pi h se}: the one step's minus the halves' is pi h (mFull - (m1 + m2)/2)
      const dth = PI * h * (mFull - 0.5 * (m1 + m2));
      const c = Math.cos(dth);
      const sn = Math.sin(dth);
      const d0 = W[8] - (c * W[4] - sn * W[5]);
      const d1 = W[9] - (c * W[5] + sn * W[4]);
      const d2 = W[10] - (c * W[6] - sn * W[7]);
      const d3 = W[11] - (c * W[7] + sn * W[6]);
      const err = (damp * Math.sqrt(d0 * d0 + d1 * d1 + d2 * d2 + d3 * d3)) / 15;
      const tolLocal = tolLen * h;
      if (err <= tolLocal) {
        acceptScaled(8, damp, hh * (2 * s + m1 + m2));
        a = last ? end : a + h;
        fa = fe;
        counters.slices += 2;
        let fac = err > 0 ? CONTROLLER_SAFETY * Math.sqrt(Math.sqrt(tolLocal / err)) : 4;
        if (fac > 4) fac = 4;
        else if (fac < 0.25) fac = 0.25;
        h = Math.min(Math.max(h * fac, MIN_SLICE_NM), hMax);
        break;
      }
      if (hh < MIN_SLICE_NM || counters.slices + 4 > MAX_SLICES) {
        // cannot refine further: accept two plain half slabs (Simpson mean of
        // beta', no commutator term). The plain slab stays bounded even where
        // the Magnus correction of an unresolved slice would overflow (err
        // may then be NaN).
        stepSlice(W, 0, qr, qi, s + m1, 0, hh, invXi0);
        stepSlice(W, 0, qr, qi, s + m2, 0, hh, invXi0);
        a = last ? end : a + h;
        fa = fe;
        counters.slices += 2;
        counters.forced += 1;
        h = Math.min(Math.max(h, MIN_SLICE_NM), hMax);
        break;
      }
      // reject (also when err is NaN): halve, the first half becomes the one-step trial
      counters.rejected += 1;
      h = hh;
      last = false;
      fe = fm;
      fm = fq1;
      fq1 = f(a + 0.25 * h);
      fq3 = f(a + 0.75 * h);
      counters.betaCalls += 2;
      copy4(12, 4);
      mFull = m1;
      haveFull = true;
    }
  }
  return h;
}

/**
 * W[0..3] = damp * W[from..from+3] (the damping of the accepted slice), and
 * the slice's phase pi * hse (hse = the integral of s_e over it) is added to
 * the column's deferred phase (applied by driveColumn at the exit surface).
 */
function acceptScaled(from: number, damp: number, hse: number): void {
  W[0] = damp * W[from];
  W[1] = damp * W[from + 1];
  W[2] = damp * W[from + 2];
  W[3] = damp * W[from + 3];
  counters.phase += PI * hse;
}

export function checkFinite(v: number, z: number): void {
  if (v - v !== 0) {
    throw new RangeError(`integrateColumn: beta'(z) is not finite near z = ${z} nm`);
  }
}
