/**
 * A straight dislocation crossing the foil, with its direction u from trace
 * analysis: its inclination to the foil surfaces and the consistency of its
 * measured projected length L with the foil thickness t (vector geometry, as
 * in src/planning/projectedWidth.ts: the line crosses the slab 0 <= r.N <= t
 * over t u / (u.N), and seen along the beam k its projection is
 * L = t |u - (u.k) k| / |u.N|).
 */
import type { Vec3 } from '../math/vec3.js';
import { dot, norm, scale, sub, unit } from '../math/vec3.js';
import { InputError } from '../errors.js';
import { type TraceFit, propagate } from './traces.js';

const DEG = Math.PI / 180;

export interface LengthInput {
  /** Beam direction of the micrograph on which L was measured (Cartesian). */
  readonly beam_cart: Vec3;
  /** Foil normal (Cartesian). */
  readonly normal_cart: Vec3;
  readonly length_nm: number;
  readonly lengthError_nm: number;
  /** Foil thickness (optional: without it only the implied thickness is given). */
  readonly thickness_nm?: number;
  readonly thicknessError_nm: number;
}

export interface LengthCheck {
  /** Angle between u and the foil surfaces, degrees (90: along the normal). */
  readonly inclination_deg: number;
  readonly inclinationError_deg: number;
  /** Angle between u and the beam of that micrograph, degrees. */
  readonly angleToBeam_deg: number;
  /** Ratio L / t for u: projected length per unit thickness. */
  readonly lengthPerThickness: number;
  /** Thickness implied by the measured length and u, with its one-sigma error. */
  readonly impliedThickness_nm: number;
  readonly impliedThicknessError_nm: number;
  /** With a stated thickness: the projected length u predicts, its error, and the normalised difference. */
  readonly predictedLength_nm?: number;
  readonly predictedLengthError_nm?: number;
  readonly z?: number;
  /** |z| <= 2 (two standard deviations; common practice). */
  readonly consistent?: boolean;
}

/** L / t for a line u, beam k, foil normal N (all unit Cartesian). */
export function lengthPerThickness(u: Vec3, k: Vec3, N: Vec3): number {
  return norm(sub(u, scale(k, dot(u, k)))) / Math.abs(dot(u, N));
}

export function lengthCheck(fit: TraceFit, x: LengthInput): LengthCheck {
  const k = unit(x.beam_cart);
  const N = unit(x.normal_cart);
  const u = fit.u_cart;
  if (Math.abs(dot(u, N)) < Math.sin(1 * DEG)) {
    throw new InputError('--length: the fitted line lies within 1 degree of the foil surfaces, so it does not cross the foil within a measurable length; check --normal or leave out --length');
  }
  if (norm(sub(u, scale(k, dot(u, k)))) < Math.sin(1 * DEG)) {
    throw new InputError('--length: the fitted line runs within 1 degree of that view\'s beam (seen end-on), so its projected length says nothing; measure the length on another view');
  }
  const r = lengthPerThickness(u, k, N);
  const rErr = propagate(fit, (v) => lengthPerThickness(v, k, N));
  const inc = Math.asin(Math.min(1, Math.abs(dot(u, N)))) / DEG;
  const incErr = propagate(fit, (v) => Math.asin(Math.min(1, Math.abs(dot(v, N)))) / DEG);
  const tImp = x.length_nm / r;
  const tImpErr = tImp * Math.hypot(x.lengthError_nm / x.length_nm, rErr / r);
  const base = {
    inclination_deg: inc,
    inclinationError_deg: incErr,
    angleToBeam_deg: Math.acos(Math.min(1, Math.abs(dot(u, k)))) / DEG,
    lengthPerThickness: r,
    impliedThickness_nm: tImp,
    impliedThicknessError_nm: tImpErr,
  };
  if (x.thickness_nm === undefined) return base;
  const Lp = r * x.thickness_nm;
  const LpErr = Math.hypot(rErr * x.thickness_nm, r * x.thicknessError_nm);
  const sd = Math.hypot(LpErr, x.lengthError_nm);
  const z = sd > 0 ? (x.length_nm - Lp) / sd : x.length_nm === Lp ? 0 : Infinity * Math.sign(x.length_nm - Lp);
  return { ...base, predictedLength_nm: Lp, predictedLengthError_nm: LpErr, z, consistent: Math.abs(z) <= 2 };
}
