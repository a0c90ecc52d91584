/**
 * Free-surface correction of a coherent spherical inclusion (or a centre of
 * dilatation) in an isotropic foil. Outside the sphere the inclusion's field is
 * that of a centre of dilatation, u = A r / r^3 with A = eps r0^3
 * (src/elasticity/inclusion.ts); the tractions it puts on a surface are
 * therefore those of the point source as long as the sphere lies wholly in the
 * foil, and so is the correction that frees the surface.
 *
 * Half-space z >= 0 (z the depth below the surface, n the unit inward normal),
 * source at depth c on the axis, R the vector from the mirror point at depth
 * -c, s = z + c its n component, k = 3 - 4 nu. The correction to add to the
 * infinite-medium field (Mindlin & Cheng 1950, J. Appl. Phys. 21, 926, nucleus
 * of strain in the semi-infinite solid) is, in components (x, y across, z along n),
 *   u_x = A [ k x / R^3 - 6 x z s / R^5 ]          (likewise u_y)
 *   u_z = A [ -k s / R^3 + 2 z / R^3 - 6 z s^2 / R^5 ]
 * or as one vector  u = A [ (k / R^3 - 6 z s / R^5) R + (2 z - 2 k s) / R^3 n ].
 * This form is written from memory of the published result and re-derived
 * here: an image centre of dilatation of the same sign cancels the shear
 * traction on z = 0 and doubles the normal one, which the Papkovich-Neuber
 * field 2 mu u = 4 (1 - nu) chi_z e_z - grad(z chi_z + (1 - 2 nu) chi) with
 * chi = 4 mu A / R (shear-free on z = 0, sigma_zz = chi_zz there) removes. The
 * tests decide (test/elasticity/inclusionSurface.test.ts): the traction on the
 * surface vanishes by Hooke's law, Navier's equations hold by finite
 * differences, the surface displacement is 4 (1 - nu) times the
 * infinite-medium one (the Mogi 1958 factor), and scripts/ref_inclusion_surface.py
 * evaluates the component form above separately.
 *
 * The foil: the entrance surface r.n = 0 gets the half-space correction with
 * the source at depth c = n.C, the exit surface r.n = t the same reflected
 * (inward normal -n, depth t - r.n, source at depth t - c). The two are added
 * without repeated reflections: each frees its own surface exactly and leaves a
 * traction on the other (measured in the tests, stated in README and render.json).
 */
import { type Vec3, dot, unit } from '../math/vec3.js';
import type { DisplacementField } from './field.js';

export interface InclusionSurfaceOptions {
  readonly centre_nm: Vec3;
  /** A = eps r0^3 (nm^3): the strength of the centre of dilatation outside the sphere. */
  readonly strength_nm3: number;
  /** Unit foil normal; the foil is 0 <= r.n <= thickness_nm. */
  readonly normal: Vec3;
  readonly thickness_nm: number;
  readonly poissonRatio: number;
  /** Tests only: one surface ('entrance': only r.n = 0 is freed). */
  readonly only?: 'entrance' | 'exit';
}

/** One half-space: inward normal, depth = r.n_in + offset, mirror point, source depth. */
interface Side {
  readonly n0: number;
  readonly n1: number;
  readonly n2: number;
  readonly offset: number;
  /** The mirror point C - 2 c n_in. */
  readonly m0: number;
  readonly m1: number;
  readonly m2: number;
  readonly c: number;
}

function side(C: Vec3, n: Vec3, offset: number): Side {
  const c = dot(C, n) + offset;
  return { n0: n[0], n1: n[1], n2: n[2], offset, m0: C[0] - 2 * c * n[0], m1: C[1] - 2 * c * n[1], m2: C[2] - 2 * c * n[2], c };
}

