/**
 * Glide planes of candidate Burgers vectors for a line direction found by
 * trace analysis: the plane containing u and b has the normal u x b (a screw
 * dislocation, b parallel to u, has no single glide plane). Whether that plane
 * belongs to a slip-plane family commonly observed in the structure:
 *  - fcc, L1_2, diamond, zincblende: {111} (Hirth & Lothe 1982, Theory of
 *    Dislocations, ch. 9-10; Hull & Bacon 2011, Introduction to Dislocations, table 3.1);
 *  - bcc: {110}, {112}, {123} (Hull & Bacon 2011, table 3.1);
 *  - B2 and rocksalt: {110} (Hull & Bacon 2011; from memory);
 *  - hcp: basal (0001), prismatic {10-10}, pyramidal {10-11} and {11-22} (Hull & Bacon 2011, table 3.1).
 * Other structures: no list (the plane is still reported).
 */
import type { Vec3 } from '../math/vec3.js';
import { add, cross, dot, norm, scale, sub, unit } from '../math/vec3.js';
import type { Material } from '../crystal/material.js';
import { directionToCartesian, planeNormalToCartesian } from '../crystal/lattice.js';
import { parseFamily } from '../crystal/symmetry.js';
import { type PlaneMatch, type TraceFit, nearestPlane, planeIndicesOf } from './traces.js';

const DEG = Math.PI / 180;

/** The slip-plane families commonly observed in a structure (as written by users), or [] when none are listed. */
export function slipFamilies(structure: string): string[] {
  switch (structure) {
    case 'fcc':
    case 'L1_2':
    case 'diamond':
    case 'zincblende':
      return ['{111}'];
    case 'bcc':
      return ['{110}', '{112}', '{123}'];
    case 'B2':
    case 'rocksalt':
      return ['{110}'];
    case 'hcp':
      return ['{0001}', '{10-10}', '{10-11}', '{11-22}'];
    default:
      return [];
  }
}

/** The family (as listed by slipFamilies) that the plane (h k l) belongs to, or null. */
export function slipFamilyOf(m: Material, hkl: Vec3): string | null {
  const n = unit(planeNormalToCartesian(m.lattice, hkl));
  for (const f of slipFamilies(m.structure)) {
    for (const member of parseFamily(f, m, { collapseSign: true }).members) {
      if (Math.abs(Math.abs(dot(unit(planeNormalToCartesian(m.lattice, member)), n)) - 1) < 1e-9) return f;
    }
  }
  return null;
}

export interface GlidePlane {
  /** Candidate Burgers vector, lattice units. */
  readonly b: Vec3;
  /** Angle between u and b, degrees (0..90, the sense of b does not matter). */
  readonly angleToB_deg: number;
  /** True when u lies within the screw tolerance of b: no single glide plane. */
  readonly screw: boolean;
  /** Normal u x b as plane indices (largest |index| 1); absent for a screw. */
  readonly normal?: Vec3;
  /** One-sigma uncertainty of the normal's direction, degrees (from the fit's covariance). */
  readonly normalError_deg?: number;
  /** A common slip plane within the tolerance if there is one, else the nearest low-index plane (indices up to 3); and the angle between the normals. */
  readonly nearest?: PlaneMatch;
  /** True when the plane reported in `nearest` is within max(2 sigma, 1 degree) of u x b. */
  readonly matches?: boolean;
  /** The slip family of the plane in `nearest` when a common slip plane of the structure lies within the tolerance (it is then the one reported), else null. */
  readonly slipFamily?: string | null;
}

/**
 * The glide plane of candidate b for the fitted line: screw when u is within
 * max(2 sigma, 2 degrees) of +-b.
 */
export function glidePlane(m: Material, fit: TraceFit, b: Vec3): GlidePlane {
  const l = m.lattice;
  const bc = unit(directionToCartesian(l, b));
  const a = Math.acos(Math.min(1, Math.abs(dot(bc, fit.u_cart)))) / DEG;
  const screwTol = Math.max(2, 2 * fit.cone_deg);
  if (a <= screwTol) return { b, angleToB_deg: a, screw: true };
  const normalOf = (u: Vec3) => unit(cross(u, bc));
  const n = normalOf(fit.u_cart);
  // uncertainty: how far the normal turns for a one-sigma change of u along each principal axis
  const h = 1e-5;
  let s2 = 0;
  [fit.sigmaMajor_deg, fit.sigmaMinor_deg].forEach((sd, k) => {
    const ax = fit.axes[k];
    const n1 = normalOf(unit(add(fit.u_cart, scale(ax, h))));
    const n2 = normalOf(unit(sub(fit.u_cart, scale(ax, h))));
    const turn = norm(sub(n1, n2)) / (2 * h);
    s2 += (turn * sd) ** 2;
  });
  const err = Math.sqrt(s2);
  const tol = Math.max(2 * err, 1);
  // a common slip plane of the structure within the tolerance wins over any other low-index plane
  const slip = nearestSlipPlane(m, n);
  const idx = planeIndicesOf(l, n);
  if (slip !== null && slip.angle_deg <= tol) {
    return { b, angleToB_deg: a, screw: false, normal: idx, normalError_deg: err, nearest: { hkl: slip.hkl, angle_deg: slip.angle_deg }, matches: true, slipFamily: slip.family };
  }
  const near = nearestPlane(l, n, 3);
  return { b, angleToB_deg: a, screw: false, normal: idx, normalError_deg: err, nearest: near, matches: near.angle_deg <= tol, slipFamily: null };
}

/** The member of the structure's slip families whose normal is closest to n, with the angle between the normals. */
export function nearestSlipPlane(m: Material, n_cart: Vec3): (PlaneMatch & { family: string }) | null {
  const n = unit(n_cart);
  let best: (PlaneMatch & { family: string }) | null = null;
  for (const f of slipFamilies(m.structure)) {
    for (const member of parseFamily(f, m, { collapseSign: true }).members) {
      const c = Math.abs(dot(unit(planeNormalToCartesian(m.lattice, member)), n));
      const ang = Math.acos(Math.min(1, c)) / DEG;
      if (best === null || ang < best.angle_deg) best = { hkl: primitive(member), angle_deg: ang, family: f };
    }
  }
  return best;
}

/** Plane indices scaled to the smallest whole numbers (members of a family are whole already up to a common factor). */
function primitive(h: Vec3): Vec3 {
  const r = h.map((x) => Math.round(x * 6)) as number[];
  const gcd = (a: number, b: number): number => (b === 0 ? Math.abs(a) : gcd(b, a % b));
  const g = r.reduce((acc, x) => gcd(acc, x), 0) || 1;
  const first = r.find((x) => x !== 0) ?? 1;
  const s = first < 0 ? -1 : 1;
  return [(s * r[0]) / g + 0, (s * r[1]) / g + 0, (s * r[2]) / g + 0];
}
