/**
 * Where things point in a simulated image, for the outputs a user reads:
 * the direction of g on the screen, the image axes and the beam as crystal
 * directions, the foil normal, and the nearest low-index zone axis.
 *
 * Screen angles are degrees counter-clockwise from +x with +y pointing down
 * in the image (the convention of the micrograph settings, `gAngle_deg`):
 * a vector with image components (gx, gy) (gy along +y, down) has the screen
 * angle atan2(-gy, gx).
 */
import type { Vec3 } from '../math/vec3.js';
import { dot, norm } from '../math/vec3.js';
import type { Lattice } from '../crystal/lattice.js';
import { cartesianToDirection, directionToCartesian, usesFourIndices } from '../crystal/lattice.js';
import { directionToFour } from '../crystal/millerBravais.js';
import { clean, primitiveDirections } from '../crystal/formatIndices.js';
import type { ImageFrame } from './frames.js';

export interface ZoneAxis {
  /** Lattice direction [uvw] (three indices). */
  readonly uvw: Vec3;
  /** The zone written as the user reads it (four indices for hexagonal crystals). */
  readonly text: string;
  /** Angle between the beam and this zone axis, degrees. */
  readonly angle_deg: number;
}

export interface ConditionGeometry {
  /** Direction of g in the image: degrees counter-clockwise from +x, +y down. */
  readonly gAngle_deg: number;
  /** Image axes +x, +y (down) and the beam (into the foil) as crystal directions, scaled so that the largest |index| is 1. */
  readonly imageX: readonly number[];
  readonly imageY: readonly number[];
  readonly beam: readonly number[];
  readonly foilNormal: readonly number[];
  /** The same four directions as text ("[0.5 1 0]", or four indices for hexagonal crystals). */
  readonly text: { readonly imageX: string; readonly imageY: string; readonly beam: string; readonly foilNormal: string };
  readonly nearestZone: ZoneAxis;
}

/** Screen angle (degrees, counter-clockwise from +x, +y down) of a Cartesian vector projected on the image. */
export function screenAngle_deg(frame: ImageFrame, v_cart: Vec3): number {
  const gx = dot(v_cart, frame.ex);
  const gy = dot(v_cart, frame.ey);
  const a = (Math.atan2(-gy, gx) * 180) / Math.PI;
  return Math.abs(a) < 1e-12 ? 0 : a;
}

/** Crystal direction indices of a Cartesian vector, scaled so that the largest |index| is 1 (3 indices, or 4 for hexagonal). */
export function crystalDirection(l: Lattice, v_cart: Vec3): number[] {
  const d = cartesianToDirection(l, v_cart);
  const idx: number[] = usesFourIndices(l) ? [...directionToFour(d)] : [...d];
  const m = Math.max(...idx.map(Math.abs));
  return idx.map((x) => clean(x / m));
}

/** "[1 0.5 0]" from indices. */
export function directionText(idx: readonly number[]): string {
  return `[${idx.map((x) => String(clean(x))).join(' ')}]`;
}

/**
 * The low-index zone axis closest to the beam: the lattice direction with
 * indices up to `maxIndex` (3 by default) at the smallest angle to the beam,
 * taking the lowest indices among directions within 0.01 degree of each
 * other. Oriented along the beam (into the foil).
 */
export function nearestZone(l: Lattice, beam_cart: Vec3, maxIndex = 3): ZoneAxis {
  const b = norm(beam_cart);
  let best: { uvw: Vec3; angle: number; size: number } | null = null;
  for (const d of primitiveDirections(maxIndex)) {
    const c = directionToCartesian(l, d);
    const cos = dot(c, beam_cart) / (norm(c) * b);
    if (cos <= 0) continue;
    const angle = (Math.acos(Math.min(1, cos)) * 180) / Math.PI;
    const size = Math.abs(d[0]) + Math.abs(d[1]) + Math.abs(d[2]);
    if (best === null || angle < best.angle - 0.01 || (Math.abs(angle - best.angle) <= 0.01 && size < best.size)) best = { uvw: d, angle, size };
  }
  const z = best as { uvw: Vec3; angle: number };
  const idx = usesFourIndices(l) ? fourIndexZone(z.uvw) : [...z.uvw];
  return { uvw: z.uvw, text: directionText(idx), angle_deg: clean(z.angle) };
}

/** [uvtw] of a 3-index zone, scaled to the smallest whole numbers. */
function fourIndexZone(uvw: Vec3): number[] {
  const f = directionToFour(uvw).map((x) => x * 3);
  const ints = f.map((x) => Math.round(x));
  const gcd = (a: number, b: number): number => (b === 0 ? Math.abs(a) : gcd(b, a % b));
  const g = ints.reduce((a, x) => gcd(a, x), 0) || 1;
  return ints.map((x) => x / g);
}

export function conditionGeometry(l: Lattice, frame: ImageFrame, g_cart: Vec3): ConditionGeometry {
  const imageX = crystalDirection(l, frame.ex);
  const imageY = crystalDirection(l, frame.ey);
  const beam = crystalDirection(l, frame.ez);
  const foilNormal = crystalDirection(l, frame.normal);
  return {
    gAngle_deg: clean(screenAngle_deg(frame, g_cart)),
    imageX,
    imageY,
    beam,
    foilNormal,
    text: { imageX: directionText(imageX), imageY: directionText(imageY), beam: directionText(beam), foilNormal: directionText(foilNormal) },
    nearestZone: nearestZone(l, frame.ez),
  };
}
