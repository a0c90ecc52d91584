/**
 * Coherent spherical inclusion in an isotropic matrix with the same elastic
 * constants (Eshelby 1957; Ashby & Brown 1963, Phil. Mag. 8, 1083 and 1649):
 *
 *   R = eps r                  for |r| <= r0
 *   R = eps r0^3 r / |r|^3     for |r| >  r0
 *
 * r measured from the centre, eps the constrained strain. From an
 * unconstrained (stress-free) linear misfit delta, eps = delta (1 + nu) /
 * (3 (1 - nu)) (Eshelby). Outside, grad R = eps r0^3 (I/r^3 - 3 r r^T / r^5)
 * is traceless (no dilatation in the matrix) and symmetric (no rotation).
 */
import type { Vec3 } from '../math/vec3.js';
import { InputError } from '../errors.js';
import { type DisplacementField, withDirectional } from './field.js';
import { finiteVec3, poisson, positive } from './checks.js';

export interface SphericalInclusionOptions {
  readonly centre_nm: Vec3;
  readonly radius_nm: number;
  /** Constrained strain eps (give this or `misfit`, not both). */
  readonly strain?: number;
  /** Unconstrained linear misfit delta; eps = delta (1 + nu) / (3 (1 - nu)). */
  readonly misfit?: number;
  readonly poissonRatio: number;
}

/** Constrained strain of a coherent sphere from its misfit (Eshelby 1957): delta (1 + nu) / (3 (1 - nu)). */
export function constrainedStrain(misfit: number, poissonRatio: number): number {
  const nu = poisson(poissonRatio, 'poissonRatio');
  if (!Number.isFinite(misfit)) throw new InputError('inclusion misfit must be a finite number, e.g. 0.01 for 1 %.');
  return (misfit * (1 + nu)) / (3 * (1 - nu));
}

export function sphericalInclusion(opts: SphericalInclusionOptions): DisplacementField {
  const c = finiteVec3(opts.centre_nm, 'inclusion centre_nm');
  const r0 = positive(opts.radius_nm, 'inclusion radius_nm', 'give the radius in nm');
  poisson(opts.poissonRatio, 'poissonRatio');
  const hasStrain = opts.strain !== undefined;
  const hasMisfit = opts.misfit !== undefined;
  if (hasStrain === hasMisfit) {
    throw new InputError('inclusion needs exactly one of strain (constrained) or misfit (unconstrained); remove one or add one.');
  }
  let eps: number;
  if (hasStrain) {
    eps = opts.strain as number;
    if (!Number.isFinite(eps)) throw new InputError('inclusion strain must be a finite number, e.g. 0.005.');
  } else {
    eps = constrainedStrain(opts.misfit as number, opts.poissonRatio);
  }
  const cx = c[0], cy = c[1], cz = c[2];
  const r02 = r0 * r0;
  const a = eps * r0 * r02; // eps r0^3

  return withDirectional({
    displacement(out, x, y, z) {
      const dx = x - cx, dy = y - cy, dz = z - cz;
      const r2 = dx * dx + dy * dy + dz * dz;
      const f = r2 <= r02 ? eps : a / (r2 * Math.sqrt(r2));
      out[0] = f * dx;
      out[1] = f * dy;
      out[2] = f * dz;
    },
    gradient(out, x, y, z) {
      const dx = x - cx, dy = y - cy, dz = z - cz;
      const r2 = dx * dx + dy * dy + dz * dz;
      if (r2 <= r02) {
        out[0] = eps; out[1] = 0; out[2] = 0;
        out[3] = 0; out[4] = eps; out[5] = 0;
        out[6] = 0; out[7] = 0; out[8] = eps;
        return;
      }
      const f = a / (r2 * Math.sqrt(r2));
      const h = (-3 * f) / r2;
      const xy = h * dx * dy, xz = h * dx * dz, yz = h * dy * dz;
      out[0] = f + h * dx * dx; out[1] = xy; out[2] = xz;
      out[3] = xy; out[4] = f + h * dy * dy; out[5] = yz;
      out[6] = xz; out[7] = yz; out[8] = f + h * dz * dz;
    },
    directionalAt(g, k) {
      // g.G.k = eps g.k inside; outside eps r0^3 (g.k / r^3 - 3 (g.r)(k.r) / r^5)
      const [gx, gy, gz] = g;
      const [kx, ky, kz] = k;
      const gk = gx * kx + gy * ky + gz * kz;
      return (p) => {
        const x = p[0], y = p[1], z = p[2];
        const dx = x - cx, dy = y - cy, dz = z - cz;
        const r2 = dx * dx + dy * dy + dz * dz;
        if (r2 <= r02) {
          p[3] = eps * gk;
          return;
        }
        const f = a / (r2 * Math.sqrt(r2));
        const gr = gx * dx + gy * dy + gz * dz;
        const kr = kx * dx + ky * dy + kz * dz;
        p[3] = f * (gk - (3 * gr * kr) / r2);
      };
    },
  });
}
