/**
 * Transfer matrices of stretches of a two-beam column (the 2 x 2 complex
 * matrix that takes (phi0, phig) at depth a to depth b), by the same adaptive
 * fourth-order Magnus slicing as twoBeamColumn.ts (Simpson samples of beta'
 * shared between a trial, its halves and the next slice; step doubling),
 * applied to the matrix instead of one amplitude vector. Used by the translation method
 * (src/imaging/translationColumns.ts), where one long column serves many
 * image columns and the matrix of every stretch between window ends is kept.
 *
 * A matrix is 8 numbers (re t00, im t00, re t01, im t01, re t10, im t10,
 * re t11, im t11) in a Float64Array at some offset. Step control: a slice of
 * length h is accepted when |two halves - one step|_F / 15 <= tolLen h, the
 * Frobenius norm bounding the error on any unit amplitude vector, so the
 * error of a window of length L built from such stretches stays below
 * tolLen L (the slab matrices are contractions, exactly unitary without
 * absorption), the same bound as the column integrator's.
 */
import { slabMatrix } from './twoBeamKernel.js';
import { CONTROLLER_SAFETY, END_NUDGE_NM, MIN_SLICE_NM, MAX_SLICES, SIMPSON_EPS_K } from './twoBeamColumn.js';

/** out[o..o+7] = a[ao..] x b[bo..] (2 x 2 complex). out may not alias a or b. */
export function mulMatrix(out: Float64Array, o: number, a: Float64Array, ao: number, b: Float64Array, bo: number): void {
  const a0r = a[ao], a0i = a[ao + 1], a1r = a[ao + 2], a1i = a[ao + 3];
  const a2r = a[ao + 4], a2i = a[ao + 5], a3r = a[ao + 6], a3i = a[ao + 7];
  const b0r = b[bo], b0i = b[bo + 1], b1r = b[bo + 2], b1i = b[bo + 3];
  const b2r = b[bo + 4], b2i = b[bo + 5], b3r = b[bo + 6], b3i = b[bo + 7];
  out[o] = a0r * b0r - a0i * b0i + a1r * b2r - a1i * b2i;
  out[o + 1] = a0r * b0i + a0i * b0r + a1r * b2i + a1i * b2r;
  out[o + 2] = a0r * b1r - a0i * b1i + a1r * b3r - a1i * b3i;
  out[o + 3] = a0r * b1i + a0i * b1r + a1r * b3i + a1i * b3r;
  out[o + 4] = a2r * b0r - a2i * b0i + a3r * b2r - a3i * b2i;
  out[o + 5] = a2r * b0i + a2i * b0r + a3r * b2i + a3i * b2r;
  out[o + 6] = a2r * b1r - a2i * b1i + a3r * b3r - a3i * b3i;
  out[o + 7] = a2r * b1i + a2i * b1r + a3r * b3i + a3i * b3r;
}

export function setIdentity(m: Float64Array, o: number): void {
  m.fill(0, o, o + 8);
  m[o] = 1;
  m[o + 6] = 1;
}

// scratch: [0..7] accumulated, [8..15] one-step trial, [16..23] first half,
// [24..31] second half, [32..39] two halves, [40..47] product temp
const S = new Float64Array(48);

/** Two-beam constants of a stretch integration. */
export interface MatrixParams {
  readonly qr: number;
  readonly qi: number;
  readonly s: number;
  readonly invXi0: number;
}

export interface StretchCounters {
  slices: number;
  forced: number;
}

/**
 * The transfer matrix of the stretch [a, b] of a column with beta'(z) (any z,
 * also outside the foil: the caller maps depths), into out[o..o+7].
 * hStart: first trial slice; returns the suggested next slice length.
 */
