/**
 * Frames: crystal Cartesian <-> image. For one beam direction the image frame is
 *   ez = unit beam (electron travel, into the foil),
 *   ex = imageX projected perpendicular to ez,
 *   ey = ez x ex   (so that, viewed along the beam, +x is right and +y is down,
 *                   matching image rows that grow downwards).
 * The foil is the slab 0 <= r.n <= t, n the unit foil normal oriented along
 * the beam (n.ez > 0). The origin is the image centre on the entrance surface.
 * A column through image point (x, y) is r(z) = x ex + y ey + (tau0 + z) ez,
 * z in [0, L] the path length below the entrance surface, L = t / (n.ez).
 */
import { type Vec3, cross, dot, scale, sub, unit } from '../math/vec3.js';

export interface ImageFrame {
  readonly ex: Vec3;
  readonly ey: Vec3;
  readonly ez: Vec3;
  /** Unit foil normal, oriented so that normal . ez > 0. */
  readonly normal: Vec3;
  readonly thickness_nm: number;
  /** Path length of every column through the foil, t / cos(tilt). */
  readonly columnLength_nm: number;
}

export function imageFrame(beam_cart: Vec3, imageX_cart: Vec3, normal_cart: Vec3, thickness_nm: number): ImageFrame {
  const ez = unit(beam_cart);
  const ex = unit(sub(imageX_cart, scale(ez, dot(imageX_cart, ez))));
  const ey = cross(ez, ex);
  let normal = unit(normal_cart);
  if (dot(normal, ez) < 0) normal = scale(normal, -1);
  const c = dot(normal, ez);
  return { ex, ey, ez, normal, thickness_nm, columnLength_nm: thickness_nm / c };
}

/** Path offset tau0 at which the column through (x, y) enters the foil. */
export function columnEntryOffset(f: ImageFrame, x: number, y: number): number {
  return -(x * dot(f.ex, f.normal) + y * dot(f.ey, f.normal)) / dot(f.ez, f.normal);
}

/**
 * Where the column through image point (x, y) enters the foil, in crystal
 * Cartesian nm, written into out[0..2] (no allocation: used once per column).
 */
export function columnEntryPoint(out: Float64Array, f: ImageFrame, x: number, y: number): Float64Array {
  const tau0 = columnEntryOffset(f, x, y);
  out[0] = x * f.ex[0] + y * f.ey[0] + tau0 * f.ez[0];
  out[1] = x * f.ex[1] + y * f.ey[1] + tau0 * f.ez[1];
  out[2] = x * f.ex[2] + y * f.ey[2] + tau0 * f.ez[2];
  return out;
}

/**
 * Crystal Cartesian position of a point given as (x, y) in the image and
 * depth d below the entrance surface (measured along the foil normal): the
 * point that projects onto (x, y) along the beam and lies at that depth.
 */
export function imagePointToCrystal(f: ImageFrame, p: Vec3): Vec3 {
  const [x, y, depth] = p;
  const tau = columnEntryOffset(f, x, y) + depth / dot(f.ez, f.normal);
  return [
    x * f.ex[0] + y * f.ey[0] + tau * f.ez[0],
    x * f.ex[1] + y * f.ey[1] + tau * f.ez[1],
    x * f.ex[2] + y * f.ey[2] + tau * f.ez[2],
  ];
}

/** Image coordinates (x, y) and depth below the entrance surface of a crystal point. */
export function crystalToImagePoint(f: ImageFrame, r: Vec3): Vec3 {
  return [dot(r, f.ex), dot(r, f.ey), dot(r, f.normal)];
}

/** Image x (nm, from the centre) of pixel column i; pixel centres. */
export function pixelX(i: number, width: number, pixel_nm: number): number {
  return (i + 0.5 - width / 2) * pixel_nm;
}
