/**
 * The two numerical pieces the plate corrections share (src/math): Gauss-Legendre quadrature against the exact
 * integrals of monomials over [-1, 1] (2/(p + 1) for even p, 0 for odd; exact up to degree 2n - 1, the defining
 * property, e.g. Abramowitz & Stegun ch. 25), and bicubic Hermite interpolation, which reproduces any bicubic
 * polynomial given its values and derivatives at the nodes (the defining property of the Hermite basis).
 */
import { describe, expect, it } from 'vitest';
import { gaussLegendre } from '../../src/math/gaussLegendre.js';
import { hermiteGrid } from '../../src/math/hermiteGrid.js';

describe('Gauss-Legendre nodes and weights', () => {
  for (const n of [2, 8, 16]) {
    it(`n = ${n}: integrates x^p exactly for p <= 2n - 1 and not for p = 2n`, () => {
      const { x, w } = gaussLegendre(n);
      const integral = (p: number) => x.reduce((s, xi, i) => s + w[i] * xi ** p, 0);
      for (let p = 0; p <= 2 * n - 1; p++) expect(integral(p)).toBeCloseTo(p % 2 === 0 ? 2 / (p + 1) : 0, 13);
      expect(Math.abs(integral(2 * n) - 2 / (2 * n + 1))).toBeGreaterThan(1e-13); // 7e-10 at n = 16, far above rounding
    });
  }
});

describe('bicubic Hermite interpolation on a grid', () => {
  it('reproduces a bicubic polynomial (two components) between and at the nodes to 1e-12', () => {
    const f = (x: number, y: number) => 1 + 0.3 * x - 0.2 * y + 0.05 * x * y + 0.01 * x ** 3 - 0.02 * y ** 3 + 0.003 * x ** 3 * y ** 2;
    const fx = (x: number, y: number) => 0.3 + 0.05 * y + 0.03 * x ** 2 + 0.009 * x ** 2 * y ** 2;
    const fy = (x: number, y: number) => -0.2 + 0.05 * x - 0.06 * y ** 2 + 0.006 * x ** 3 * y;
    const fxy = (x: number, y: number) => 0.05 + 0.018 * x ** 2 * y;
    const grid = { nx: 5, ny: 4, x0: -2, hx: 1, hy: 0.5 };
    const data = new Float64Array(grid.nx * grid.ny * 8);
    for (let j = 0; j < grid.ny; j++) {
      for (let i = 0; i < grid.nx; i++) {
        const x = grid.x0 + i * grid.hx, y = j * grid.hy, q = 8 * (j * grid.nx + i);
        data.set([f(x, y), fx(x, y), fy(x, y), fxy(x, y), 2 * f(x, y), 2 * fx(x, y), 2 * fy(x, y), 2 * fxy(x, y)], q);
      }
    }
    const out = new Float64Array(2);
    for (const [x, y] of [[-2, 0], [-1.3, 0.2], [0.77, 1.1], [1.999, 1.49], [0, 0.5]]) {
      hermiteGrid(grid, data, 2, x, y, out);
      expect(out[0]).toBeCloseTo(f(x, y), 12);
      expect(out[1]).toBeCloseTo(2 * f(x, y), 12);
    }
  });
});
