/**
 * Free-surface relaxation of a straight dislocation in a foil: the correction
 * field that, added to the infinite-medium field, makes the surfaces
 * r.n = 0 and r.n = t of the foil free of traction. Here: isotropic
 * elasticity, the screw component B = b.u (the whole correction of a pure
 * screw; edge components get surfacePlateEdge.ts or the half-space correction
 * of surfaceHalfSpaceInclined.ts); two geometries, both exact for a screw in an
 * isotropic plate:
 *
 * 1. Line parallel to the surfaces (u.n = 0), at depth z0. The antiplane
 *    field w (along u) of the screw and its images: +B at z0 + 2 m t and -B at
 *    -z0 + 2 m t for every integer m (each reflection in a free surface
 *    changes the sign of a screw; Hirth & Lothe 1982 ch. 3 for the half-space,
 *    the repeated reflection for the plate), summed in closed form
 *    (sum_m xi / (xi^2 + (z - m L)^2) = (pi/L) sinh(2 pi xi/L) / (cosh(2 pi xi/L) - cos(2 pi z/L)),
 *    L = 2 t, and the like for the other derivative). The correction is that
 *    sum less the real line, so it is smooth in the foil and invariant along
 *    the line. It makes sigma_nz (the antiplane traction) vanish on both
 *    surfaces. The edge component of b gets the exact isotropic plate correction
 *    (surfacePlateEdge.ts; kind 'parallel-edge-plate': the half-space image of each
 *    surface, Head 1953, plus the Fourier solution of the strip for what each
 *    leaves on the other surface; both surfaces free everywhere).
 * 2. Line normal to the surfaces (u x n = 0). The edge component of b gets the
 *    half-space correction of each surface of surfaceHalfSpaceInclined.ts (kind
 *    'normal-edge-half-space', with the twist below for the screw component). The twist of Eshelby & Stroh
 *    (1951, Phil. Mag. 42, 1401): azimuthal displacement
 *      u_theta(r, z) = -(B/2pi) int_0^inf J1(k r) sinh(k (z - t/2)) / (k cosh(k t/2)) dk,
 *    which cancels sigma_theta z = G B / (2 pi r) of the screw on z = 0 and
 *    z = t; expanding 1/cosh gives the image series evaluated here,
 *      u_theta / r = -(B/2pi) sum_m (-1)^m [h((m+1) t - z) - h(z + m t)],  h(a) = 1/(sqrt(r^2+a^2) + a),
 *    each term the half-space twist (sqrt(r^2+a^2) - a)/r of Eshelby & Stroh.
 *    The correction depends on depth along the line (not invariant).
 *
 * With anisotropic elasticity a line parallel to the surfaces gets the exact
 * anisotropic plate correction of surfacePlateStroh.ts instead (kind
 * 'parallel-stroh-plate': the two Stroh half-space images of surfaceImagesStroh.ts
 * plus the Fourier solution of the strip for what each leaves on the other
 * surface; all of b, both surfaces free everywhere), when its Stroh eigenvalues
 * are well separated.
 * Lines inclined to the surfaces get the half-space corrections of
 * surfaceHalfSpaceInclined.ts (each surface freed on its own, isotropic response).
 * Added to the anisotropic (Stroh) infinite field the screw corrections above
 * are the isotropic ones: there they are an approximation (tractions do not
 * vanish exactly).
 * Coordinates: crystal Cartesian nm, depth z = r.n with n the unit foil normal
 * (the entrance surface passes through the origin, geometry/frames.ts).
 */
import { type Vec3, cross, dot, norm, unit } from '../math/vec3.js';
import { type DisplacementField, superpose } from './field.js';
import { plateEdgeCorrection } from './surfacePlateEdge.js';
import { strohImagesApply } from './surfaceImagesStroh.js';
import { plateStrohCorrection } from './surfacePlateStroh.js';
import { inclinedHalfSpaceCorrection } from './surfaceHalfSpaceInclined.js';
import { plateTwistScratch, plateTwistSeries, plateTwistTabulated } from './surfacePlateTwist.js';
import { stiffnessTensor } from './stiffness.js';

export type SurfaceCorrectionKind =
  | 'parallel-screw-images'
  | 'parallel-edge-plate'
  | 'parallel-stroh-plate'
  | 'normal-screw-twist'
  | 'normal-edge-half-space'
  | 'inclined-half-space';

/** Whether a correction keeps the field invariant along the line (the shared-column method needs that). */
export function invariantAlongLine(kind: SurfaceCorrectionKind): boolean {
  return kind === 'parallel-screw-images' || kind === 'parallel-edge-plate' || kind === 'parallel-stroh-plate';
}

