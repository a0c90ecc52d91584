import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { type Vec3, cross, dot, norm, scale, unit } from '../../src/math/vec3.js';
import { correctableGeometry, surfaceCorrection, surfaceCorrectionFor, type SurfaceCorrectionSpec } from '../../src/elasticity/surfaceRelaxation.js';
import { buildField, type DislocationFieldSpec } from '../../src/imaging/fieldSpecs.js';
import type { DisplacementField } from '../../src/elasticity/field.js';
import { circle, fdGradient, loopIntegral, maxAbs, maxAbsDiff, rng } from './helpers.js';
import { needPython, pythonJson } from '../python.js';
import { getMaterial } from '../../src/crystal/materials.js';
import { materialStiffness, stiffnessTensor } from '../../src/elasticity/stiffness.js';
import { strohHalfSpaceImages } from '../../src/elasticity/surfaceImagesStroh.js';
import { halfSpaceGradientDirect, inclinedHalfSpaceCorrection } from '../../src/elasticity/surfaceHalfSpaceInclined.js';
import { straightDislocation } from '../../src/elasticity/straightDislocation.js';
import { isotropicVoigt } from '../../src/elasticity/stiffness.js';
import { edgeHalfSpaceImages } from '../../src/elasticity/surfaceEdgeImages.js';
import { superpose } from '../../src/elasticity/field.js';

// The foil: 0 <= r.n <= t with a tilted normal (any orientation must do), isotropic medium.
const N: Vec3 = unit([1, 2, 2]);
const T = 60; // nm
const NU = 0.34;
const MU = 1; // shear modulus (tractions are compared relative to mu b / (2 pi d), so its value does not matter)
const LAMBDA = (2 * MU * NU) / (1 - 2 * NU);

/** Unit vectors e1, e2 perpendicular to N (e1 x e2 = N). */
const E1 = unit(cross([0, 0, 1], N));
const E2 = cross(N, E1);

/** Isotropic Hooke's law from a displacement gradient: traction sigma . n (Hirth & Lothe 1982 ch. 2). */
function traction(grad: Float64Array, n: Vec3): Vec3 {
  const eps = (i: number, j: number) => 0.5 * (grad[3 * i + j] + grad[3 * j + i]);
  const tr = eps(0, 0) + eps(1, 1) + eps(2, 2);
  const s = (i: number, j: number) => (i === j ? LAMBDA * tr : 0) + 2 * MU * eps(i, j);
  return [0, 1, 2].map((i) => s(i, 0) * n[0] + s(i, 1) * n[1] + s(i, 2) * n[2]) as unknown as Vec3;
}

const at = (depth: number, a: number, b: number): Vec3 => [
  depth * N[0] + a * E1[0] + b * E2[0],
  depth * N[1] + a * E1[1] + b * E2[1],
  depth * N[2] + a * E1[2] + b * E2[2],
];

interface LineCase {
  name: string;
  b: Vec3;
  u: Vec3;
  P: Vec3;
  depth: number;
}

// a/2<110>-like Burgers vectors of length 0.255 nm
const BL = 0.255;
const U_PAR: Vec3 = unit(scale(E1, 1)); // parallel to the surfaces
const U_PAR2: Vec3 = unit([E1[0] + 0.4 * E2[0], E1[1] + 0.4 * E2[1], E1[2] + 0.4 * E2[2]]);
const lineCases: LineCase[] = [
  { name: 'screw parallel to the surfaces, depth 7 nm', b: scale(U_PAR, BL), u: U_PAR, P: at(7, 0, 0), depth: 7 },
  { name: 'screw parallel to the surfaces (opposite sense, other direction), depth 41 nm', b: scale(U_PAR2, -BL), u: U_PAR2, P: at(41, 3, -2), depth: 41 },
  { name: 'screw normal to the surfaces', b: scale(N, BL), u: N, P: at(0, 1.5, -0.5), depth: 0 },
  { name: 'screw normal to the surfaces, line along -n', b: scale(N, BL), u: scale(N, -1), P: at(20, -2, 1), depth: 20 },
];

function spec(c: LineCase, relaxed: boolean): DislocationFieldSpec {
  const corr = relaxed ? surfaceCorrectionFor(c.b, c.u, c.P, N, T) : null;
  if (relaxed && corr === null) throw new Error('no correction');
  const cut = unit(cross(c.u, cross([0.3, 0.1, 0.9], c.u)));
  return {
    kind: 'dislocation',
    b_nm: c.b,
    line: c.u,
    point_nm: c.P,
    poissonRatio: NU,
    cutDirection: cut,
    coreRadius_nm: 0.05,
    ...(corr === null ? {} : { surfaceCorrection: corr }),
  };
}

const fieldOf = (c: LineCase, relaxed: boolean): DisplacementField => buildField([spec(c, relaxed)])!;

/** Points on the two surfaces at 1 to 25 nm from where the line is (parallel) or emerges (normal), lateral offsets both ways. */
function surfacePoints(c: LineCase): Vec3[] {
  const out: Vec3[] = [];
  const normalLine = correctableGeometry(c.u, N) === 'normal';
  const side = normalLine ? unit(cross(c.u, [0.2, 1, 0.3])) : unit(cross(N, c.u));
  const p0 = dot(c.P, N);
  for (const depth of [0, T]) {
    for (const d of [-25, -8, -3, -1, 1, 2.5, 6, 12, 25]) {
      for (const along of [0, 13]) {
        // a point at depth `depth`, lateral offset d from the line, moved `along` the line (parallel case) or around it
        const base = normalLine ? scale(c.u, (depth - p0) / dot(c.u, N)) : scale(N, depth - p0);
        const q: Vec3 = [
          c.P[0] + base[0] + d * side[0] + along * (normalLine ? cross(c.u, side)[0] : c.u[0]) * (normalLine ? 0.1 : 1),
          c.P[1] + base[1] + d * side[1] + along * (normalLine ? cross(c.u, side)[1] : c.u[1]) * (normalLine ? 0.1 : 1),
          c.P[2] + base[2] + d * side[2] + along * (normalLine ? cross(c.u, side)[2] : c.u[2]) * (normalLine ? 0.1 : 1),
        ];
        out.push(q);
      }
    }
  }
  return out;
}

describe('surface relaxation: which lines get a correction', () => {
  it('parallel lines with any b (a pure screw: the screw images; with an edge component: screw and edge images), normal lines with any b (a pure screw: the plate twist; with an edge component: twist and half-space corrections), inclined lines with any b', () => {
    expect(surfaceCorrectionFor(scale(U_PAR, BL), U_PAR, at(10, 0, 0), N, T)?.kind).toBe('parallel-screw-images');
    expect(surfaceCorrectionFor(scale(N, BL), N, at(0, 0, 0), N, T)?.kind).toBe('normal-screw-twist');
    expect(surfaceCorrectionFor(scale(N, BL), scale(N, -1), at(70, 1, 1), N, T)?.kind).toBe('normal-screw-twist');
    expect(surfaceCorrectionFor(scale(E2, BL), U_PAR, at(10, 0, 0), N, T)?.kind).toBe('parallel-edge-plate'); // pure edge parallel to the surfaces
    expect(surfaceCorrectionFor([0.1, 0.05, 0.2], U_PAR, at(10, 0, 0), N, T)?.kind).toBe('parallel-edge-plate'); // mixed
    // a parallel line in a surface or outside the foil (a ribbon's partial placed there): no images
    expect(surfaceCorrectionFor(scale(U_PAR, BL), U_PAR, at(0, 0, 0), N, T)).toBeNull();
    expect(surfaceCorrectionFor(scale(U_PAR, BL), U_PAR, at(T, 0, 0), N, T)).toBeNull();
    expect(surfaceCorrectionFor(scale(U_PAR, BL), U_PAR, at(-3, 0, 0), N, T)).toBeNull();
    const inclined = unit([N[0] + E1[0], N[1] + E1[1], N[2] + E1[2]]);
    expect(surfaceCorrectionFor(scale(inclined, BL), inclined, at(10, 0, 0), N, T)?.kind).toBe('inclined-half-space');
    expect(surfaceCorrectionFor(scale(E2, BL), N, at(10, 0, 0), N, T)?.kind).toBe('normal-edge-half-space'); // pure edge normal to the surfaces
    expect(surfaceCorrectionFor([0.1, 0.2, 0.05], N, at(10, 0, 0), N, T)?.kind).toBe('normal-edge-half-space'); // mixed normal line
    expect(correctableGeometry(inclined, N)).toBe('inclined');
  });
});