/** The correction field (add it to the sphericalInclusion field of the same inclusion). */
export function inclusionSurfaceCorrection(o: InclusionSurfaceOptions): DisplacementField {
  const n = unit(o.normal);
  const t = o.thickness_nm;
  const A = o.strength_nm3;
  const k = 3 - 4 * o.poissonRatio;
  const sides: Side[] = [];
  if (o.only !== 'exit') sides.push(side(o.centre_nm, n, 0));
  if (o.only !== 'entrance') sides.push(side(o.centre_nm, [-n[0], -n[1], -n[2]], t));
  const ns = sides.length;
  const R = new Float64Array(3);
  const nn = new Float64Array(3);
  return {
    displacement(out, x, y, z) {
      out[0] = 0;
      out[1] = 0;
      out[2] = 0;
      for (let q = 0; q < ns; q++) {
        const S = sides[q];
        const R0 = x - S.m0, R1 = y - S.m1, R2 = z - S.m2;
        const zz = x * S.n0 + y * S.n1 + z * S.n2 + S.offset;
        const s = zz + S.c;
        const r2 = R0 * R0 + R1 * R1 + R2 * R2;
        const i3 = 1 / (r2 * Math.sqrt(r2));
        const f = A * (k * i3 - (6 * zz * s * i3) / r2);
        const h = A * (2 * zz - 2 * k * s) * i3;
        out[0] += f * R0 + h * S.n0;
        out[1] += f * R1 + h * S.n1;
        out[2] += f * R2 + h * S.n2;
      }
    },
    gradient(out, x, y, z) {
      for (let i = 0; i < 9; i++) out[i] = 0;
      for (let q = 0; q < ns; q++) {
        const S = sides[q];
        R[0] = x - S.m0;
        R[1] = y - S.m1;
        R[2] = z - S.m2;
        nn[0] = S.n0;
        nn[1] = S.n1;
        nn[2] = S.n2;
        const zz = x * S.n0 + y * S.n1 + z * S.n2 + S.offset;
        const s = zz + S.c;
        const r2 = R[0] * R[0] + R[1] * R[1] + R[2] * R[2];
        const i3 = 1 / (r2 * Math.sqrt(r2));
        const i5 = i3 / r2;
        const i7 = i5 / r2;
        const f = k * i3 - 6 * zz * s * i5;
        const hNum = 2 * zz - 2 * k * s;
        // d f / d x_j = aR R_j + aN n_j;  d h / d x_j = bR R_j + bN n_j
        const aR = -3 * k * i5 + 30 * zz * s * i7;
        const aN = -6 * (s + zz) * i5;
        const bR = -3 * hNum * i5;
        const bN = 2 * (1 - k) * i3;
        for (let i = 0; i < 3; i++)
          for (let j = 0; j < 3; j++)
            out[3 * i + j] += A * ((i === j ? f : 0) + R[i] * (aR * R[j] + aN * nn[j]) + nn[i] * (bR * R[j] + bN * nn[j]));
      }
    },
    directional(g, kv) {
      // g.G.k = A [ f g.k + (g.R)(aR R.k + aN n.k) + (g.n)(bR R.k + bN n.k) ]
      const gk = g[0] * kv[0] + g[1] * kv[1] + g[2] * kv[2];
      const gn = sides.map((S) => g[0] * S.n0 + g[1] * S.n1 + g[2] * S.n2);
      const kn = sides.map((S) => kv[0] * S.n0 + kv[1] * S.n1 + kv[2] * S.n2);
      const [g0, g1, g2] = g;
      const [k0, k1, k2] = kv;
      return (x, y, z) => {
        let sum = 0;
        for (let q = 0; q < ns; q++) {
          const S = sides[q];
          const R0 = x - S.m0, R1 = y - S.m1, R2 = z - S.m2;
          const zz = x * S.n0 + y * S.n1 + z * S.n2 + S.offset;
          const s = zz + S.c;
          const r2 = R0 * R0 + R1 * R1 + R2 * R2;
          const i3 = 1 / (r2 * Math.sqrt(r2));
          const i5 = i3 / r2;
          const f = k * i3 - 6 * zz * s * i5;
          const hNum = 2 * zz - 2 * k * s;
          const aR = -3 * k * i5 + (30 * zz * s * i5) / r2;
          const aN = -6 * (s + zz) * i5;
          const gR = g0 * R0 + g1 * R1 + g2 * R2;
          const kR = k0 * R0 + k1 * R1 + k2 * R2;
          sum += f * gk + gR * (aR * kR + aN * kn[q]) + gn[q] * (-3 * hNum * i5 * kR + 2 * (1 - k) * i3 * kn[q]);
        }
        return A * sum;
      };
    },
  };
}

/** Whether a sphere (centre depth c = n.C, radius r0) lies strictly inside the foil: only then is the correction exact per surface. */
export function inclusionInsideFoil(centre_nm: Vec3, radius_nm: number, normal: Vec3, thickness_nm: number): boolean {
  const c = dot(centre_nm, unit(normal));
  return c - radius_nm > 0 && c + radius_nm < thickness_nm;
}
