/**
 * Specimen holder geometry: which crystal direction lies along the beam for
 * a pair of holder tilts, and which tilts bring a given crystal direction
 * onto the beam.
 *
 * Frames and signs (fixed here for the whole planning code):
 *  - Microscope frame: Z along the beam, pointing the way the electrons
 *    travel (down the column, into the foil); X along the holder's primary
 *    tilt axis (the holder rod), pointing from the specimen tip towards the
 *    goniometer (the user names which crystal direction lies along +X at zero
 *    tilt); Y = Z x X (right-handed).
 *  - At zero tilt the foil normal lies along +Z (the foil is flat in the
 *    holder) and the chosen crystal direction, projected into the foil plane,
 *    along +X.
 *  - A positive tilt is a right-handed (counter-clockwise seen from the tip
 *    of the axis) rotation of the specimen about the axis.
 *  - Double tilt: the primary tilt alpha turns the specimen about the fixed
 *    X axis; the secondary tilt beta turns it about the cradle axis, which is
 *    Y at alpha = 0 and is carried round by alpha. The specimen rotation is
 *    R = R_X(alpha) R_Y(beta) (rotation about a carried axis = the fixed
 *    rotations in the opposite order).
 *  - Rotation holder: primary tilt alpha about X as above, then the specimen
 *    turns by gamma about its own foil normal (the cradle ring):
 *    R = R_X(alpha) R_Z(gamma).
 *
 * The crystal direction along the beam is then v = R^T Z, in the specimen's
 * zero-tilt frame:
 *    double tilt:   v = (-sin(beta) cos(alpha), sin(alpha), cos(beta) cos(alpha))
 *    rotation:      v = (sin(gamma) sin(alpha), cos(gamma) sin(alpha), cos(alpha))
 * and back: alpha = asin(v_Y), beta = atan2(-v_X, v_Z) (double tilt, |alpha| < 90);
 * alpha = +-acos(v_Z), gamma = atan2(+-v_X, +-v_Y) (rotation holder, two solutions).
 * Angles in degrees at the interface, radians inside.
 */
import type { Vec3 } from '../math/vec3.js';
import { cross, dot, norm, scale, sub, unit } from '../math/vec3.js';
import { InputError } from '../errors.js';

const DEG = Math.PI / 180;

export type HolderKind = 'double' | 'rotation';

export interface Holder {
  readonly kind: HolderKind;
  /** Primary tilt range alpha (degrees), [low, high]. */
  readonly primary_deg: readonly [number, number];
  /** Secondary tilt range beta (double tilt) or rotation range gamma (rotation holder), degrees. */
  readonly secondary_deg: readonly [number, number];
}

/** The specimen in the holder at zero tilt: unit Cartesian crystal vectors along the microscope X, Y, Z. */
export interface Orientation {
  readonly X: Vec3;
  readonly Y: Vec3;
  readonly Z: Vec3;
}

/** Tilt pair in degrees: primary alpha, secondary beta (or rotation gamma). */
export interface Tilts {
  readonly primary_deg: number;
  readonly secondary_deg: number;
}

/**
 * The orientation from the foil normal (along Z at zero tilt) and the crystal
 * direction along the primary tilt axis (projected into the foil plane), both
 * Cartesian crystal vectors. InputError when the axis is parallel to the normal.
 */
export function orientation(normal_cart: Vec3, axis_cart: Vec3): Orientation {
  const Z = unit(normal_cart);
  const along = sub(axis_cart, scale(Z, dot(axis_cart, Z)));
  if (norm(along) < 1e-9 * norm(axis_cart)) {
    throw new InputError('the primary tilt axis is parallel to the foil normal; give an axis direction lying in (or near) the foil plane');
  }
  const X = unit(along);
  return { X, Y: cross(Z, X), Z };
}

/** Beam direction in the zero-tilt microscope frame (components along X, Y, Z) for the given tilts. */
export function beamInSpecimenFrame(kind: HolderKind, t: Tilts): Vec3 {
  const a = t.primary_deg * DEG;
  const b = t.secondary_deg * DEG;
  if (kind === 'double') return [-Math.sin(b) * Math.cos(a), Math.sin(a), Math.cos(b) * Math.cos(a)];
  return [Math.sin(b) * Math.sin(a), Math.cos(b) * Math.sin(a), Math.cos(a)];
}

/** Unit Cartesian crystal vector along the beam (electron travel) at the given tilts. */
export function beamAtTilts(o: Orientation, kind: HolderKind, t: Tilts): Vec3 {
  const [x, y, z] = beamInSpecimenFrame(kind, t);
  return [x * o.X[0] + y * o.Y[0] + z * o.Z[0], x * o.X[1] + y * o.Y[1] + z * o.Z[1], x * o.X[2] + y * o.Y[2] + z * o.Z[2]];
}

const wrap = (deg: number) => {
  let d = ((deg + 180) % 360 + 360) % 360 - 180;
  if (d === -180) d = 180;
  return d + 0;
};

/**
 * Every tilt pair (degrees; primary in [-90, 90], secondary in (-180, 180]) that puts the
 * Cartesian crystal direction `beam_cart` along the beam, before any range check.
 * A double tilt has one solution (for a direction with v_Z > 0 or |alpha| < 90); a rotation
 * holder has two (alpha and -alpha with gamma turned by 180 degrees), or one when alpha = 0.
 */