describe('surface relaxation: free surfaces (isotropic Hooke law, Hirth & Lothe 1982 ch. 2; traction-free faces)', () => {
  for (const c of lineCases) {
    it(`${c.name}: traction on both surfaces vanishes with relaxation (< 1e-7 of mu b / 2 pi d) and not without it`, () => {
      const relaxed = fieldOf(c, true);
      const infinite = fieldOf(c, false);
      const g = new Float64Array(9);
      let worstRelaxed = 0;
      let smallestInfinite = Infinity;
      let largestInfinite = 0;
      for (const p of surfacePoints(c)) {
        // distance of the point from the line
        const rel: Vec3 = [p[0] - c.P[0], p[1] - c.P[1], p[2] - c.P[2]];
        const perp = norm(cross(rel, c.u));
        const ref = (MU * BL) / (2 * Math.PI * Math.max(perp, 0.5));
        relaxed.gradient(g, p[0], p[1], p[2]);
        worstRelaxed = Math.max(worstRelaxed, norm(traction(g, N)) / ref);
        infinite.gradient(g, p[0], p[1], p[2]);
        const ti = norm(traction(g, N)) / ref;
        smallestInfinite = Math.min(smallestInfinite, ti);
        largestInfinite = Math.max(largestInfinite, ti);
      }
      expect(worstRelaxed).toBeLessThan(1e-7);
      // the infinite-medium screw loads the surfaces with a traction of the order of mu b / (2 pi d)
      expect(largestInfinite).toBeGreaterThan(0.3);
    });
  }

  it('mixed line parallel to the surfaces in the plate: the antiplane traction (along u) vanishes (screw image series, exact), the in-plane traction of the edge component too (plate correction, to 1e-6 of the unrelaxed one; measured 4e-8)', () => {
    const b: Vec3 = [0.6 * BL * U_PAR[0] + 0.8 * BL * E2[0], 0.6 * BL * U_PAR[1] + 0.8 * BL * E2[1], 0.6 * BL * U_PAR[2] + 0.8 * BL * E2[2]];
    const c: LineCase = { name: 'mixed', b, u: U_PAR, P: at(9, 0, 0), depth: 9 };
    const relaxed = fieldOf(c, true);
    const infinite = fieldOf(c, false);
    const g = new Float64Array(9);
    let antiplane = 0;
    let inPlane = 0;
    let inPlaneInfinite = 0;
    const inPlaneOf = (tr: Vec3) => Math.hypot(tr[0] - dot(tr, c.u) * c.u[0], tr[1] - dot(tr, c.u) * c.u[1], tr[2] - dot(tr, c.u) * c.u[2]);
    for (const p of surfacePoints(c)) {
      relaxed.gradient(g, p[0], p[1], p[2]);
      const tr = traction(g, N);
      antiplane = Math.max(antiplane, Math.abs(dot(tr, c.u)));
      inPlane = Math.max(inPlane, inPlaneOf(tr));
      infinite.gradient(g, p[0], p[1], p[2]);
      inPlaneInfinite = Math.max(inPlaneInfinite, inPlaneOf(traction(g, N)));
    }
    expect(antiplane).toBeLessThan(1e-9);
    expect(inPlane / inPlaneInfinite).toBeLessThan(1e-6);
    expect(inPlaneInfinite).toBeGreaterThan(0.1 * (0.8 * BL) / (2 * Math.PI * 9));
  });
});

describe('surface relaxation: the correction is an elastic field', () => {
  for (const c of lineCases) {
    const corr = surfaceCorrection({ b_nm: c.b, line: c.u, point_nm: c.P, correction: surfaceCorrectionFor(c.b, c.u, c.P, N, T) as SurfaceCorrectionSpec });
    const inside: Vec3[] = [at(3, 4, 1), at(15, -6, 2), at(30, 1, -9), at(52, 3, 3), at(58, -1, 0.5), at(20, 40, -30)];
    it(`${c.name}: gradient equals finite differences of the displacement (central, h = 1e-4 nm) to 1e-8`, () => {
      const g = new Float64Array(9);
      for (const p of inside) {
        corr.gradient(g, p[0], p[1], p[2]);
        expect(maxAbsDiff(g, fdGradient(corr, p, 1e-4))).toBeLessThan(1e-8);
      }
    });
    it(`${c.name}: equilibrium div sigma = 0 inside the foil (finite differences of the stress, Navier's equations; < 1e-6 of mu b / d^2)`, () => {
      const g = new Float64Array(9);
      const h = 1e-3;
      for (const p of inside) {
        const div = [0, 0, 0];
        for (let j = 0; j < 3; j++) {
          const ej: Vec3 = [j === 0 ? 1 : 0, j === 1 ? 1 : 0, j === 2 ? 1 : 0];
          corr.gradient(g, p[0] + h * ej[0], p[1] + h * ej[1], p[2] + h * ej[2]);
          const sp = [traction(g, [1, 0, 0]), traction(g, [0, 1, 0]), traction(g, [0, 0, 1])]; // sp[k][i] = sigma_ik
          corr.gradient(g, p[0] - h * ej[0], p[1] - h * ej[1], p[2] - h * ej[2]);
          const sm = [traction(g, [1, 0, 0]), traction(g, [0, 1, 0]), traction(g, [0, 0, 1])];
          for (let i = 0; i < 3; i++) div[i] += (sp[j][i] - sm[j][i]) / (2 * h);
        }
        const d = Math.min(dot(p, N), T - dot(p, N));
        expect(maxAbs(div)).toBeLessThan((1e-6 * MU * BL) / (d * d));
      }
    });
    it(`${c.name}: the relaxed field's Burgers circuit still closes to b (FS/RH, Hirth & Lothe 1982), to 1e-9 nm`, () => {
      const f = fieldOf(c, true);
      const u = unit(c.u);
      const a = unit(cross(u, [0.2, 0.7, -0.4]));
      const bb = cross(u, a);
      // circle of radius 2.5 nm about the line (a normal line: 15 nm deep), right-handed about u
      const normalLine = correctableGeometry(u, N) === 'normal';
      const shift = normalLine ? (15 - dot(c.P, N)) / dot(u, N) : 0;
      const centre: Vec3 = [c.P[0] + shift * u[0], c.P[1] + shift * u[1], c.P[2] + shift * u[2]];
      const rad = normalLine ? 2.5 : Math.min(2.5, 0.5 * c.depth);
      const loop = loopIntegral(
        f,
        circle(centre, a, bb, rad),
        2048,
      );
      expect(maxAbsDiff(loop, c.b)).toBeLessThan(1e-9);
    });
  }
});

describe('surface relaxation: finite everywhere in the foil', () => {
  it('on the line itself and where a normal line meets the surfaces the correction is finite (no NaN)', () => {
    const g = new Float64Array(9);
    const d = new Float64Array(3);
    for (const c of lineCases) {
      const corr = surfaceCorrection({ b_nm: c.b, line: c.u, point_nm: c.P, correction: surfaceCorrectionFor(c.b, c.u, c.P, N, T) as SurfaceCorrectionSpec });
      const normalLine = correctableGeometry(c.u, N) === 'normal';
      const pts: Vec3[] = normalLine
        ? [0, 1e-12, T / 2, T].map((z) => { const s = (z - dot(c.P, N)) / dot(c.u, N); return [c.P[0] + s * c.u[0], c.P[1] + s * c.u[1], c.P[2] + s * c.u[2]] as Vec3; })
        : [c.P, [c.P[0] + 1e-12, c.P[1], c.P[2]]];
      for (const p of pts) {
        corr.gradient(g, p[0], p[1], p[2]);
        corr.displacement(d, p[0], p[1], p[2]);
        expect([...g, ...d].every(Number.isFinite)).toBe(true);
        expect(Number.isFinite(corr.directional([1, 2, 3], [0.1, 0.2, 0.97])(p[0], p[1], p[2]))).toBe(true);
      }
    }
  });
});

describe('surface relaxation: inclined line finite at its emergence points', () => {
  it('the half-space corrections give finite numbers exactly where the line meets a surface', () => {
    const f = inclinedHalfSpaceCorrection({ b_nm: [0.2, 0.1, 0.12], line: [0.5, 0.3, 1], point_nm: [0, 0, 30], normal: [0, 0, 1], thickness_nm: 60, poissonRatio: 0.3 });
    const g = new Float64Array(9);
    for (const p of [[-15, -9, 0], [15, 9, 60]] as Vec3[]) {
      f.gradient(g, p[0], p[1], p[2]);
      expect([...g].every(Number.isFinite)).toBe(true);
      expect(Number.isFinite(f.directional([1, 2, 3], [0, 0, 1])(p[0], p[1], p[2]))).toBe(true);
    }
  });
});