/** Plain data (worker threads rebuild the field from it). */
export interface SurfaceCorrectionSpec {
  readonly kind: SurfaceCorrectionKind;
  /** Unit foil normal (crystal Cartesian); the foil is 0 <= r.n <= thickness_nm. */
  readonly normal: Vec3;
  readonly thickness_nm: number;
}

/** How close to parallel / normal a line must be (|u.n| resp. |u x n|) to get its correction. */
export const GEOMETRY_TOLERANCE = 1e-9;

/**
 * The correction that applies to a line (unit `line`, through `point_nm`) with
 * Burgers vector b in the foil, or null: a line parallel
 * to the surfaces that does not lie strictly inside the foil (one lying in a
 * surface, or a partial of a ribbon placed outside the foil: its images would
 * not be outside the foil). With `stiffness_GPa` (anisotropic elasticity) a
 * parallel line gets the exact anisotropic plate correction
 * (surfacePlateStroh.ts, every Burgers vector) when its Stroh eigenvalues are
 * well separated, else the isotropic images: the screw image series for a pure
 * screw ('parallel-screw-images'), that series plus the exact plate correction of the
 * edge component (surfacePlateEdge.ts) otherwise ('parallel-edge-plate'). A line inclined to the
 * surfaces gets the half-space corrections of both surfaces (surfaceHalfSpaceInclined.ts); a line
 * normal to them the plate twist of its screw component and, with an edge component,
 * the half-space corrections of that component ('normal-edge-half-space').
 */
export function surfaceCorrectionFor(
  b_nm: Vec3,
  line: Vec3,
  point_nm: Vec3,
  normal: Vec3,
  thickness_nm: number,
  stiffness_GPa?: readonly number[],
): SurfaceCorrectionSpec | null {
  const u = unit(line);
  const n = unit(normal);
  const screw = Math.abs(dot(b_nm, u)) >= 1e-12 * norm(b_nm);
  const geometry = correctableGeometry(u, n);
  if (geometry === 'parallel') {
    const z0 = dot(point_nm, n);
    if (!(z0 > 1e-9 * thickness_nm && z0 < (1 - 1e-9) * thickness_nm)) return null;
    if (stiffness_GPa !== undefined && strohImagesApply(stiffness_GPa, u, n)) return { kind: 'parallel-stroh-plate', normal: n, thickness_nm };
    const edge = norm(cross(b_nm, u)) >= 1e-12 * norm(b_nm);
    return edge ? { kind: 'parallel-edge-plate', normal: n, thickness_nm } : { kind: 'parallel-screw-images', normal: n, thickness_nm };
  }
  if (geometry === 'normal') {
    const edge = norm(cross(b_nm, u)) >= 1e-12 * norm(b_nm);
    return edge ? { kind: 'normal-edge-half-space', normal: n, thickness_nm } : screw ? { kind: 'normal-screw-twist', normal: n, thickness_nm } : null;
  }
  return { kind: 'inclined-half-space', normal: n, thickness_nm };
}

/** Whether a line is parallel or normal to the surfaces (the geometries with a correction). */
export function correctableGeometry(line: Vec3, normal: Vec3): 'parallel' | 'normal' | 'inclined' {
  const u = unit(line);
  const n = unit(normal);
  if (Math.abs(dot(u, n)) < GEOMETRY_TOLERANCE) return 'parallel';
  if (norm(cross(u, n)) < GEOMETRY_TOLERANCE) return 'normal';
  return 'inclined';
}

export interface SurfaceCorrectionOptions {
  readonly b_nm: Vec3;
  readonly line: Vec3;
  readonly point_nm: Vec3;
  readonly correction: SurfaceCorrectionSpec;
  /** The Voigt stiffness of the line's own field when it is anisotropic (needed for 'parallel-stroh-plate'). */
  readonly stiffness_GPa?: readonly number[];
  /** Poisson ratio of the isotropic response (needed for 'inclined-half-space'). */
  readonly poissonRatio?: number;
}