export function stretchMatrix(
  out: Float64Array,
  o: number,
  p: MatrixParams,
  a: number,
  b: number,
  f: (z: number) => number,
  tolLen: number,
  hStart: number,
  hMax: number,
  counters: StretchCounters,
): number {
  const { qr, qi, s, invXi0 } = p;
  setIdentity(S, 0);
  let h = Math.min(hStart, hMax);
  let used = 0;
  // Simpson samples as in twoBeamColumn.ts: the value at a is the previous slice's end; the stretch's two ends are sampled just inside
  const nudge = Math.min(END_NUDGE_NM, 1e-3 * (b - a));
  let fa = f(a + nudge);
  while (a < b) {
    const rest = b - a;
    if (h > rest || rest - h < MIN_SLICE_NM) h = rest;
    let last = h === rest;
    if (used + 2 > MAX_SLICES) {
      const cm = f(a + 0.5 * rest);
      const ce = f(b - nudge);
      slabMatrix(S, 8, qr, qi, s + (fa + 4 * cm + ce) / 6, 0, rest, invXi0);
      accept(8);
      counters.slices += 1;
      counters.forced += 1;
      break;
    }
    let fq1 = f(a + 0.25 * h);
    let fm = f(a + 0.5 * h);
    let fq3 = f(a + 0.75 * h);
    let fe = f(last ? b - nudge : a + h);
    let haveFull = false;
    for (;;) {
      const hh = 0.5 * h;
      if ((fa + fq1 + fm + fq3 + fe) - (fa + fq1 + fm + fq3 + fe) !== 0) {
        throw new RangeError(`stretchMatrix: beta'(z) is not finite near z = ${a} nm`);
      }
      if (fa === fq1 && fa === fm && fa === fq3 && fa === fe) {
        if (!haveFull) slabMatrix(S, 8, qr, qi, s + fa, 0, h, invXi0);
        accept(8);
        a = last ? b : a + h;
        fa = fe;
        used += 1;
        counters.slices += 1;
        h = Math.min(4 * h, hMax);
        break;
      }
      const m1 = (fa + 4 * fq1 + fm) / 6;
      const m2 = (fm + 4 * fq3 + fe) / 6;
      if (!haveFull) slabMatrix(S, 8, qr, qi, s + (fa + 4 * fm + fe) / 6, SIMPSON_EPS_K * h * (fe - fa), h, invXi0);
      slabMatrix(S, 16, qr, qi, s + m1, SIMPSON_EPS_K * hh * (fm - fa), hh, invXi0);
      slabMatrix(S, 24, qr, qi, s + m2, SIMPSON_EPS_K * hh * (fe - fm), hh, invXi0);
      mulMatrix(S, 32, S, 24, S, 16);
      let e2 = 0;
      for (let k = 0; k < 8; k++) {
        const d = S[32 + k] - S[8 + k];
        e2 += d * d;
      }
      const err = Math.sqrt(e2) / 15;
      const tolLocal = tolLen * h;
      if (err <= tolLocal) {
        accept(32);
        a = last ? b : a + h;
        fa = fe;
        used += 2;
        counters.slices += 2;
        let fac = err > 0 ? CONTROLLER_SAFETY * Math.sqrt(Math.sqrt(tolLocal / err)) : 4;
        if (fac > 4) fac = 4;
        else if (fac < 0.25) fac = 0.25;
        h = Math.min(Math.max(h * fac, MIN_SLICE_NM), hMax);
        break;
      }
      if (hh < MIN_SLICE_NM || used + 4 > MAX_SLICES) {
        slabMatrix(S, 16, qr, qi, s + m1, 0, hh, invXi0);
        slabMatrix(S, 24, qr, qi, s + m2, 0, hh, invXi0);
        mulMatrix(S, 32, S, 24, S, 16);
        accept(32);
        a = last ? b : a + h;
        fa = fe;
        used += 2;
        counters.slices += 2;
        counters.forced += 1;
        h = Math.min(Math.max(h, MIN_SLICE_NM), hMax);
        break;
      }
      // reject: halve, the first half becomes the one-step trial
      h = hh;
      last = false;
      fe = fm;
      fm = fq1;
      fq1 = f(a + 0.25 * h);
      fq3 = f(a + 0.75 * h);
      for (let k = 0; k < 8; k++) S[8 + k] = S[16 + k];
      haveFull = true;
    }
  }
  for (let k = 0; k < 8; k++) out[o + k] = S[k];
  return h;
}

/** S[0..7] = S[from..from+7] x S[0..7] (the new slice acts after the accumulated ones). */
function accept(from: number): void {
  mulMatrix(S, 40, S, from, S, 0);
  for (let k = 0; k < 8; k++) S[k] = S[40 + k];
}