describe('surface relaxation: screw normal to the surfaces against Eshelby & Stroh (1951)', () => {
  it('in a very thick plate the twist near the entrance surface is the half-space closed form u_theta = (B/2pi)(sqrt(r^2+z^2) - z)/r (to r/t)', () => {
    const t = 1e6;
    const B = 0.25;
    const f = surfaceCorrection({ b_nm: [0, 0, B], line: [0, 0, 1], point_nm: [0, 0, 0], correction: { kind: 'normal-screw-twist', normal: [0, 0, 1], thickness_nm: t } });
    const d = new Float64Array(3);
    for (const [r, z] of [[0.5, 0.2], [3, 1], [3, 10], [20, 5], [40, 80]]) {
      f.displacement(d, 0, r, z); // at theta = 90 deg e_theta = -x
      const expected = ((B / (2 * Math.PI)) * (Math.hypot(r, z) - z)) / r;
      expect(Math.abs(-d[0] - expected)).toBeLessThan(2 * (r / t) * (B / (2 * Math.PI)) + 1e-12);
      expect(Math.abs(d[1]) + Math.abs(d[2])).toBeLessThan(1e-15);
    }
  });
});

describe('surface relaxation: independent evaluation (scripts/ref_surface_relaxation.py: scipy quad of the Hankel integral; numpy direct image sums)', () => {
  const py = needPython('scipy', 'numpy');
  const script = readFileSync(new URL('../../scripts/ref_surface_relaxation.py', import.meta.url), 'utf8');
  it('plate twist of a normal screw (u_theta, du/dr, du/dz) to 1e-7 relative, r from 0.3 t to 4 t', (ctx) => {
    py.require(ctx);
    const t = 50;
    const B = 0.25;
    const pts = [[3, 10], [15, 1], [15, 25], [40, 44], [120, 30], [200, 5], [0.7, 49]];
    const ref = pythonJson<{ u: number; ur: number; uz: number }[]>(script, pts.map(([r, z]) => ({ kind: 'normal', r, z, t, B })));
    const f = surfaceCorrection({ b_nm: [0, 0, B], line: [0, 0, 1], point_nm: [0, 0, 0], correction: { kind: 'normal-screw-twist', normal: [0, 0, 1], thickness_nm: t } });
    const d = new Float64Array(3);
    const g = new Float64Array(9);
    pts.forEach(([r, z], i) => {
      // point on +x: e_theta = +y, u_theta = u_y, du_theta/dr = du_y/dx, du_theta/dz = du_y/dz
      f.displacement(d, r, 0, z);
      f.gradient(g, r, 0, z);
      const scaleU = Math.max(Math.abs(ref[i].u), 1e-6);
      expect(Math.abs(d[1] - ref[i].u)).toBeLessThan(1e-7 * scaleU + 1e-12);
      expect(Math.abs(g[3] - ref[i].ur)).toBeLessThan(1e-7 * Math.max(Math.abs(ref[i].ur), scaleU / r) + 1e-12);
      expect(Math.abs(g[5] - ref[i].uz)).toBeLessThan(1e-7 * Math.max(Math.abs(ref[i].uz), scaleU / t) + 1e-12);
    });
  });
  it('image screws of a parallel screw (dw/dxi, dw/dz) to 1e-8 relative (direct sums over 400000 and 800000 image pairs, extrapolated)', (ctx) => {
    py.require(ctx);
    const t = 50;
    const B = 0.25;
    const pts = [[4, 3, 10], [0.5, 9, 10], [-30, 45, 10], [12, 25, 25], [-2, 48, 46], [90, 30, 3]];
    const ref = pythonJson<{ dxi: number; dz: number }[]>(script, pts.map(([xi, z, z0]) => ({ kind: 'parallel', xi, z, z0, t, B })));
    pts.forEach(([xi, z, z0], i) => {
      // line along +x at depth z0 below the surface z = 0 (n = +z): e1 = n x u = +y, so xi = y
      const f = surfaceCorrection({ b_nm: [B, 0, 0], line: [1, 0, 0], point_nm: [0, 0, z0], correction: { kind: 'parallel-screw-images', normal: [0, 0, 1], thickness_nm: t } });
      const g = new Float64Array(9);
      f.gradient(g, 5, xi, z);
      const s = Math.hypot(ref[i].dxi, ref[i].dz);
      expect(Math.abs(g[1] - ref[i].dxi)).toBeLessThan(1e-8 * s + 1e-13);
      expect(Math.abs(g[2] - ref[i].dz)).toBeLessThan(1e-8 * s + 1e-13);
    });
  });
});

