/**
 * The strain seen along the columns r(z) = c0 + z k of one job, in the forms the two engines take:
 * beta'(z) = g . (grad R) . k as a scalar function (two-beam) and as probes that pass every number through
 * a Float64Array (many-beam; a double passed to or returned from a call V8 does not inline is boxed, an
 * allocation per call). Set the column's entry point in `c0` before integrating it. Not re-entrant: one
 * per thread.
 */
import type { Vec3 } from '../math/vec3.js';
import { type DisplacementField, directionalProbe, gradientProbe } from '../elasticity/field.js';
import type { StrainProbe } from '../dynamics/manyBeam.js';

export interface ColumnStrain {
  /** entry point of the current column (nm, crystal Cartesian) */
  readonly c0: Float64Array;
  readonly betaPrime: (z: number) => number;
  /** io[0] = z in, io[1] = beta' out */
  readonly betaProbe: StrainProbe;
  /** io[0] = z in, io[1..3] = dR/dz = (grad R) . k out */
  readonly dRdzProbe: StrainProbe;
}

export function columnStrain(field: DisplacementField | null, g: Vec3, k: Vec3): ColumnStrain {
  const c0 = new Float64Array(3);
  const [kx, ky, kz] = k;
  if (field === null) {
    return {
      c0,
      betaPrime: () => 0,
      betaProbe: (io) => {
        io[1] = 0;
      },
      dRdzProbe: (io) => {
        io[1] = 0;
        io[2] = 0;
        io[3] = 0;
      },
    };
  }
  const dir = directionalProbe(field, g, k);
  const gradAt = gradientProbe(field);
  const pt = new Float64Array(4);
  const grad = new Float64Array(9);
  return {
    c0,
    betaPrime: (z) => {
      pt[0] = c0[0] + z * kx;
      pt[1] = c0[1] + z * ky;
      pt[2] = c0[2] + z * kz;
      dir(pt);
      return pt[3];
    },
    betaProbe: (io) => {
      const z = io[0];
      pt[0] = c0[0] + z * kx;
      pt[1] = c0[1] + z * ky;
      pt[2] = c0[2] + z * kz;
      dir(pt);
      io[1] = pt[3];
    },
    dRdzProbe: (io) => {
      const z = io[0];
      pt[0] = c0[0] + z * kx;
      pt[1] = c0[1] + z * ky;
      pt[2] = c0[2] + z * kz;
      gradAt(grad, pt);
      io[1] = grad[0] * kx + grad[1] * ky + grad[2] * kz;
      io[2] = grad[3] * kx + grad[4] * ky + grad[5] * kz;
      io[3] = grad[6] * kx + grad[7] * ky + grad[8] * kz;
    },
  };
}
