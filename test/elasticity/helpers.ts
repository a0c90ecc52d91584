/** Small numerical helpers shared by the elasticity tests (not a test file). */
import type { Vec3 } from '../../src/math/vec3.js';
import type { DisplacementField } from '../../src/elasticity/field.js';
import { seededRandom } from '../../src/analysis/identifyRandom.js';
import { gaussLegendre } from '../../src/math/gaussLegendre.js';

/** Deterministic pseudo-random numbers in [0, 1) (mulberry32, the project's seeded generator). */
export function rng(seed: number): () => number {
  return seededRandom(seed).uniform;
}

export function randomUnit(r: () => number): Vec3 {
  for (;;) {
    const v: Vec3 = [2 * r() - 1, 2 * r() - 1, 2 * r() - 1];
    const n = Math.hypot(v[0], v[1], v[2]);
    if (n > 0.1 && n <= 1) return [v[0] / n, v[1] / n, v[2] / n];
  }
}

/** Central finite-difference gradient of field.displacement, out[3 i + j] = dR_i/dx_j. */
export function fdGradient(f: DisplacementField, p: Vec3, h: number): Float64Array {
  const out = new Float64Array(9);
  const a = new Float64Array(3);
  const b = new Float64Array(3);
  for (let j = 0; j < 3; j++) {
    const pp: [number, number, number] = [p[0], p[1], p[2]];
    const pm: [number, number, number] = [p[0], p[1], p[2]];
    pp[j] += h;
    pm[j] -= h;
    f.displacement(a, pp[0], pp[1], pp[2]);
    f.displacement(b, pm[0], pm[1], pm[2]);
    for (let i = 0; i < 3; i++) out[3 * i + j] = (a[i] - b[i]) / (2 * h);
  }
  return out;
}

export const maxAbs = (a: ArrayLike<number>): number => {
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i]));
  return m;
};

export const maxAbsDiff = (a: ArrayLike<number>, b: ArrayLike<number>): number => {
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i] - b[i]));
  return m;
};

/**
 * The circle centre + rad (cos 2 pi s a + sin 2 pi s b), 0 <= s < 1, with its tangent dc/ds: right-handed about
 * a x b (a, b orthonormal), the curve argument of `loopIntegral`.
 */
export function circle(centre: Vec3, a: Vec3, b: Vec3, rad: number): (s: number) => { p: Vec3; t: Vec3 } {
  return (s) => {
    const ph = 2 * Math.PI * s;
    const cs = Math.cos(ph), sn = Math.sin(ph);
    return {
      p: [0, 1, 2].map((i) => centre[i] + rad * (cs * a[i] + sn * b[i])) as unknown as Vec3,
      t: [0, 1, 2].map((i) => 2 * Math.PI * rad * (-sn * a[i] + cs * b[i])) as unknown as Vec3,
    };
  };
}

/**
 * Closed line integral of dR = (grad R) dl along a closed curve c(s), s in [0, 1),
 * with tangent dc/ds, by the trapezoid rule with n points (spectrally accurate for
 * a smooth periodic curve).
 */
export function loopIntegral(
  f: DisplacementField,
  curve: (s: number) => { p: Vec3; t: Vec3 },
  n: number,
): Vec3 {
  const g = new Float64Array(9);
  const acc = [0, 0, 0];
  for (let k = 0; k < n; k++) {
    const { p, t } = curve(k / n);
    f.gradient(g, p[0], p[1], p[2]);
    for (let i = 0; i < 3; i++) acc[i] += g[3 * i] * t[0] + g[3 * i + 1] * t[1] + g[3 * i + 2] * t[2];
  }
  return [acc[0] / n, acc[1] / n, acc[2] / n];
}

/** Closed line integral of dR along a polygon (vertices in order), composite Gauss-Legendre per side. */
export function polygonIntegral(f: DisplacementField, vertices: Vec3[], panels: number, order: number): Vec3 {
  const { x, w } = gaussLegendre(order);
  const g = new Float64Array(9);
  const acc = [0, 0, 0];
  for (let v = 0; v < vertices.length; v++) {
    const a = vertices[v];
    const b = vertices[(v + 1) % vertices.length];
    const d: Vec3 = [b[0] - a[0], b[1] - a[1], b[2] - a[2]];
    for (let p = 0; p < panels; p++) {
      for (let q = 0; q < order; q++) {
        const s = (p + (x[q] + 1) / 2) / panels;
        f.gradient(g, a[0] + s * d[0], a[1] + s * d[1], a[2] + s * d[2]);
        const wt = w[q] / (2 * panels);
        for (let i = 0; i < 3; i++) acc[i] += wt * (g[3 * i] * d[0] + g[3 * i + 1] * d[1] + g[3 * i + 2] * d[2]);
      }
    }
  }
  return [acc[0], acc[1], acc[2]];
}