describe('surface relaxation with the anisotropic (Stroh) field: half-space images (Ting 1996 ch. 8; Barnett & Lothe 1974)', () => {
  // Traction C_ijkl u_k,l n_j (Hooke's law with the crystal's own stiffness tensor) on the foil surfaces.
  const cu = getMaterial('Cu');
  const zn = getMaterial('Zn');
  const tractionC = (C: Float64Array, g: Float64Array, n: Vec3): Vec3 => {
    const out = [0, 0, 0];
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) for (let k = 0; k < 3; k++) for (let l = 0; l < 3; l++) out[i] += C[((i * 3 + j) * 3 + k) * 3 + l] * g[3 * k + l] * n[j];
    return out as unknown as Vec3;
  };
  const geometries: [string, typeof cu, Vec3, Vec3, Vec3][] = [
    // label, material, foil normal (Cartesian), line (Cartesian), Burgers vector direction (Cartesian)
    ['Cu, [0 0 1] foil, screw along [1 1 0]', cu, [0, 0, 1], [1, 1, 0], [1, 1, 0]],
    ['Cu, [1 1 1] foil, screw along [1 -1 0]', cu, [1, 1, 1], [1, -1, 0], [1, -1, 0]],
    ['Cu, [1 1 1] foil, 60-degree line along [1 -1 0], b along [1 0 -1]', cu, [1, 1, 1], [1, -1, 0], [1, 0, -1]],
    ['Cu, [1 1 1] foil, edge along [1 1 -2], b along [1 -1 0]', cu, [1, 1, 1], [1, 1, -2], [1, -1, 0]],
    ['Zn, [1 0 0] Cartesian foil normal, mixed line along Cartesian [0 1 1]', zn, [1, 0, 0], [0, 1, 1], [0.3, 1, 0.2]],
  ];
  const setUp = (mat: typeof cu, nrm: Vec3, line: Vec3, bdir: Vec3, depth: number, t: number) => {
    const voigt = materialStiffness(mat);
    const n = unit(nrm);
    const u = unit(line);
    const b = scale(unit(bdir), 0.25);
    const P = scale(n, depth);
    const base = { kind: 'dislocation' as const, b_nm: b, line: u, point_nm: P, poissonRatio: mat.elastic.poissonRatio, cutDirection: n, coreRadius_nm: 0.05, stiffness_GPa: voigt };
    const corr = surfaceCorrectionFor(b, u, P, n, t, voigt);
    return { voigt, C: stiffnessTensor(voigt), n, u, b, P, base, corr };
  };
  for (const [label, mat, nrm, line, bdir] of geometries) {
    it(`${label}: the entrance-surface image alone makes that surface of a half-space traction-free (< 1e-9 of the unrelaxed traction)`, () => {
      const s = setUp(mat, nrm, line, bdir, 7, 60);
      expect(s.corr?.kind).toBe('parallel-stroh-plate');
      const image = strohHalfSpaceImages({ b_nm: s.b, line: s.u, point_nm: s.P, normal: s.n, thickness_nm: 60, stiffness_GPa: s.voigt, only: 'entrance' });
      const infinite = buildField([s.base])!;
      const side = unit(cross(s.n, s.u));
      const g = new Float64Array(9);
      const h = new Float64Array(9);
      let worstR = 0;
      let worstI = 0;
      for (const d of [-30, -10, -4, -1, 0, 1, 4, 10, 30]) {
        const p: Vec3 = [d * side[0] + 3 * s.u[0], d * side[1] + 3 * s.u[1], d * side[2] + 3 * s.u[2]];
        infinite.gradient(g, p[0], p[1], p[2]);
        image.gradient(h, p[0], p[1], p[2]);
        worstI = Math.max(worstI, norm(tractionC(s.C, g, s.n)));
        for (let q = 0; q < 9; q++) h[q] += g[q];
        worstR = Math.max(worstR, norm(tractionC(s.C, h, s.n)));
      }
      expect(worstI).toBeGreaterThan(0.1);
      expect(worstR / worstI).toBeLessThan(1e-9);
    });
    it(`${label}: the image field's gradient equals finite differences of its displacement, and it is in equilibrium (C_ijkl u_k,lj = 0)`, () => {
      const s = setUp(mat, nrm, line, bdir, 12, 50);
      const f = strohHalfSpaceImages({ b_nm: s.b, line: s.u, point_nm: s.P, normal: s.n, thickness_nm: 50, stiffness_GPa: s.voigt });
      const g = new Float64Array(9);
      for (const depth of [2, 12, 30, 48]) {
        const p: Vec3 = [depth * s.n[0] + 3 * s.u[0] + 1.5, depth * s.n[1] - 0.7, depth * s.n[2] + 0.4];
        f.gradient(g, p[0], p[1], p[2]);
        expect(maxAbsDiff(g, fdGradient(f, p, 1e-4))).toBeLessThan(1e-8);
        const hh = 1e-3;
        const div = [0, 0, 0];
        for (let j = 0; j < 3; j++) {
          const e: Vec3 = [j === 0 ? hh : 0, j === 1 ? hh : 0, j === 2 ? hh : 0];
          f.gradient(g, p[0] + e[0], p[1] + e[1], p[2] + e[2]);
          const sp = [0, 1, 2].map((i) => tractionC(s.C, g, [i === 0 ? 1 : 0, i === 1 ? 1 : 0, i === 2 ? 1 : 0] as Vec3)); // sp[k][i] = sigma_ik
          f.gradient(g, p[0] - e[0], p[1] - e[1], p[2] - e[2]);
          const sm = [0, 1, 2].map((i) => tractionC(s.C, g, [i === 0 ? 1 : 0, i === 1 ? 1 : 0, i === 2 ? 1 : 0] as Vec3));
          for (let i = 0; i < 3; i++) div[i] += (sp[j][i] - sm[j][i]) / (2 * hh);
        }
        // stress ~ C b / (2 pi d) ~ 100 GPa * 0.25 / 60; its divergence must vanish to FD accuracy
        expect(maxAbs(div)).toBeLessThan(1e-4);
      }
    });
  }
  it('plate of 60 nm: with the exact anisotropic plate correction (surfacePlateStroh.ts) both surfaces are free of traction near the line (< 1e-6 of the unrelaxed traction); the two half-space images alone, without the strip residual, leave 9-15 % (measured)', () => {
    // Measured: the images alone leave 8.8 % to 14.6 % of the unrelaxed traction for the lines
    // above at depth 10 nm; the image of each surface leaves a traction on the other one. The plate correction
    // adds the Fourier solution of the strip for that leftover traction.
    const ratios: number[] = [], imageRatios: number[] = [];
    for (const [, mat, nrm, line, bdir] of geometries) {
      const s = setUp(mat, nrm, line, bdir, 10, 60);
      expect(s.corr?.kind).toBe('parallel-stroh-plate');
      const relaxed = buildField([{ ...s.base, surfaceCorrection: s.corr! }])!;
      const infinite = buildField([s.base])!;
      const images = strohHalfSpaceImages({ b_nm: s.b, line: s.u, point_nm: s.P, normal: s.n, thickness_nm: 60, stiffness_GPa: s.voigt });
      const side = unit(cross(s.n, s.u));
      const g = new Float64Array(9), h = new Float64Array(9);
      let worstR = 0, worstI = 0, worstM = 0;
      for (const depth of [0, 60]) {
        for (const d of [-30, -10, -4, -1, 1, 4, 10, 30]) {
          const p: Vec3 = [depth * s.n[0] + d * side[0], depth * s.n[1] + d * side[1], depth * s.n[2] + d * side[2]];
          relaxed.gradient(g, p[0], p[1], p[2]);
          worstR = Math.max(worstR, norm(tractionC(s.C, g, s.n)));
          infinite.gradient(g, p[0], p[1], p[2]);
          worstI = Math.max(worstI, norm(tractionC(s.C, g, s.n)));
          images.gradient(h, p[0], p[1], p[2]);
          for (let q = 0; q < 9; q++) h[q] += g[q];
          worstM = Math.max(worstM, norm(tractionC(s.C, h, s.n)));
        }
      }
      ratios.push(worstR / worstI);
      imageRatios.push(worstM / worstI);
    }
    console.log('plate residual / unrelaxed', ratios.map((r) => r.toExponential(1)).join(' '), '; images alone', imageRatios.map((r) => r.toFixed(4)).join(' '));
    for (const r of ratios) expect(r).toBeLessThan(1e-6);
    for (const r of imageRatios) {
      expect(r).toBeLessThan(0.25);
      expect(r).toBeGreaterThan(1e-4);
    }
  });
  it('far from the line (160 and 320 nm aside in a 60 nm foil): the plate correction frees the surfaces there too (< 1e-6 of the unrelaxed traction at that point), where the two half-space images alone leave more than 30 % (they tend to minus the line\'s long-range field)', () => {
    // Before the exact plate correction this test documented the failure of the images alone (0.46-0.99 of the
    // unrelaxed traction); it now checks that the strip residual and the far-field form remove it.
    for (const [label, mat, nrm, line, bdir] of [geometries[0], geometries[3]]) {
      const s = setUp(mat, nrm, line, bdir, 10, 60);
      const relaxed = buildField([{ ...s.base, surfaceCorrection: s.corr! }])!;
      const infinite = buildField([s.base])!;
      const images = strohHalfSpaceImages({ b_nm: s.b, line: s.u, point_nm: s.P, normal: s.n, thickness_nm: 60, stiffness_GPa: s.voigt });
      const side = unit(cross(s.n, s.u));
      const g = new Float64Array(9), h = new Float64Array(9);
      const out: string[] = [];
      for (const d of [160, 320]) {
        let tr = 0, ti = 0, tm = 0;
        for (const depth of [0, 60]) {
          const p: Vec3 = [depth * s.n[0] + d * side[0], depth * s.n[1] + d * side[1], depth * s.n[2] + d * side[2]];
          relaxed.gradient(g, p[0], p[1], p[2]);
          tr = Math.max(tr, norm(tractionC(s.C, g, s.n)));
          infinite.gradient(g, p[0], p[1], p[2]);
          ti = Math.max(ti, norm(tractionC(s.C, g, s.n)));
          images.gradient(h, p[0], p[1], p[2]);
          for (let q = 0; q < 9; q++) h[q] += g[q];
          tm = Math.max(tm, norm(tractionC(s.C, h, s.n)));
        }
        out.push(`${d} nm: plate ${(tr / ti).toExponential(1)}, images alone ${(tm / ti).toFixed(3)}`);
        expect(tr / ti).toBeLessThan(1e-6);
        expect(tm / ti).toBeGreaterThan(0.3);
      }
      console.log(`anisotropic plate far from the line, ${label}, 10 nm deep: relaxed / unrelaxed traction ${out.join(', ')}`);
    }
  });
});

