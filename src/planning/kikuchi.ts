/**
 * The deviation parameter s of a reflection g from its Kikuchi lines.
 *
 * Formula (Williams & Carter 2009, Transmission Electron Microscopy, chapter
 * on Kikuchi diffraction; Edington 1975; both from memory, physics.md section 6):
 *
 *     s = lambda g^2 x / R
 *
 * x: distance on the pattern from the g spot to its excess (bright) Kikuchi
 * line, R: distance from 000 to the g spot, both in the same units (mm on the
 * plate, pixels ...). Derivation: the pattern maps angles linearly, R <-> 2 thetaB
 * = lambda g, so the line sits Delta_theta = lambda g x / R away from the
 * Bragg position, and s = g Delta_theta (small angles).
 *
 * Sign (the project's convention, physics.md section 3: s > 0 when g lies
 * inside the Ewald sphere). Let theta be the angle between the incident beam
 * and the reflecting planes, measured so that the plane trace lies between
 * 000 and g. Then |k + g|^2 = k^2 - 2 k g sin(theta) + g^2 is below k^2, i.e.
 * g is inside the sphere and s > 0, exactly when theta > thetaB. The Kikuchi
 * lines are fixed to the crystal: the plane trace is theta away from 000
 * towards g, the excess line thetaB beyond it, i.e. at theta + thetaB from 000,
 * while the g spot stays at 2 thetaB. So the excess line lies
 * (theta - thetaB) beyond the spot: for s > 0 the excess line is OUTSIDE the
 * g spot (on the side away from 000), for s = 0 it runs through the spot, and
 * for s < 0 it lies between 000 and g. Give x > 0 for a line outside the spot
 * and x < 0 for a line inside (between 000 and g).
 */
import { InputError } from '../errors.js';

export interface KikuchiDeviation {
  readonly s_per_nm: number;
  /** Angle of the crystal from the exact Bragg position, radians (> 0: g inside the Ewald sphere). */
  readonly deltaTheta_rad: number;
}

/**
 * s from the Kikuchi line: x (signed, > 0 outside the spot), R (000 to g, same units),
 * lambda in nm, g in nm^-1.
 */
export function deviationFromKikuchi(x: number, R: number, lambda_nm: number, g_per_nm: number): KikuchiDeviation {
  if (!Number.isFinite(x)) throw new InputError(`the Kikuchi line distance ${x} is not a number; give the signed distance from the g spot to its excess line (positive outside the spot)`);
  if (!(R > 0) || !Number.isFinite(R)) throw new InputError(`the spot distance ${R} must be a positive distance from 000 to the g spot, in the units of the Kikuchi distance`);
  if (Math.abs(x) > R) throw new InputError(`the Kikuchi line distance |${x}| exceeds the spot distance ${R}; the line belongs to another reflection or the units differ`);
  const deltaTheta = (lambda_nm * g_per_nm * x) / R;
  return { s_per_nm: g_per_nm * deltaTheta, deltaTheta_rad: deltaTheta };
}

/**
 * s from the angle Delta_theta (radians) by which the crystal is turned from the exact
 * Bragg position (> 0: the angle between beam and planes exceeds thetaB, g inside the
 * Ewald sphere). Exact on the sphere: s = g (sin(thetaB + Delta_theta) - sin(thetaB)),
 * from s = -(2 k.g + g^2)/(2k) with k.g = -k g sin(theta) (physics.md section 3).
 */
export function deviationFromAngle(deltaTheta_rad: number, lambda_nm: number, g_per_nm: number): number {
  if (!Number.isFinite(deltaTheta_rad) || Math.abs(deltaTheta_rad) > 0.2) {
    throw new InputError(`the tilt from the Bragg position ${deltaTheta_rad} rad is not usable; give the angle in mrad, within +-200 mrad`);
  }
  const sB = (lambda_nm * g_per_nm) / 2;
  const thetaB = Math.asin(sB);
  return g_per_nm * (Math.sin(thetaB + deltaTheta_rad) - sB);
}