/** The correction field (to be added to the infinite-medium field of the same line). */
export function surfaceCorrection(o: SurfaceCorrectionOptions): DisplacementField {
  const c = o.correction;
  if (c.kind === 'parallel-stroh-plate') {
    if (o.stiffness_GPa === undefined) throw new Error('internal: the anisotropic plate correction needs the stiffness');
    return plateStrohCorrection({ b_nm: o.b_nm, line: o.line, point_nm: o.point_nm, normal: c.normal, thickness_nm: c.thickness_nm, stiffness_GPa: o.stiffness_GPa });
  }
  // the half-space correction of each surface (surfaceHalfSpaceInclined.ts) of a line, or of part of its b
  const halfSpace = (b_nm: Vec3): DisplacementField => {
    if (o.poissonRatio === undefined) throw new Error('internal: the half-space correction needs the Poisson ratio');
    return inclinedHalfSpaceCorrection({
      b_nm,
      line: o.line,
      point_nm: o.point_nm,
      normal: c.normal,
      thickness_nm: c.thickness_nm,
      poissonRatio: o.poissonRatio,
      ...(o.stiffness_GPa === undefined ? {} : { stiffness_GPa: o.stiffness_GPa }),
    });
  };
  if (c.kind === 'inclined-half-space') return halfSpace(o.b_nm);
  if (c.kind === 'normal-edge-half-space') {
    // the screw part: the plate twist (exact in an isotropic plate); the edge part b - (b.u) u: the half-space
    // correction of each surface (surfaceHalfSpaceInclined.ts, which holds for a line at any angle to the surface)
    const u = unit(o.line);
    const bs = dot(o.b_nm, u);
    const edge = halfSpace([o.b_nm[0] - bs * u[0], o.b_nm[1] - bs * u[1], o.b_nm[2] - bs * u[2]]);
    return Math.abs(bs) < 1e-12 * norm(o.b_nm) ? edge : superpose([normalScrewTwist(o), edge]);
  }
  if (c.kind === 'parallel-edge-plate') {
    if (o.poissonRatio === undefined) throw new Error('internal: the plate correction of the edge component needs the Poisson ratio');
    // an anisotropic line here has (nearly) degenerate Stroh eigenvalues: isotropic across the line (e.g. along c
    // of a hexagonal crystal), so the plane-strain Poisson ratio of that plane is the one that frees the surfaces
    const nu = o.stiffness_GPa === undefined ? o.poissonRatio : inPlanePoissonRatio(o.stiffness_GPa, o.line, c.normal);
    const edge = plateEdgeCorrection({ b_nm: o.b_nm, line: o.line, point_nm: o.point_nm, normal: c.normal, thickness_nm: c.thickness_nm, poissonRatio: nu });
    return Math.abs(dot(o.b_nm, unit(o.line))) < 1e-12 * norm(o.b_nm) ? edge : superpose([parallelScrewImages(o), edge]);
  }
  return c.kind === 'parallel-screw-images' ? parallelScrewImages(o) : normalScrewTwist(o);
}

/**
 * The Poisson ratio of plane strain in the plane across a line u (frame m = n x u, n) of an anisotropic crystal
 * taken as isotropic in that plane: lambda = C'_mmnn, mu = C'_mnmn, nu = lambda / (2 (lambda + mu)) (isotropic
 * elasticity, e.g. Hirth & Lothe 1982 ch. 2). Exact for a transversely isotropic crystal along its axis
 * (hexagonal along c: nu = C12 / (C11 + C12)); for an isotropic C the material's own nu.
 */
export function inPlanePoissonRatio(stiffness_GPa: readonly number[], line: Vec3, normal: Vec3): number {
  const C = stiffnessTensor(stiffness_GPa);
  const u = unit(line);
  const n = unit(normal);
  const m = unit(cross(n, u));
  let lambda = 0;
  let mu = 0;
  for (let i = 0; i < 3; i++)
    for (let j = 0; j < 3; j++)
      for (let k = 0; k < 3; k++)
        for (let l = 0; l < 3; l++) {
          const c = C[((i * 3 + j) * 3 + k) * 3 + l];
          lambda += m[i] * m[j] * n[k] * n[l] * c;
          mu += m[i] * n[j] * m[k] * n[l] * c;
        }
  return lambda / (2 * (lambda + mu));
}

/** arg(z) wrapped into (-pi, pi]. */
function wrap(a: number): number {
  if (a > Math.PI) return a - 2 * Math.PI;
  if (a <= -Math.PI) return a + 2 * Math.PI;
  return a;
}