describe('surface relaxation of inclined lines: isotropic half-space correction by 2D Fourier transform of the surface tractions', () => {
  const nu = 0.3;
  const Ciso = stiffnessTensor(isotropicVoigt(1, nu));
  const tractionOf = (C: Float64Array, g: Float64Array, n: Vec3): Vec3 => {
    const out = [0, 0, 0];
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) for (let k = 0; k < 3; k++) for (let l = 0; l < 3; l++) out[i] += C[((i * 3 + j) * 3 + k) * 3 + l] * g[3 * k + l] * n[j];
    return out as unknown as Vec3;
  };
  const lines: [string, Vec3, Vec3][] = [
    ['mixed line 35 degrees from the normal', [0.2, 0.1, 0.12], [0.5, 0.3, 1]],
    ['screw 60 degrees from the normal', scale(unit([1.5, -0.4, 1]), 0.25), [1.5, -0.4, 1]],
    ['edge 20 degrees from the normal', scale(unit(cross([0.3, 0.1, 1], [1, 0, 0])), 0.25), [0.3, 0.1, 1]],
    ['mixed line 75 degrees from the normal', [0.1, 0.2, -0.15], [1, 3, 0.8]],
  ];
  const t = 60;
  const P: Vec3 = [1, -2, 25];
  const emergence = (u: Vec3, depth: number): Vec3 => {
    const l = (depth - P[2]) / u[2];
    return [P[0] + l * u[0], P[1] + l * u[1], depth];
  };
  for (const [label, b, line] of lines) {
    const u = unit(line);
    const inf = straightDislocation({ b_nm: b, line: u, point_nm: P, poissonRatio: nu, coreRadius_nm: 1e-6 });
    for (const which of ['entrance', 'exit'] as const) {
      it(`${label}, ${which} surface alone (half-space): the traction vanishes to 1e-4 of the unrelaxed one at 0.4 to 30 nm from the emergence point`, () => {
        const corr = inclinedHalfSpaceCorrection({ b_nm: b, line: u, point_nm: P, normal: [0, 0, 1], thickness_nm: t, poissonRatio: nu, only: which });
        const depth = which === 'entrance' ? 0 : t;
        const O = emergence(u, depth);
        const g = new Float64Array(9);
        const h = new Float64Array(9);
        let worst = 0;
        let largest = 0;
        for (const r of [0.4, 1, 2.7, 6, 13, 30]) {
          for (let k = 0; k < 11; k++) {
            const ph = 0.37 + (2 * Math.PI * k) / 11;
            const p: Vec3 = [O[0] + r * Math.cos(ph), O[1] + r * Math.sin(ph), depth];
            inf.gradient(g, p[0], p[1], p[2]);
            corr.gradient(h, p[0], p[1], p[2]);
            const ti = norm(tractionOf(Ciso, g, [0, 0, 1]));
            for (let q = 0; q < 9; q++) h[q] += g[q];
            const tr = norm(tractionOf(Ciso, h, [0, 0, 1]));
            largest = Math.max(largest, ti * r);
            worst = Math.max(worst, (tr * r));
          }
        }
        // compared as r |T| (the traction is homogeneous of degree -1 about the emergence point)
        expect(largest).toBeGreaterThan(1e-3);
        expect(worst / largest).toBeLessThan(1e-4);
      });
    }
    it(`${label}: the relaxed Burgers circuit closes to b (Hirth & Lothe 1982), the correction is in equilibrium (finite differences of the direct sum) and its table reproduces the direct sum to 1e-3`, () => {
      const spec: DislocationFieldSpec = { kind: 'dislocation', b_nm: b, line: u, point_nm: P, poissonRatio: nu, cutDirection: unit(cross(u, [0, 1, 0])), coreRadius_nm: 0.05, surfaceCorrection: { kind: 'inclined-half-space', normal: [0, 0, 1], thickness_nm: t } };
      const f = buildField([spec])!;
      const a = unit(cross(u, [0.2, 0.7, -0.4]));
      const bb = cross(u, a);
      const centre = emergence(u, 20);
      const rad = 2;
      const loop = loopIntegral(
        f,
        circle(centre, a, bb, rad),
        2048,
      );
      // the correction is single-valued; its tabulated (interpolated) gradient integrates round the loop to ~1e-6 nm
      expect(maxAbsDiff(loop, b)).toBeLessThan(2e-5);
      // equilibrium of the solution itself (the direct harmonic sum, not its table), entrance surface
      const o = { b_nm: b, line: u, point_nm: P, normal: [0, 0, 1] as Vec3, thickness_nm: t, poissonRatio: nu };
      const g = new Float64Array(9);
      const O0 = emergence(u, 0);
      for (const p of [[4, 3, 8], [-6, 2, 30], [10, -10, 50], [0.5, 0.5, 3]] as Vec3[]) {
        const R = norm([p[0] - O0[0], p[1] - O0[1], p[2]]);
        const hh = 2e-4 * R;
        const div = [0, 0, 0];
        let scaleTerms = 0;
        for (let j = 0; j < 3; j++) {
          const e: Vec3 = [j === 0 ? hh : 0, j === 1 ? hh : 0, j === 2 ? hh : 0];
          halfSpaceGradientDirect(o, 'entrance', g, p[0] + e[0], p[1] + e[1], p[2] + e[2]);
          const sp = [0, 1, 2].map((i) => tractionOf(Ciso, g, [i === 0 ? 1 : 0, i === 1 ? 1 : 0, i === 2 ? 1 : 0] as Vec3));
          halfSpaceGradientDirect(o, 'entrance', g, p[0] - e[0], p[1] - e[1], p[2] - e[2]);
          const sm = [0, 1, 2].map((i) => tractionOf(Ciso, g, [i === 0 ? 1 : 0, i === 1 ? 1 : 0, i === 2 ? 1 : 0] as Vec3));
          for (let i = 0; i < 3; i++) {
            const term = (sp[j][i] - sm[j][i]) / (2 * hh);
            div[i] += term;
            scaleTerms = Math.max(scaleTerms, Math.abs(term));
          }
        }
        // each term d sigma_ij / dx_j is of order |sigma|/R; their sum must cancel
        expect(scaleTerms).toBeGreaterThan(0);
        expect(maxAbs(div)).toBeLessThan(1e-4 * scaleTerms); // central differences, step 2e-4 R
        // and the table reproduces the direct sum
        const corr = inclinedHalfSpaceCorrection({ ...o, only: 'entrance' });
        const gt = new Float64Array(9);
        corr.gradient(gt, p[0], p[1], p[2]);
        halfSpaceGradientDirect(o, 'entrance', g, p[0], p[1], p[2]);
        expect(maxAbsDiff(gt, g)).toBeLessThan(1e-3 * maxAbs(g)); // measured 3e-4 for the line 75 degrees from the normal
      }
    });
  }
  it('lines close to the surface plane are resolved less well by the tables (measured: residual traction 8e-5, 8e-4, 7e-3 of the unrelaxed at 73, 84, 88 degrees from the normal)', () => {
    for (const [line, bound] of [[[1, 0.2, 0.3], 2e-4], [[1, 0.2, 0.1], 2e-3], [[1, 0.3, 0.03], 2e-2]] as [Vec3, number][]) {
      const b: Vec3 = [0.2, 0.1, 0.12];
      const Pl: Vec3 = [0, 0, 30];
      const inf = straightDislocation({ b_nm: b, line, point_nm: Pl, poissonRatio: nu, coreRadius_nm: 1e-6 });
      const corr = inclinedHalfSpaceCorrection({ b_nm: b, line, point_nm: Pl, normal: [0, 0, 1], thickness_nm: 60, poissonRatio: nu, only: 'entrance' });
      const g = new Float64Array(9), h = new Float64Array(9);
      const l = -30 / line[2];
      const O = [l * line[0], l * line[1], 0];
      let worst = 0, big = 0;
      for (const r of [0.5, 2, 10]) {
        for (let k = 0; k < 13; k++) {
          const ph = 0.1 + (2 * Math.PI * k) / 13;
          const x = O[0] + r * Math.cos(ph), y = O[1] + r * Math.sin(ph);
          inf.gradient(g, x, y, 0);
          corr.gradient(h, x, y, 0);
          big = Math.max(big, r * norm(tractionOf(Ciso, g, [0, 0, 1])));
          for (let q = 0; q < 9; q++) h[q] += g[q];
          worst = Math.max(worst, r * norm(tractionOf(Ciso, h, [0, 0, 1])));
        }
      }
      expect(worst / big).toBeLessThan(bound);
    }
  });
  it('a screw normal to the surface reproduces the Eshelby & Stroh (1951) half-space twist u_theta = (B/2pi)(sqrt(r^2+z^2) - z)/r (to 1e-5)', () => {
    const B = 0.25;
    const corr = inclinedHalfSpaceCorrection({ b_nm: [0, 0, B], line: [0, 0, 1], point_nm: [0, 0, 10], normal: [0, 0, 1], thickness_nm: t, poissonRatio: nu, only: 'entrance' });
    const g = new Float64Array(9);
    for (const [x, y, z] of [[1, 0, 0.5], [2, 3, 1], [-4, 1, 6], [0.3, -0.2, 0.1], [10, -7, 25], [2, 2, 0]] as Vec3[]) {
      corr.gradient(g, x, y, z);
      // u_x = -y f, u_y = x f, f = (R - z)/r^2 = 1/(R + z) (closed form, differentiated by hand)
      const R = Math.hypot(x, y, z);
      const c = B / (2 * Math.PI);
      const f = 1 / (R + z);
      const fx = -(x / R) * f * f, fy = -(y / R) * f * f, fz = -f / R;
      const ref = [-y * fx, -f - y * fy, -y * fz, f + x * fx, x * fy, x * fz, 0, 0, 0].map((v) => c * v);
      expect(maxAbsDiff(g, ref)).toBeLessThan(1e-5 * maxAbs(ref));
    }
  });
  it('plate of 60 nm (both half-space corrections added, no repeated reflections): the surface tractions drop well below the unrelaxed ones, measured (README)', () => {
    const ratios: number[] = [];
    for (const [, b, line] of lines) {
      const u = unit(line);
      const inf = straightDislocation({ b_nm: b, line: u, point_nm: P, poissonRatio: nu, coreRadius_nm: 1e-6 });
      const corr = inclinedHalfSpaceCorrection({ b_nm: b, line: u, point_nm: P, normal: [0, 0, 1], thickness_nm: t, poissonRatio: nu });
      const g = new Float64Array(9);
      const h = new Float64Array(9);
      let worst = 0;
      let largest = 0;
      for (const depth of [0, t]) {
        const O = emergence(u, depth);
        for (const r of [1, 3, 10, 30]) {
          for (let k = 0; k < 8; k++) {
            const ph = (2 * Math.PI * k) / 8;
            const p: Vec3 = [O[0] + r * Math.cos(ph), O[1] + r * Math.sin(ph), depth];
            inf.gradient(g, p[0], p[1], p[2]);
            corr.gradient(h, p[0], p[1], p[2]);
            largest = Math.max(largest, norm(tractionOf(Ciso, g, [0, 0, 1])));
            for (let q = 0; q < 9; q++) h[q] += g[q];
            worst = Math.max(worst, norm(tractionOf(Ciso, h, [0, 0, 1])));
          }
        }
      }
      ratios.push(worst / largest);
    }
    console.log('inclined plate residual / unrelaxed', ratios.map((r) => r.toFixed(4)).join(' '));
    for (const r of ratios) expect(r).toBeLessThan(0.3);
  });
});

