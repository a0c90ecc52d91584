/**
 * The view a simulation must have to be laid over a micrograph: the same
 * direction of g on the screen, the micrograph's pixel size and crop size.
 *
 * A simulated image has +x along the scenario's image axis (projected
 * perpendicular to the condition's beam) and +y down (physics.md; frames.ts).
 * Turning that axis about the beam by phi turns the picture: with psi the
 * angle of g from +x in image coordinates (atan2(g.ey, g.ex), y down), g
 * appears at the screen angle (counter-clockwise, y up on screen)
 * a = phi - psi. So phi = psi + a puts g where the micrograph has it.
 * Defect positions are re-expressed in the turned frame so every defect
 * stays at the same place in the crystal.
 */
import type { Vec3 } from '../math/vec3.js';
import { add, dot, scale } from '../math/vec3.js';
import { crystalToImagePoint, imagePointToCrystal } from '../geometry/frames.js';
import { scenarioFrame } from '../imaging/scenarioFrame.js';
import { planeNormalToCartesian } from '../crystal/lattice.js';
import type { Condition, DefectSpec, Scenario } from '../scenario/types.js';

const DEG = Math.PI / 180;

/** Screen angle of g (degrees, counter-clockwise from +x, +y down in the image) in the scenario's own simulated image. */
export function simulatedGAngle_deg(sc: Scenario, cond: Condition): number {
  const f = scenarioFrame(sc, cond.beam);
  const g = planeNormalToCartesian(sc.material.lattice, cond.g);
  return Math.atan2(-dot(g, f.ey), dot(g, f.ex)) / DEG;
}

/** Move every position of a defect by f (positions are image-frame x, y, depth). */
export function moveDefect(d: DefectSpec, f: (p: Vec3) => Vec3): DefectSpec {
  if ('centre_nm' in d) return { ...d, centre_nm: f(d.centre_nm) };
  if ('point_nm' in d) return { ...d, point_nm: f(d.point_nm) };
  return d;
}

/**
 * The scenario reduced to one condition, rendered on a width x height grid
 * of pixel_nm, with the image axes turned so that g points at angle_deg on
 * the screen (counter-clockwise from +x).
 */
export function conditionView(sc: Scenario, cond: Condition, angle_deg: number, width: number, height: number, pixel_nm: number): Scenario {
  return conditionViewAlong(sc, cond, viewAxis(sc, cond, angle_deg), width, height, pixel_nm);
}

/** The Cartesian image axis (+x) that puts g at angle_deg on the screen (counter-clockwise from +x). */
export function viewAxis(sc: Scenario, cond: Condition, angle_deg: number): Vec3 {
  const f = scenarioFrame(sc, cond.beam);
  const g = planeNormalToCartesian(sc.material.lattice, cond.g);
  const psi = Math.atan2(dot(g, f.ey), dot(g, f.ex));
  const phi = psi + angle_deg * DEG;
  return add(scale(f.ex, Math.cos(phi)), scale(f.ey, Math.sin(phi)));
}

/** As conditionView, with the image's +x axis given as a Cartesian vector (projected perpendicular to the beam). */
export function conditionViewAlong(sc: Scenario, cond: Condition, imageX_cart: Vec3, width: number, height: number, pixel_nm: number): Scenario {
  const oldRef = scenarioFrame(sc, sc.beam);
  const newRef = scenarioFrame(sc, sc.beam, imageX_cart);
  const move = (p: Vec3): Vec3 => crystalToImagePoint(newRef, imagePointToCrystal(oldRef, p));
  return {
    ...sc,
    imageX_cart,
    conditions: [cond],
    image: { width_px: width, height_px: height, pixel_nm },
    defects: sc.defects.map((d) => moveDefect(d, move)),
  };
}