function parallelScrewImages(o: SurfaceCorrectionOptions): DisplacementField {
  const u = unit(o.line);
  const n = o.correction.normal;
  const t = o.correction.thickness_nm;
  const e1 = unit(cross(n, u)); // e1, n, u right-handed
  const B = dot(o.b_nm, u);
  const c = B / (2 * Math.PI);
  const A = Math.PI / (2 * t); // pi / L, L = 2 t
  const P = o.point_nm;
  const xi0 = dot(P, e1);
  const z0 = dot(P, n);
  const tiny = 1e-7 * t;
  const c0 = Math.cos(2 * A * z0), s0 = Math.sin(2 * A * z0);
  const e10 = e1[0], e11 = e1[1], e12 = e1[2];
  const n0 = n[0], n1 = n[1], n2 = n[2];
  const u0 = u[0], u1 = u[1], u2 = u[2];
  // the two derivatives of the correction w_c (along u) into d[0] = dw/dxi, d[1] = dw/dz
  const d = new Float64Array(2);
  const derivs = (x: number, y: number, z: number): void => {
    let xi = x * e10 + y * e11 + z * e12 - xi0;
    const zz = x * n0 + y * n1 + z * n2;
    // on the line itself both the image sum and the real line are 0/0; the correction is smooth there: step aside
    if (Math.abs(xi) < tiny && Math.abs(zz - z0) < tiny) xi = tiny;
    const E = Math.exp(-2 * A * Math.abs(xi));
    const sg = xi < 0 ? -1 : 1;
    // a1 = 2 A (zz - z0), a2 = 2 A (zz + z0): their sines and cosines from those of 2 A zz (angle addition)
    const Cz = Math.cos(2 * A * zz), Sz = Math.sin(2 * A * zz);
    const cos1 = Cz * c0 + Sz * s0, sin1 = Sz * c0 - Cz * s0;
    const cos2 = Cz * c0 - Sz * s0, sin2 = Sz * c0 + Cz * s0;
    const den1 = 1 + E * E - 2 * E * cos1;
    const den2 = 1 + E * E - 2 * E * cos2;
    const dz1 = zz - z0;
    const rho2 = xi * xi + dz1 * dz1;
    // sums over all images (real line included), then the real line taken off
    const sumXi = A * (-(2 * E * sin1) / den1 + (2 * E * sin2) / den2);
    const sumZ = A * sg * (1 - E * E) * (1 / den1 - 1 / den2);
    d[0] = c * (sumXi + dz1 / rho2);
    d[1] = c * (sumZ - xi / rho2);
  };
  return {
    displacement(out, x, y, z) {
      const xi = x * e10 + y * e11 + z * e12 - xi0;
      const zz = x * n0 + y * n1 + z * n2;
      const a = A * xi;
      const b1 = A * (zz - z0);
      const b2 = A * (zz + z0);
      const th = Math.tanh(a);
      // arg(sinh(w)/w) for w = a + i b1 (|b1| < pi/2: no zero, continuous) and arg(sinh(a + i b2)) (0 < b2 < pi)
      const arg1 = wrap(Math.atan2(Math.sin(b1), th * Math.cos(b1)) - Math.atan2(b1, a));
      const arg2 = Math.atan2(Math.sin(b2), th * Math.cos(b2));
      const w = c * (arg1 - arg2);
      out[0] = w * u0;
      out[1] = w * u1;
      out[2] = w * u2;
    },
    gradient(out, x, y, z) {
      derivs(x, y, z);
      for (let i = 0; i < 3; i++) {
        const ui = i === 0 ? u0 : i === 1 ? u1 : u2;
        out[3 * i] = ui * (d[0] * e10 + d[1] * n0);
        out[3 * i + 1] = ui * (d[0] * e11 + d[1] * n1);
        out[3 * i + 2] = ui * (d[0] * e12 + d[1] * n2);
      }
    },
    directional(g, k) {
      const gu = g[0] * u0 + g[1] * u1 + g[2] * u2;
      const ke = k[0] * e10 + k[1] * e11 + k[2] * e12;
      const kn = k[0] * n0 + k[1] * n1 + k[2] * n2;
      if (gu === 0) return () => 0;
      return (x, y, z) => {
        derivs(x, y, z);
        return gu * (d[0] * ke + d[1] * kn);
      };
    },
  };
}