describe('surface corrections on the renderer hot path (directional g.(grad R).k) against the direct sums', () => {
  // The renderer evaluates only beta' = g.(grad R).k. The plate twist then takes the image series beyond its
  // first two terms from a table (src/elasticity/surfacePlateTwist.ts) and the inclined half-space correction
  // contracts its direction table to one scalar per surface; both are compared here with the untabulated sums.
  const lcgRand = (seed: number) => () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
  const contracted = (grad: Float64Array, g: Vec3, k: Vec3): number => {
    let s = 0;
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) s += g[i] * grad[3 * i + j] * k[j];
    return s;
  };
  const gv: Vec3 = [4.5, 1.2, -0.7];
  const kv: Vec3 = unit([0.1, 0.2, 0.97]);
  it('plate twist of a normal screw: the tabulated series equals the direct series to 1e-5 of |g| |b| / (2 pi max(r, 1 nm)) (measured 3.0e-6 and 4.4e-6 for the two foil normals), r from 0.05 nm to 20 t', () => {
    const t = 60;
    const B = 0.25;
    for (const nrm of [[0, 0, 1], unit([1, 2, 2])] as Vec3[]) {
      const f = surfaceCorrection({ b_nm: scale(nrm, B), line: nrm, point_nm: [0, 0, 0], correction: { kind: 'normal-screw-twist', normal: nrm, thickness_nm: t } });
      const d = f.directional(gv, kv);
      const trial: Vec3 = Math.abs(nrm[0]) < 0.9 ? [1, 0, 0] : [0, 1, 0];
      const a = unit(cross(trial, nrm));
      const bb = cross(nrm, a);
      const G = new Float64Array(9);
      const rnd = lcgRand(11);
      let worst = 0;
      let largest = 0;
      for (let q = 0; q < 4000; q++) {
        const r = Math.exp(Math.log(0.05) + rnd() * Math.log((20 * t) / 0.05));
        const ph = 2 * Math.PI * rnd();
        const z = t * rnd();
        const p: Vec3 = [0, 1, 2].map((i) => r * Math.cos(ph) * a[i] + r * Math.sin(ph) * bb[i] + z * nrm[i]) as unknown as Vec3;
        f.gradient(G, p[0], p[1], p[2]);
        const ref = contracted(G, gv, kv);
        const sc = (norm(gv) * B) / (2 * Math.PI * Math.max(r, 1));
        worst = Math.max(worst, Math.abs(d(p[0], p[1], p[2]) - ref) / sc);
        largest = Math.max(largest, Math.abs(ref) / sc);
      }
      expect(largest).toBeGreaterThan(1); // the comparison is not of zeros
      expect(worst).toBeLessThan(1e-5);
    }
  });
  // per column (60 columns through a 60 nm foil, 25 points each): the largest error over the largest |beta'| of the correction
  // (the scalar grid is finer than the 9-component one `gradient` reads: 129 x 512 directions)
  const inclinedCases: [string, Vec3, Vec3, number][] = [
    ['35 degrees from the normal (measured 2.3e-6)', [0.2, 0.1, 0.12], [0.5, 0.3, 1], 1e-5],
    ['60 degrees (measured 3.1e-6)', [0.15, -0.04, 0.1], [1.5, -0.4, 1], 1e-5],
    ['75 degrees (measured 5.3e-5: high harmonics near the surface plane)', [0.1, 0.2, -0.15], [1, 3, 0.8], 2e-4],
    ['84 degrees (measured 3.7e-3)', [0.2, 0.1, 0.12], [1, 0.2, 0.1], 1e-2],
  ];
  for (const [label, b, line, bound] of inclinedCases) {
    it(`inclined line ${label}: the contracted table of both surfaces equals the direct harmonic sums contracted, per column to ${bound}`, () => {
      const t = 60;
      const o = { b_nm: b, line: unit(line), point_nm: [1, -2, 25] as Vec3, normal: [0, 0, 1] as Vec3, thickness_nm: t, poissonRatio: 0.3 };
      const d = inclinedHalfSpaceCorrection(o).directional(gv, kv);
      const G = new Float64Array(9);
      const H = new Float64Array(9);
      const rnd = lcgRand(7);
      let worst = 0;
      for (let c = 0; c < 60; c++) {
        const cx = 120 * rnd() - 60;
        const cy = 120 * rnd() - 60;
        let colMax = 0;
        let colErr = 0;
        for (let z = 0; z <= t; z += 2.5) {
          const x = cx + (z * kv[0]) / kv[2];
          const y = cy + (z * kv[1]) / kv[2];
          halfSpaceGradientDirect(o, 'entrance', G, x, y, z);
          halfSpaceGradientDirect(o, 'exit', H, x, y, z);
          for (let i = 0; i < 9; i++) G[i] += H[i];
          const ref = contracted(G, gv, kv);
          colMax = Math.max(colMax, Math.abs(ref));
          colErr = Math.max(colErr, Math.abs(d(x, y, z) - ref));
        }
        expect(colMax).toBeGreaterThan(0);
        worst = Math.max(worst, colErr / colMax);
      }
      expect(worst).toBeLessThan(bound);
    });
  }
});