export function tiltsForBeam(o: Orientation, kind: HolderKind, beam_cart: Vec3): Tilts[] {
  const v = unit(beam_cart);
  const x = dot(v, o.X);
  const y = dot(v, o.Y);
  const z = dot(v, o.Z);
  const clampAsin = (s: number) => Math.asin(Math.max(-1, Math.min(1, s)));
  if (kind === 'double') {
    return [{ primary_deg: clampAsin(y) / DEG, secondary_deg: Math.atan2(-x, z) / DEG }];
  }
  const a = Math.acos(Math.max(-1, Math.min(1, z))) / DEG;
  const sa = Math.hypot(x, y);
  if (sa < 1e-12) return [{ primary_deg: 0, secondary_deg: 0 }];
  const g = Math.atan2(x, y) / DEG;
  return [
    { primary_deg: a, secondary_deg: wrap(g) },
    { primary_deg: -a, secondary_deg: wrap(g + 180) },
  ];
}

export function withinRange(h: Holder, t: Tilts, slack_deg = 1e-9): boolean {
  return (
    t.primary_deg >= h.primary_deg[0] - slack_deg &&
    t.primary_deg <= h.primary_deg[1] + slack_deg &&
    t.secondary_deg >= h.secondary_deg[0] - slack_deg &&
    t.secondary_deg <= h.secondary_deg[1] + slack_deg
  );
}

/** The tilts within the holder's ranges that put beam_cart along the beam (the one needing least tilt first); [] when none. */
export function reachableTilts(o: Orientation, h: Holder, beam_cart: Vec3): Tilts[] {
  return tiltsForBeam(o, h.kind, beam_cart)
    .filter((t) => withinRange(h, t))
    .sort((p, q) => Math.hypot(p.primary_deg, p.secondary_deg) - Math.hypot(q.primary_deg, q.secondary_deg));
}

/** Angle (degrees) the specimen turns through between two beam directions (as the beam sees it). */
export function tiltBetween_deg(a_cart: Vec3, b_cart: Vec3): number {
  const c = dot(unit(a_cart), unit(b_cart));
  return Math.acos(Math.max(-1, Math.min(1, c))) / DEG;
}

/** Checks a tilt range read from the user. */
export function checkRange(name: string, r: readonly [number, number], limit: number): void {
  if (!(Number.isFinite(r[0]) && Number.isFinite(r[1]) && r[0] <= r[1] && r[0] >= -limit && r[1] <= limit)) {
    throw new InputError(`${name}: the range ${r[0]}..${r[1]} degrees is not usable; give low,high with -${limit} <= low <= high <= ${limit}`);
  }
}

/**
 * Specimen rotation matrix R (rows) of the holder at the given tilts, in the
 * microscope frame: double tilt R_X(alpha) R_Y(beta), rotation holder R_X(alpha) R_Z(gamma).
 */
export function holderRotation(kind: HolderKind, t: Tilts): [Vec3, Vec3, Vec3] {
  const a = t.primary_deg * DEG, b = t.secondary_deg * DEG;
  const ca = Math.cos(a), sa = Math.sin(a), cb = Math.cos(b), sb = Math.sin(b);
  // R_X(a) = [[1,0,0],[0,ca,-sa],[0,sa,ca]]
  if (kind === 'double') {
    // R_Y(b) = [[cb,0,sb],[0,1,0],[-sb,0,cb]]
    return [[cb, 0, sb], [sa * sb, ca, -sa * cb], [-ca * sb, sa, ca * cb]];
  }
  // R_Z(b) = [[cb,-sb,0],[sb,cb,0],[0,0,1]]
  return [[cb, -sb, 0], [ca * sb, ca * cb, -sa], [sa * sb, sa * cb, ca]];
}

/**
 * The zero-tilt orientation from what one sees at the current tilts: the crystal
 * direction along the beam (e.g. the zone axis one is on) and a crystal direction
 * lying along the primary tilt axis (projected perpendicular to the beam), both
 * Cartesian. The foil normal at zero tilt follows (it is the direction the holder
 * puts along the beam at zero tilt).
 */
export function orientationFromBeam(kind: HolderKind, t: Tilts, beamNow_cart: Vec3, axisNow_cart: Vec3): Orientation {
  const Zc = unit(beamNow_cart);
  const along = sub(axisNow_cart, scale(Zc, dot(axisNow_cart, Zc)));
  if (norm(along) < 1e-9 * norm(axisNow_cart)) {
    throw new InputError('the direction given along the primary tilt axis is parallel to the beam direction; give a direction lying across the beam');
  }
  const Xc = unit(along);
  const C = [Xc, cross(Zc, Xc), Zc];
  const R = holderRotation(kind, t);
  // lab = R U0 crystal at zero tilt, and M = R U0 at the current tilts has rows C: U0 = R^T M, so the crystal
  // vector along lab axis i at zero tilt is U0^T e_i = M^T R e_i = sum_j R[j][i] C_j
  const axisAt = (i: number): Vec3 => [0, 1, 2].map((k) => R[0][i] * C[0][k] + R[1][i] * C[1][k] + R[2][i] * C[2][k]) as unknown as Vec3;
  return { X: axisAt(0), Y: axisAt(1), Z: axisAt(2) };
}
