/** The image frame of a scenario for one beam direction (geometry/frames.ts conventions). */
import type { Vec3 } from '../math/vec3.js';
import { directionToCartesian } from '../crystal/lattice.js';
import type { Scenario } from '../scenario/types.js';
import { imageFrame, type ImageFrame } from '../geometry/frames.js';

/** Frame for the crystal direction `beam`, with `imageX_cart` (default the scenario's) drawn along +x. */
export function scenarioFrame(sc: Scenario, beam: Vec3, imageX_cart: Vec3 = sc.imageX_cart): ImageFrame {
  const l = sc.material.lattice;
  return imageFrame(directionToCartesian(l, beam), imageX_cart, directionToCartesian(l, sc.foilNormal), sc.thickness_nm);
}

/** The frame in which defect points are given: the scenario's own beam. */
export function referenceFrame(sc: Scenario): ImageFrame {
  return scenarioFrame(sc, sc.beam);
}
