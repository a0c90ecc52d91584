/**
 * Three- and four-index (Miller-Bravais) notation for hexagonal crystals.
 * Planes (hkl) <-> (hkil) with i = -(h+k).
 * Directions [UVW] <-> [uvtw] with u = (2U-V)/3, v = (2V-U)/3, t = -(u+v), w = W
 * (e.g. Hirth & Lothe 1982, ch. 1; Williams & Carter 2009, ch. 18).
 */
import type { Vec3 } from '../math/vec3.js';

export type Vec4 = readonly [number, number, number, number];

export function planeToFour(hkl: Vec3): Vec4 {
  return [hkl[0], hkl[1], -(hkl[0] + hkl[1]), hkl[2]];
}

/** Throws RangeError when i != -(h+k). */
export function planeFromFour(hkil: Vec4): Vec3 {
  if (Math.abs(hkil[0] + hkil[1] + hkil[2]) > 1e-9) throw new RangeError('in (hkil) the third index must equal -(h+k)');
  return [hkil[0], hkil[1], hkil[3]];
}

export function directionToFour(uvw: Vec3): Vec4 {
  const u = (2 * uvw[0] - uvw[1]) / 3;
  const v = (2 * uvw[1] - uvw[0]) / 3;
  return [u, v, -(u + v), uvw[2]];
}

/** Throws RangeError when t != -(u+v). */
export function directionFromFour(uvtw: Vec4): Vec3 {
  if (Math.abs(uvtw[0] + uvtw[1] + uvtw[2]) > 1e-9) throw new RangeError('in [uvtw] the third index must equal -(u+v)');
  return [uvtw[0] - uvtw[2], uvtw[1] - uvtw[2], uvtw[3]];
}