function normalScrewTwist(o: SurfaceCorrectionOptions): DisplacementField {
  const u = unit(o.line);
  const n = o.correction.normal;
  const t = o.correction.thickness_nm;
  // in-plane frame e1, e2 with e1 x e2 = n; the screw field is (B/2pi) theta_n n with B = b.u (either sense of u)
  const trial: Vec3 = Math.abs(n[0]) < 0.9 ? [1, 0, 0] : [0, 1, 0];
  const e1 = unit(cross(trial, n));
  const e2 = cross(n, e1);
  const B = dot(o.b_nm, u);
  const c = -B / (2 * Math.PI);
  const P = o.point_nm;
  const x0 = dot(P, e1);
  const y0 = dot(P, e2);
  // g = u_theta / r, gr = (dg/dr)/r, gz = dg/dz into s[0..2] (times c), by the series (surfacePlateTwist.ts)
  const s = new Float64Array(3);
  const tiny2 = (1e-7 * t) ** 2;
  const ps = plateTwistScratch();
  const twist = (X: number, Y: number, Z: number): void => {
    // the twist is singular only where the line meets a surface (r = 0, z = 0 or t): keep it finite there
    plateTwistSeries(Math.max(X * X + Y * Y, tiny2), Z, t, s, ps);
    s[0] *= c;
    s[1] *= c;
    s[2] *= c;
  };
  const e10 = e1[0], e11 = e1[1], e12 = e1[2];
  const e20 = e2[0], e21 = e2[1], e22 = e2[2];
  const n0 = n[0], n1 = n[1], n2 = n[2];
  // local gradient L[a][b] (a: e1, e2 components of u; b: d/de1, d/de2, d/dn) into loc[0..5]
  const loc = new Float64Array(6);
  const local = (x: number, y: number, z: number): void => {
    const X = x * e10 + y * e11 + z * e12 - x0;
    const Y = x * e20 + y * e21 + z * e22 - y0;
    const Z = x * n0 + y * n1 + z * n2;
    twist(X, Y, Z);
    const g = s[0], gr = s[1], gz = s[2];
    // u_1 = -Y g, u_2 = X g
    loc[0] = -Y * X * gr;
    loc[1] = -g - Y * Y * gr;
    loc[2] = -Y * gz;
    loc[3] = g + X * X * gr;
    loc[4] = X * Y * gr;
    loc[5] = X * gz;
  };
  return {
    displacement(out, x, y, z) {
      const X = x * e10 + y * e11 + z * e12 - x0;
      const Y = x * e20 + y * e21 + z * e22 - y0;
      const Z = x * n0 + y * n1 + z * n2;
      twist(X, Y, Z);
      const a = -Y * s[0];
      const b = X * s[0];
      out[0] = a * e10 + b * e20;
      out[1] = a * e11 + b * e21;
      out[2] = a * e12 + b * e22;
    },
    gradient(out, x, y, z) {
      local(x, y, z);
      for (let i = 0; i < 3; i++) {
        const p = i === 0 ? e10 : i === 1 ? e11 : e12;
        const q = i === 0 ? e20 : i === 1 ? e21 : e22;
        for (let j = 0; j < 3; j++) {
          const ej1 = j === 0 ? e10 : j === 1 ? e11 : e12;
          const ej2 = j === 0 ? e20 : j === 1 ? e21 : e22;
          const ejn = j === 0 ? n0 : j === 1 ? n1 : n2;
          out[3 * i + j] = p * (loc[0] * ej1 + loc[1] * ej2 + loc[2] * ejn) + q * (loc[3] * ej1 + loc[4] * ej2 + loc[5] * ejn);
        }
      }
    },
    directional(gv, k) {
      const g1 = gv[0] * e10 + gv[1] * e11 + gv[2] * e12;
      const g2 = gv[0] * e20 + gv[1] * e21 + gv[2] * e22;
      const k1 = k[0] * e10 + k[1] * e11 + k[2] * e12;
      const k2 = k[0] * e20 + k[1] * e21 + k[2] * e22;
      const kn = k[0] * n0 + k[1] * n1 + k[2] * n2;
      if (g1 === 0 && g2 === 0) return () => 0;
      // the hot path: the series beyond its first terms from a table (surfacePlateTwist.ts), the local gradient contracted by hand
      const q = new Float64Array(3);
      return (x, y, z) => {
        const X = x * e10 + y * e11 + z * e12 - x0;
        const Y = x * e20 + y * e21 + z * e22 - y0;
        const Z = x * n0 + y * n1 + z * n2;
        const r2 = X * X + Y * Y;
        plateTwistTabulated(r2 > tiny2 ? r2 : tiny2, Z, t, q);
        const g = q[0], gr = q[1], gz = q[2];
        // g1 (L00 k1 + L01 k2 + L02 kn) + g2 (L10 k1 + L11 k2 + L12 kn), L as in local()
        const A = g2 * X - g1 * Y; // the gradient's rows are (-Y, X) times (X gr, Y gr, gz) plus g (e2 e1^T - e1 e2^T)
        return c * (A * (X * gr * k1 + Y * gr * k2 + gz * kn) + g * (g2 * k1 - g1 * k2));
      };
    },
  };
}
