/**
 * Foil thickness from the projected width of a planar fault that crosses the
 * foil, or the projected length of a straight dislocation running from one
 * surface to the other (geometry; Edington 1975 and Williams & Carter 2009
 * give the special case w = t tan(phi) for a beam along the foil normal,
 * phi the angle between fault plane and foil normal ... from memory; the
 * general form below is plain vector geometry).
 *
 * Foil: the slab 0 <= r.N <= t (N the unit foil normal). Beam: unit k.
 *  - Fault with unit plane normal m: it meets the two surfaces along lines of
 *    direction l = m x N. Going down the fault perpendicular to l,
 *    q = m x l, one reaches the other surface after Delta = t q / (q.N). Seen
 *    along the beam, the two lines are W = |Delta . e| apart, e = unit(k x l)
 *    the image direction perpendicular to the projected lines. Hence
 *    t = W |q.N| / |q.e|.
 *  - Dislocation with unit line direction u: it crosses the foil over
 *    Delta = t u / (u.N); its projection is |Delta - (Delta.k) k| long, so
 *    t = L |u.N| / |u - (u.k) k|.
 * All vectors Cartesian (any common frame).
 */
import type { Vec3 } from '../math/vec3.js';
import { cross, dot, norm, scale, sub, unit } from '../math/vec3.js';
import { InputError } from '../errors.js';

/** Thickness (nm) from the projected width (nm) of a fault with plane normal m. */
export function thicknessFromFaultWidth(width_nm: number, planeNormal: Vec3, foilNormal: Vec3, beam: Vec3): number {
  checkLength(width_nm, 'the projected fault width');
  const m = unit(planeNormal), N = unit(foilNormal), k = unit(beam);
  const lRaw = cross(m, N);
  if (norm(lRaw) < 1e-9) throw new InputError('the fault plane is parallel to the foil surfaces, so it has no projected width across the foil; choose an inclined fault');
  const l = unit(lRaw);
  const q = cross(m, l);
  const eRaw = cross(k, l);
  if (norm(eRaw) < 1e-9) throw new InputError('the fault meets the surfaces along lines parallel to the beam; tilt so that the fault is seen inclined');
  const e = unit(eRaw);
  const qe = Math.abs(dot(q, e));
  if (qe < 1e-9) throw new InputError('the fault plane contains the beam (seen edge-on), so its width does not depend on the thickness; tilt the specimen');
  return (width_nm * Math.abs(dot(q, N))) / qe;
}

/** Thickness (nm) from the projected length (nm) of a straight dislocation crossing the foil. */
export function thicknessFromLineLength(length_nm: number, line: Vec3, foilNormal: Vec3, beam: Vec3): number {
  checkLength(length_nm, 'the projected line length');
  const u = unit(line), N = unit(foilNormal), k = unit(beam);
  const uN = Math.abs(dot(u, N));
  if (uN < 1e-9) throw new InputError('the dislocation line lies parallel to the foil surfaces and never crosses the foil; choose an inclined line');
  const perp = norm(sub(u, scale(k, dot(u, k))));
  if (perp < 1e-9) throw new InputError('the dislocation line runs along the beam (seen end-on), so its projected length is zero; tilt the specimen');
  return (length_nm * uN) / perp;
}

function checkLength(v: number, what: string): void {
  if (!(v > 0) || !Number.isFinite(v)) throw new InputError(`${what} ${v} must be a positive length in nm`);
}