describe('surface relaxation of the edge component of a line parallel to the surfaces, isotropic (Head 1953 half-space image; complex potentials, Muskhelishvili ch. 5)', () => {
  // Isotropic Hooke's law (traction() above, mu = 1, nu = NU) on the half-space r.n = 0 (material r.n > 0) and on r.n = T
  // (material r.n < T); the infinite field is the code's Hirth & Lothe isotropic field (straightDislocation.ts).
  const cases: [string, Vec3, Vec3, number][] = [
    // label, Burgers vector, line, depth
    ['pure edge, b along the foil normal', scale(N, BL), U_PAR, 7],
    ['pure edge, b in the surface plane', scale(E2, BL), U_PAR, 12],
    ['mixed (60 degrees), other line direction', [0.5 * BL * U_PAR2[0] + 0.866 * BL * N[0], 0.5 * BL * U_PAR2[1] + 0.866 * BL * N[1], 0.5 * BL * U_PAR2[2] + 0.866 * BL * N[2]], U_PAR2, 41],
    ['edge with b oblique to the normal, line 2 nm deep', unit(scale(cross(U_PAR, [0.3, -0.2, 0.9]), 1)).map((v) => v * BL) as unknown as Vec3, U_PAR, 2],
  ];
  const infiniteOf = (b: Vec3, u: Vec3, P: Vec3) => straightDislocation({ b_nm: b, line: u, point_nm: P, poissonRatio: NU, coreRadius_nm: 1e-6 });
  const imagesOf = (b: Vec3, u: Vec3, P: Vec3, only?: 'entrance' | 'exit') => edgeHalfSpaceImages({ b_nm: b, line: u, point_nm: P, normal: N, thickness_nm: T, poissonRatio: NU, ...(only === undefined ? {} : { only }) });
  const NEAR = [-40, -12, -4, -1, -0.3, 0, 0.3, 1, 4, 12, 40];
  const surfaceTractions = (f: DisplacementField, u: Vec3, P: Vec3, depth: number, offsets: readonly number[] = NEAR): number[] => {
    const side = unit(cross(N, u));
    const g = new Float64Array(9);
    const out: number[] = [];
    const p0 = dot(P, N);
    for (const d of offsets) {
      const p: Vec3 = [0, 1, 2].map((i) => P[i] + (depth - p0) * N[i] + d * side[i] + 5 * u[i]) as unknown as Vec3;
      f.gradient(g, p[0], p[1], p[2]);
      out.push(norm(traction(g, N)));
    }
    return out;
  };
  for (const [label, b, u, depth] of cases) {
    const P = at(depth, 2, -1).map((v, i) => v + 0 * u[i]) as unknown as Vec3;
    for (const which of ['entrance', 'exit'] as const) {
      it(`${label}: the ${which}-surface image alone frees that surface of a half-space (< 1e-10 of the largest unrelaxed traction; < 1e-6 with the images' gradient from finite differences of their displacement), which the infinite field alone loads`, () => {
        // the images see only the edge component b - (b.u) u: compare with that component's infinite field
        const be = [0, 1, 2].map((i) => b[i] - dot(b, u) * u[i]) as unknown as Vec3;
        const inf = infiniteOf(be, u, P);
        const relaxed = superpose([inf, imagesOf(b, u, P, which)]);
        const z = which === 'entrance' ? 0 : T;
        // near the line and far from it (300 nm: the half-space image is exact everywhere on its surface)
        const offsets = [...NEAR, -300, 300];
        const ti = surfaceTractions(inf, u, P, z, offsets);
        const tr = surfaceTractions(relaxed, u, P, z, offsets);
        for (let q = 0; q < ti.length; q++) expect(tr[q]).toBeLessThan(1e-9 * ti[q] + 1e-12 * Math.max(...ti));
        // the images' gradient from central finite differences of their displacement (h = 1e-3 nm) gives the same
        const img = imagesOf(b, u, P, which);
        const fdImg: DisplacementField = { displacement: img.displacement, gradient: (out, x, y, zz) => out.set(fdGradient(img, [x, y, zz], 1e-3)), directional: img.directional };
        const trFd = surfaceTractions(superpose([inf, fdImg]), u, P, z, offsets);
        expect(Math.max(...trFd) / Math.max(...ti)).toBeLessThan(1e-6);
        const largest = Math.max(...ti);
        expect(largest).toBeGreaterThan((0.1 * MU * norm(be)) / (2 * Math.PI * (which === 'entrance' ? depth : T - depth)));
        expect(Math.max(...tr) / largest).toBeLessThan(1e-10);
      });
    }
    it(`${label}: the images' gradient equals finite differences of their displacement (h = 1e-4 nm, to 1e-8), they are in equilibrium (Navier, finite differences of the stress) and single-valued (the relaxed Burgers circuit closes to b)`, () => {
      const f = imagesOf(b, u, P);
      const g = new Float64Array(9);
      const pts: Vec3[] = [at(0.5, 3, 1), at(depth, 1, 0.2), at(30, -8, 4), at(59.5, 2, -2), at(20, 70, -30)];
      for (const p of pts) {
        f.gradient(g, p[0], p[1], p[2]);
        expect(maxAbsDiff(g, fdGradient(f, p, 1e-4))).toBeLessThan(1e-8);
        const h = 1e-3;
        const div = [0, 0, 0];
        for (let j = 0; j < 3; j++) {
          const e: Vec3 = [j === 0 ? h : 0, j === 1 ? h : 0, j === 2 ? h : 0];
          f.gradient(g, p[0] + e[0], p[1] + e[1], p[2] + e[2]);
          const sp = [traction(g, [1, 0, 0]), traction(g, [0, 1, 0]), traction(g, [0, 0, 1])];
          f.gradient(g, p[0] - e[0], p[1] - e[1], p[2] - e[2]);
          const sm = [traction(g, [1, 0, 0]), traction(g, [0, 1, 0]), traction(g, [0, 0, 1])];
          for (let i = 0; i < 3; i++) div[i] += (sp[j][i] - sm[j][i]) / (2 * h);
        }
        const dd = Math.min(dot(p, N) + depth, T - dot(p, N) + T - depth); // distance to the nearer image line
        expect(maxAbs(div)).toBeLessThan((1e-6 * MU * BL) / (dd * dd));
      }
      const full = buildField([{ kind: 'dislocation', b_nm: b, line: u, point_nm: P, poissonRatio: NU, cutDirection: unit(cross(u, [0.3, 0.1, 0.9])), coreRadius_nm: 0.05, surfaceCorrection: { kind: 'parallel-edge-plate', normal: N, thickness_nm: T } }])!;
      const a = unit(cross(u, [0.2, 0.7, -0.4]));
      const bb = cross(u, a);
      const rad = Math.min(1.5, 0.5 * depth);
      const loop = loopIntegral(
        full,
        circle(P, a, bb, rad),
        2048,
      );
      expect(maxAbsDiff(loop, b)).toBeLessThan(1e-9);
    });
  }
  it('deep in a thick foil the images vanish (far from both surfaces the field is the infinite one)', () => {
    const b = scale(N, BL);
    const Tbig = 1e5;
    const P = at(Tbig / 2, 0, 0);
    const f = edgeHalfSpaceImages({ b_nm: b, line: U_PAR, point_nm: P, normal: N, thickness_nm: Tbig, poissonRatio: NU });
    const inf = infiniteOf(b, U_PAR, P);
    const g = new Float64Array(9), h = new Float64Array(9);
    const p = at(Tbig / 2 + 3, 4, 0);
    f.gradient(g, p[0], p[1], p[2]);
    inf.gradient(h, p[0], p[1], p[2]);
    expect(maxAbs(g)).toBeLessThan(1e-4 * maxAbs(h)); // ~ (5 nm / 5e4 nm)
  });
  it('plate of 60 nm: the two half-space images alone leave a traction on the other surface (measured, for comparison); the plate correction (kind parallel-edge-plate, surfacePlateEdge.ts) frees both surfaces to < 1e-6 of the largest unrelaxed traction', () => {
    // measured when written, images alone: 0.123 0.097 0.332 0.033 for the four lines above, 0.181 and 0.498 for an edge
    // with b along n 10 and 30 nm deep (the residual grows as the line nears the middle of the foil)
    const images: number[] = [];
    const plate: number[] = [];
    const more: [string, Vec3, Vec3, number][] = [['', scale(N, BL), U_PAR, 10], ['', scale(N, BL), U_PAR, 30]];
    for (const [, b, u, depth] of [...cases, ...more]) {
      const P = at(depth, 2, -1);
      const inf = infiniteOf(b, u, P);
      const be = [0, 1, 2].map((i) => b[i] - dot(b, u) * u[i]) as unknown as Vec3;
      const infEdge = infiniteOf(be, u, P);
      const withImages = superpose([infEdge, imagesOf(b, u, P)]);
      const relaxed = superpose([inf, surfaceCorrection({ b_nm: b, line: u, point_nm: P, correction: { kind: 'parallel-edge-plate', normal: N, thickness_nm: T }, poissonRatio: NU })]);
      const worst = (f: DisplacementField) => Math.max(...surfaceTractions(f, u, P, 0), ...surfaceTractions(f, u, P, T));
      images.push(worst(withImages) / worst(infEdge));
      plate.push(worst(relaxed) / worst(inf));
    }
    console.log('isotropic edge, plate residual / unrelaxed (depths 7, 12, 41, 2, 10, 30 nm): images alone', images.map((r) => r.toFixed(4)).join(' '), '; plate correction', plate.map((r) => r.toExponential(1)).join(' '));
    for (const r of images) {
      expect(r).toBeLessThan(0.6);
      expect(r).toBeGreaterThan(1e-2);
    }
    for (const r of plate) expect(r).toBeLessThan(1e-6);
  });
  it('far from the line (160 nm, about 3 foil thicknesses) the two half-space images alone leave most of the unrelaxed traction, the plate correction none (< 1e-6 of it)', () => {
    // each half-space image tends to minus the line's own long-range field far from the line, so the sum of both
    // does too; measured when written: 1.10 of the unrelaxed traction at 160 nm for an edge (b along n) 8 and 30 nm deep
    const side = unit(cross(N, U_PAR));
    const g = new Float64Array(9);
    for (const depth of [8, 30]) {
      const b = scale(N, BL);
      const P = at(depth, 0, 0);
      const inf = infiniteOf(b, U_PAR, P);
      const rel = superpose([inf, imagesOf(b, U_PAR, P)]);
      const plate = superpose([inf, surfaceCorrection({ b_nm: b, line: U_PAR, point_nm: P, correction: { kind: 'parallel-edge-plate', normal: N, thickness_nm: T }, poissonRatio: NU })]);
      let ti = 0, tr = 0, tp = 0;
      for (const z of [0, T]) {
        const p: Vec3 = [0, 1, 2].map((i) => P[i] + (z - depth) * N[i] + 160 * side[i]) as unknown as Vec3;
        inf.gradient(g, p[0], p[1], p[2]);
        ti = Math.max(ti, norm(traction(g, N)));
        rel.gradient(g, p[0], p[1], p[2]);
        tr = Math.max(tr, norm(traction(g, N)));
        plate.gradient(g, p[0], p[1], p[2]);
        tp = Math.max(tp, norm(traction(g, N)));
      }
      console.log(`edge ${depth} nm deep, 160 nm aside: relaxed / unrelaxed traction ${(tr / ti).toFixed(3)}`);
      expect(tr / ti).toBeGreaterThan(0.5);
      expect(tp / ti).toBeLessThan(1e-6);
    }
  });
});

