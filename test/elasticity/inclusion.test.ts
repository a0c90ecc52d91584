import { describe, expect, it } from 'vitest';
import type { Vec3 } from '../../src/math/vec3.js';
import { InputError } from '../../src/errors.js';
import { constrainedStrain, sphericalInclusion } from '../../src/elasticity/inclusion.js';
import { fdGradient, maxAbs, maxAbsDiff, randomUnit, rng } from './helpers.js';

const centre: Vec3 = [1.5, -2, 0.5];
const r0 = 4;

describe('spherical inclusion (Ashby & Brown 1963; Eshelby 1957)', () => {
  it('constrained strain from misfit: eps = delta (1 + nu) / (3 (1 - nu)); 2/3 delta for nu = 1/3', () => {
    // nu = 1/3: (4/3) / (3 * 2/3) = 2/3 (Ashby & Brown 1963, Phil. Mag. 8, 1083: eps ~ 2 delta / 3)
    expect(constrainedStrain(0.03, 1 / 3)).toBeCloseTo(0.02, 15);
    // nu = 0.3: 0.01 * 1.3 / (3 * 0.7) = 0.013 / 2.1 = 0.006190476190476 (hand computation)
    expect(constrainedStrain(0.01, 0.3)).toBeCloseTo(0.006190476190476, 14);
    const a = sphericalInclusion({ centre_nm: centre, radius_nm: r0, misfit: 0.01, poissonRatio: 0.3 });
    const b = sphericalInclusion({ centre_nm: centre, radius_nm: r0, strain: 0.01 * 1.3 / 2.1, poissonRatio: 0.3 });
    const da = new Float64Array(3);
    const db = new Float64Array(3);
    a.displacement(da, 3, 4, 5);
    b.displacement(db, 3, 4, 5);
    expect(maxAbsDiff(da, db)).toBeLessThan(1e-16);
  });

  it('R = eps r inside and eps r0^3 r / r^3 outside, continuous at r0', () => {
    const eps = -0.012;
    const f = sphericalInclusion({ centre_nm: centre, radius_nm: r0, strain: eps, poissonRatio: 0.3 });
    const r = rng(3);
    const d1 = new Float64Array(3);
    const d2 = new Float64Array(3);
    for (let i = 0; i < 50; i++) {
      const n = randomUnit(r);
      const at = (s: number): Vec3 => [centre[0] + s * n[0], centre[1] + s * n[1], centre[2] + s * n[2]];
      const pi = at(r0 * (1 - 1e-12));
      const po = at(r0 * (1 + 1e-12));
      f.displacement(d1, ...pi);
      f.displacement(d2, ...po);
      // Ashby & Brown 1963: both forms give eps r0 n at the interface
      expect(maxAbsDiff(d1, d2)).toBeLessThan(1e-13);
      expect(maxAbsDiff(d1, [eps * r0 * n[0], eps * r0 * n[1], eps * r0 * n[2]])).toBeLessThan(1e-13);
      const s = r0 * (1.1 + 5 * r());
      f.displacement(d1, ...at(s));
      const k = (eps * r0 ** 3) / s ** 2; // outside: eps r0^3 / r^2 along n
      expect(maxAbsDiff(d1, [k * n[0], k * n[1], k * n[2]])).toBeLessThan(1e-15);
    }
  });

  it('analytic gradient against central finite differences (relative 1e-6), away from r0', () => {
    const f = sphericalInclusion({ centre_nm: centre, radius_nm: r0, strain: 0.008, poissonRatio: 0.3 });
    const r = rng(11);
    const g = new Float64Array(9);
    for (let i = 0; i < 300; i++) {
      const n = randomUnit(r);
      let s = r0 * 10 * r();
      if (Math.abs(s - r0) < 0.01) s += 0.05;
      const p: Vec3 = [centre[0] + s * n[0], centre[1] + s * n[1], centre[2] + s * n[2]];
      f.gradient(g, ...p);
      const fd = fdGradient(f, p, 1e-5 * Math.max(s, 1));
      // central differences: common practice
      expect(maxAbsDiff(g, fd) / maxAbs(g)).toBeLessThan(1e-6);
    }
  });

  it('outside: no dilatation (trace 0) and no rotation (symmetric gradient) (Eshelby 1957)', () => {
    const f = sphericalInclusion({ centre_nm: centre, radius_nm: r0, strain: 0.02, poissonRatio: 0.25 });
    const r = rng(13);
    const g = new Float64Array(9);
    for (let i = 0; i < 200; i++) {
      const n = randomUnit(r);
      const s = r0 * (1 + 1e-9 + 20 * r());
      f.gradient(g, centre[0] + s * n[0], centre[1] + s * n[1], centre[2] + s * n[2]);
      const sc = maxAbs(g);
      // Eshelby 1957: the matrix around a spherical inclusion is under pure shear
      expect(Math.abs(g[0] + g[4] + g[8]) / sc).toBeLessThan(1e-14);
      expect(Math.max(Math.abs(g[1] - g[3]), Math.abs(g[2] - g[6]), Math.abs(g[5] - g[7])) / sc).toBeLessThan(1e-15);
    }
    f.gradient(g, ...centre);
    expect([...g]).toEqual([0.02, 0, 0, 0, 0.02, 0, 0, 0, 0.02]);
  });

  it('the normal traction is continuous at r0 when eps comes from the misfit (Hooke, eigenstrain delta inside)', () => {
    // Isotropic Hooke's law sigma = lambda tr(e) I + 2 G e; elastic strain e = sym(grad R) - delta I inside,
    // sym(grad R) outside. Continuity of sigma.n at r0 is what fixes eps (Eshelby 1957).
    const G = 40;
    for (const nu of [0.2, 0.3, 0.34, 0.45]) {
      const delta = 0.015;
      const lambda = (2 * G * nu) / (1 - 2 * nu);
      const f = sphericalInclusion({ centre_nm: centre, radius_nm: r0, misfit: delta, poissonRatio: nu });
      const r = rng(17);
      const g = new Float64Array(9);
      const traction = (p: Vec3, n: Vec3, eig: number): Vec3 => {
        f.gradient(g, ...p);
        const e = [0, 0, 0, 0, 0, 0, 0, 0, 0];
        for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) e[3 * i + j] = 0.5 * (g[3 * i + j] + g[3 * j + i]) - (i === j ? eig : 0);
        const tr = e[0] + e[4] + e[8];
        const t: Vec3 = [0, 0, 0];
        const tt = t as unknown as number[];
        for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) tt[i] += (lambda * tr * (i === j ? 1 : 0) + 2 * G * e[3 * i + j]) * n[j];
        return t;
      };
      for (let i = 0; i < 20; i++) {
        const n = randomUnit(r);
        const at = (s: number): Vec3 => [centre[0] + s * n[0], centre[1] + s * n[1], centre[2] + s * n[2]];
        const tin = traction(at(r0 * (1 - 1e-13)), n, delta);
        const tout = traction(at(r0 * (1 + 1e-13)), n, 0);
        expect(maxAbsDiff(tin, tout) / (G * delta)).toBeLessThan(1e-10);
      }
    }
  });

  it('rejects missing or doubled strain/misfit, bad radius, bad Poisson ratio', () => {
    const base = { centre_nm: centre, radius_nm: r0, poissonRatio: 0.3 };
    expect(() => sphericalInclusion(base)).toThrow(InputError);
    expect(() => sphericalInclusion({ ...base, strain: 0.01, misfit: 0.01 })).toThrow(InputError);
    expect(() => sphericalInclusion({ ...base, radius_nm: 0, strain: 0.01 })).toThrow(InputError);
    expect(() => sphericalInclusion({ ...base, strain: Number.NaN })).toThrow(InputError);
    expect(() => sphericalInclusion({ ...base, poissonRatio: 0.7, misfit: 0.01 })).toThrow(InputError);
  });
});
