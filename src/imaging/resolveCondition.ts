/**
 * One imaging condition made concrete: the reflection's extinction and
 * absorption lengths, the deviation s (from s, w or the weak-beam rule), the
 * image frame for its beam, and g in Cartesian form.
 */
import type { Vec3 } from '../math/vec3.js';
import { norm } from '../math/vec3.js';
import { planeNormalToCartesian } from '../crystal/lattice.js';
import { reflectionParameters } from '../scattering/reflection.js';
import type { Condition, Scenario, BeamSet } from '../scenario/types.js';
import type { ImageFrame } from '../geometry/frames.js';
import { scenarioFrame } from './scenarioFrame.js';
import { weakBeamDeviation } from '../dynamics/manyBeamSystematicRow.js';

export interface ResolvedCondition {
  readonly id: string;
  readonly g: Vec3;
  /** g in the crystal Cartesian frame (nm^-1). */
  readonly g_cart: Vec3;
  readonly g_per_nm: number;
  readonly d_nm: number;
  readonly lambda_nm: number;
  readonly braggAngle_rad: number;
  readonly xi_nm: number;
  readonly xiAbs_nm: number;
  readonly xiAbs0_nm: number;
  readonly s_per_nm: number;
  readonly w: number;
  /** How s was set: "s", "w" or "g(ng)". */
  readonly deviationSource: string;
  readonly frame: ImageFrame;
  readonly beams: BeamSet;
  readonly beamDirection: Vec3;
}

export function resolveCondition(sc: Scenario, c: Condition): ResolvedCondition {
  const m = sc.material;
  const r = reflectionParameters(m, c.g, sc.kV, { absorption: sc.absorption });
  let s: number;
  let src: string;
  switch (c.deviation.kind) {
    case 's':
      s = c.deviation.s_per_nm;
      src = 's';
      break;
    case 'w':
      s = c.deviation.w / r.xi_nm;
      src = 'w';
      break;
    case 'weakBeam':
      // Ewald sphere through n g (physics.md section 4; Cockayne, Ray & Whelan 1969)
      s = weakBeamDeviation(c.deviation.n, r.lambda_nm, r.g_per_nm);
      src = `g(${c.deviation.n}g)`;
      break;
  }
  const frame = scenarioFrame(sc, c.beam);
  const g_cart = planeNormalToCartesian(m.lattice, c.g);
  return {
    id: c.id,
    g: c.g,
    g_cart,
    g_per_nm: norm(g_cart),
    d_nm: r.d_nm,
    lambda_nm: r.lambda_nm,
    braggAngle_rad: r.braggAngle_rad,
    xi_nm: r.xi_nm,
    xiAbs_nm: r.xiAbs_nm,
    xiAbs0_nm: r.xiAbs0_nm,
    s_per_nm: s,
    w: s * r.xi_nm,
    deviationSource: src,
    frame,
    beams: c.beams,
    beamDirection: c.beam,
  };
}
