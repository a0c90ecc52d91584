/**
 * Plain-language warnings about a valid scenario that will probably not show
 * what the user expects: an implausible thickness or pixel size (a value typed
 * in the wrong unit), a defect outside the foil or the field of view, a
 * dislocation seen end-on, a fault seen edge-on. They do not stop a render.
 * (What is impossible, such as a defect wholly outside the crystal, is refused
 * by the scenario parser.)
 */
import { type Vec3, cross, dot, norm, unit } from '../math/vec3.js';
import { directionToCartesian, planeNormalToCartesian } from '../crystal/lattice.js';
import type { Scenario } from '../scenario/types.js';
import { referenceFrame } from '../imaging/scenarioFrame.js';
import { imagePointToCrystal } from '../geometry/frames.js';
import { sig } from '../format.js';

/**
 * Plausible ranges (common practice for diffraction-contrast work): foils
 * thinner than 5 nm are a few atomic planes and show almost no contrast
 * (0.15 is a thickness in micrometres); foils thicker than 1000 nm are opaque
 * to 100-400 kV electrons in metals; pixels larger than 10 nm put a whole
 * dislocation image (about xi_g / 3 wide) into one or two pixels; pixels
 * smaller than 0.05 nm are far below any atomic spacing, where the column
 * approximation says nothing (a size in Angstrom divided by 10 twice?); the
 * parser refuses pixels below 0.01 nm outright.
 */
export const PLAUSIBLE = {
  thicknessMin_nm: 5,
  thicknessMax_nm: 1000,
  pixelMax_nm: 10,
  pixelMin_nm: 0.05,
} as const;

/**
 * The part of the segment a + f (b - a), f in [0, 1], inside the rectangle
 * |x| <= hw, |y| <= hh (Liang-Barsky clipping); null when it misses.
 */
function clipToRectangle(ax: number, ay: number, bx: number, by: number, hw: number, hh: number): [number, number] | null {
  let f0 = 0;
  let f1 = 1;
  const dx = bx - ax;
  const dy = by - ay;
  const edges: [number, number][] = [[-dx, ax + hw], [dx, hw - ax], [-dy, ay + hh], [dy, hh - ay]];
  for (const [p, q] of edges) {
    if (p === 0) {
      if (q < 0) return null;
    } else {
      const r = q / p;
      if (p < 0) f0 = Math.max(f0, r);
      else f1 = Math.min(f1, r);
    }
  }
  return f0 <= f1 ? [f0, f1] : null;
}

export function scenarioWarnings(sc: Scenario): string[] {
  const out: string[] = [];
  const l = sc.material.lattice;
  const ref = referenceFrame(sc);
  const t = sc.thickness_nm;
  if (t < PLAUSIBLE.thicknessMin_nm) {
    out.push(`foil.thickness_nm is ${t} nm, thinner than ${PLAUSIBLE.thicknessMin_nm} nm (a few atomic planes, almost no contrast); was it meant in micrometres (${sig(t * 1000, 3)} nm)?`);
  } else if (t > PLAUSIBLE.thicknessMax_nm) {
    out.push(`foil.thickness_nm is ${t} nm, thicker than the ${PLAUSIBLE.thicknessMax_nm} nm through which 100-400 kV electrons pass a metal foil; check the unit (nm)`);
  }
  const px = sc.image.pixel_nm;
  if (px > PLAUSIBLE.pixelMax_nm) {
    out.push(`image.pixel_nm is ${px} nm, larger than ${PLAUSIBLE.pixelMax_nm} nm: a dislocation image (about xi_g / 3 wide) falls into one or two pixels; check the unit (nm)`);
  } else if (px < PLAUSIBLE.pixelMin_nm) {
    out.push(`image.pixel_nm is ${px} nm, far below any atomic spacing (smaller than ${PLAUSIBLE.pixelMin_nm} nm); check the unit (nm)`);
  }
  const hw = (sc.image.width_px * px) / 2;
  const hh = (sc.image.height_px * px) / 2;
  sc.defects.forEach((d, i) => {
    const where = `defects[${i}] (${d.label})`;
    if (d.type === 'inclusion') {
      const [x, y] = d.centre_nm;
      if (Math.abs(x) - d.radius_nm > hw || Math.abs(y) - d.radius_nm > hh) {
        out.push(`${where}: the inclusion (x ${x} nm, y ${y} nm) lies outside the ${sig(2 * hw, 4)} x ${sig(2 * hh, 4)} nm field of view; only the tail of its strain field reaches the image`);
      }
      return;
    }
    if (d.type === 'fault') {
      const n = unit(planeNormalToCartesian(l, d.plane));
      if (Math.abs(dot(n, ref.ez)) < 1e-6) out.push(`${where}: the fault plane contains the beam (seen edge-on), so it shows no fringes`);
      return;
    }
    const u = unit(directionToCartesian(l, d.line));
    if (norm(cross(u, ref.ez)) < 1e-6) out.push(`${where}: the line runs along the beam (seen end-on): the image shows only its strain field around a point`);
    // the part of the line inside the foil (the parser refuses a line parallel to the surfaces outside it)
    const p: Vec3 = imagePointToCrystal(ref, d.point_nm);
    const un = dot(u, ref.normal);
    const z = d.point_nm[2];
    let a: Vec3 = p;
    let b: Vec3 = p;
    if (Math.abs(un) > 1e-9) {
      // depth along the line: z + lambda (u . n); the foil is 0 <= depth <= t
      const l0 = -z / un;
      const l1 = (t - z) / un;
      a = [p[0] + l0 * u[0], p[1] + l0 * u[1], p[2] + l0 * u[2]];
      b = [p[0] + l1 * u[0], p[1] + l1 * u[1], p[2] + l1 * u[2]];
      if (z < 0 || z > t) {
        out.push(`${where}: point_nm is at depth ${z} nm, outside the ${t} nm foil; the line is drawn where it crosses the foil, from (${sig(dot(a, ref.ex), 3)}, ${sig(dot(a, ref.ey), 3)}) to (${sig(dot(b, ref.ex), 3)}, ${sig(dot(b, ref.ey), 3)}) nm in the image`);
      }
    } else {
      // parallel to the surfaces: the line is infinite in the image
      const big = 1e7;
      a = [p[0] - big * u[0], p[1] - big * u[1], p[2] - big * u[2]];
      b = [p[0] + big * u[0], p[1] + big * u[1], p[2] + big * u[2]];
    }
    if (clipToRectangle(dot(a, ref.ex), dot(a, ref.ey), dot(b, ref.ex), dot(b, ref.ey), hw, hh) === null) {
      out.push(`${where}: the part of the line inside the foil lies outside the ${sig(2 * hw, 4)} x ${sig(2 * hh, 4)} nm field of view, so the image shows at most the tail of its strain field; move point_nm or enlarge the image`);
    }
  });
  return out;
}