describe('surface relaxation of the edge component of a line normal to the surfaces (half-space correction of each surface, as for inclined lines; screw part: the plate twist)', () => {
  const nu = NU;
  const Pn: Vec3 = at(25, 1, -2);
  const edgeB = scale(E2, BL);
  const mixedB: Vec3 = [0, 1, 2].map((i) => 0.6 * BL * E1[i] + 0.8 * BL * N[i]) as unknown as Vec3;
  const pointsOn = (depth: number): Vec3[] => {
    const out: Vec3[] = [];
    for (const r of [0.4, 1, 3, 10, 30]) for (let k = 0; k < 11; k++) {
      const ph = 0.37 + (2 * Math.PI * k) / 11;
      out.push([0, 1, 2].map((i) => Pn[i] + (depth - 25) * N[i] + r * (Math.cos(ph) * E1[i] + Math.sin(ph) * E2[i])) as unknown as Vec3);
    }
    return out;
  };
  /** Largest r |T| on the surface at `depth` (the traction of a line meeting a surface is homogeneous of degree -1 about the emergence point). */
  const rT = (f: DisplacementField, depth: number): number => {
    const g = new Float64Array(9);
    let m = 0;
    for (const p of pointsOn(depth)) {
      f.gradient(g, p[0], p[1], p[2]);
      const d = [0, 1, 2].map((i) => p[i] - Pn[i] - (depth - 25) * N[i]);
      m = Math.max(m, Math.hypot(d[0], d[1], d[2]) * norm(traction(g, N)));
    }
    return m;
  };
  const maxT = (f: DisplacementField, depth: number): number => {
    const g = new Float64Array(9);
    let m = 0;
    for (const p of pointsOn(depth)) {
      f.gradient(g, p[0], p[1], p[2]);
      m = Math.max(m, norm(traction(g, N)));
    }
    return m;
  };
  const inf = (b: Vec3) => straightDislocation({ b_nm: b, line: N, point_nm: Pn, poissonRatio: nu, coreRadius_nm: 1e-6 });
  for (const which of ['entrance', 'exit'] as const) {
    it(`pure edge along the normal, ${which} surface alone (half-space): the traction vanishes to 1e-6 of the unrelaxed one (measured 2e-7)`, () => {
      const corr = inclinedHalfSpaceCorrection({ b_nm: edgeB, line: N, point_nm: Pn, normal: N, thickness_nm: T, poissonRatio: nu, only: which });
      const z = which === 'entrance' ? 0 : T;
      const before = rT(inf(edgeB), z);
      const after = rT(superpose([inf(edgeB), corr]), z);
      expect(before).toBeGreaterThan(1e-3);
      expect(after / before).toBeLessThan(1e-6);
    });
  }
  it('plate of 60 nm, pure edge and mixed line along the normal (twist + both half-space corrections, no repeated reflections): the surface tractions drop well below the unrelaxed ones, measured (README); the relaxed Burgers circuit still closes', () => {
    const ratios: number[] = [];
    for (const b of [edgeB, mixedB]) {
      const spec: DislocationFieldSpec = { kind: 'dislocation', b_nm: b, line: N, point_nm: Pn, poissonRatio: nu, cutDirection: E1, coreRadius_nm: 1e-6 };
      const c = surfaceCorrectionFor(b, N, Pn, N, T);
      expect(c?.kind).toBe('normal-edge-half-space');
      const relaxed = buildField([{ ...spec, surfaceCorrection: c! }])!;
      const infinite = buildField([spec])!;
      // largest |T| (as for inclined lines above; r |T| would weight the far points, where the other surface's correction dominates)
      ratios.push(Math.max(maxT(relaxed, 0), maxT(relaxed, T)) / Math.max(maxT(infinite, 0), maxT(infinite, T)));
      const rad = 2;
      const loop = loopIntegral(
        relaxed,
        circle(Pn, E1, E2, rad),
        2048,
      );
      // E1 x E2 = N: the circuit is right-handed about the line; the tabulated correction integrates to ~1e-6 nm
      expect(maxAbsDiff(loop, b)).toBeLessThan(2e-5);
    }
    // measured when written: 0.0043 (pure edge) and 0.0026 (mixed) of the largest unrelaxed traction (which sits
    // next to the emergence point); compared as r |T| instead (each point against the line's own 1/r traction) the
    // residual reaches 0.32 and 0.20 at 30 nm from the emergence point, where the other surface's correction dominates
    console.log('normal line, plate residual / unrelaxed (pure edge, mixed)', ratios.map((r) => r.toFixed(4)).join(' '), '; as r|T|:', [edgeB, mixedB].map((b) => {
      const spec: DislocationFieldSpec = { kind: 'dislocation', b_nm: b, line: N, point_nm: Pn, poissonRatio: nu, cutDirection: E1, coreRadius_nm: 1e-6 };
      const relaxed = buildField([{ ...spec, surfaceCorrection: surfaceCorrectionFor(b, N, Pn, N, T)! }])!;
      const infinite = buildField([spec])!;
      return (Math.max(rT(relaxed, 0), rT(relaxed, T)) / Math.max(rT(infinite, 0), rT(infinite, T))).toFixed(3);
    }).join(' '));
    for (const r of ratios) {
      expect(r).toBeLessThan(0.02);
      expect(r).toBeGreaterThan(1e-6);
    }
  });
});

describe('edge images of a parallel line against an independent evaluation (scripts/ref_edge_images.py: the general half-plane theorem of complex potentials applied to the infinite-medium potentials, gradient by Richardson-extrapolated finite differences)', () => {
  const py = needPython('numpy');
  const script = readFileSync(new URL('../../scripts/ref_edge_images.py', import.meta.url), 'utf8');
  it('both surfaces, 30 random points of a 60 nm foil, mixed line 9 nm deep: the in-plane gradient agrees to 1e-8 relative', (ctx) => {
    py.require(ctx);
    const r = rng(23);
    const b: Vec3 = [0, 1, 2].map((i) => 0.1 * U_PAR[i] + 0.2 * E2[i] - 0.12 * N[i]) as unknown as Vec3;
    const P = at(9, 2, -1);
    const m = cross(N, U_PAR);
    const pts: Vec3[] = [];
    for (let i = 0; i < 30; i++) pts.push(at(0.5 + 59 * r(), 80 * r() - 40, 80 * r() - 40));
    const local = pts.map((p) => [dot(m, p) - dot(m, P), dot(N, p)]);
    const ref = pythonJson<number[][]>(script, { bx: dot(b, m), by: dot(b, N), d: dot(P, N), t: T, nu: NU, points: local });
    const f = edgeHalfSpaceImages({ b_nm: b, line: U_PAR, point_nm: P, normal: N, thickness_nm: T, poissonRatio: NU });
    const g = new Float64Array(9);
    const ex = [m, N];
    pts.forEach((p, q) => {
      f.gradient(g, p[0], p[1], p[2]);
      const mine: number[] = [];
      for (const a of ex) for (const c of ex) {
        let s = 0;
        for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) s += a[i] * g[3 * i + j] * c[j];
        mine.push(s);
      }
      expect(maxAbsDiff(mine, ref[q])).toBeLessThan(1e-8 * maxAbs(ref[q]));
    });
  });
});
