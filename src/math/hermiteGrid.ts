/**
 * Bicubic Hermite interpolation on a regular grid x = x0 + i hx (i < nx), y = j hy (j < ny) whose nodes hold, for
 * each of `ncomp` components, the value and its derivatives (f, f_x, f_y, f_xy): exact for bicubic data, error of
 * order h^4 otherwise. Outside the grid the nearest cell is extrapolated. Used by the plate corrections' tables.
 */

export interface HermiteGrid {
  readonly nx: number;
  readonly ny: number;
  readonly x0: number;
  readonly hx: number;
  readonly hy: number;
}

/** Bicubic Hermite interpolation on the grid's grid of `ncomp` components stored as (f, f_x, f_y, f_xy) each. */
export function hermiteGrid(tb: HermiteGrid, d: Float64Array, ncomp: number, x: number, y: number, out: Float64Array): void {
  const fx = (x - tb.x0) / tb.hx, fy = y / tb.hy;
  let i = Math.floor(fx), j = Math.floor(fy);
  if (i < 0) i = 0;
  if (i > tb.nx - 2) i = tb.nx - 2;
  if (j < 0) j = 0;
  if (j > tb.ny - 2) j = tb.ny - 2;
  const s = fx - i, r = fy - j;
  const s2 = s * s, s3 = s2 * s, r2 = r * r, r3 = r2 * r;
  const H0s = 2 * s3 - 3 * s2 + 1, H1s = -2 * s3 + 3 * s2, D0s = (s3 - 2 * s2 + s) * tb.hx, D1s = (s3 - s2) * tb.hx;
  const H0r = 2 * r3 - 3 * r2 + 1, H1r = -2 * r3 + 3 * r2, D0r = (r3 - 2 * r2 + r) * tb.hy, D1r = (r3 - r2) * tb.hy;
  const stride = 4 * ncomp;
  const q00 = stride * (j * tb.nx + i), q10 = q00 + stride, q01 = q00 + stride * tb.nx, q11 = q01 + stride;
  const a00 = H0s * H0r, a10 = H1s * H0r, a01 = H0s * H1r, a11 = H1s * H1r;
  const bx00 = D0s * H0r, bx10 = D1s * H0r, bx01 = D0s * H1r, bx11 = D1s * H1r;
  const by00 = H0s * D0r, by10 = H1s * D0r, by01 = H0s * D1r, by11 = H1s * D1r;
  const c00 = D0s * D0r, c10 = D1s * D0r, c01 = D0s * D1r, c11 = D1s * D1r;
  for (let c = 0; c < ncomp; c++) {
    const o = 4 * c;
    out[c] =
      a00 * d[q00 + o] + a10 * d[q10 + o] + a01 * d[q01 + o] + a11 * d[q11 + o] +
      bx00 * d[q00 + o + 1] + bx10 * d[q10 + o + 1] + bx01 * d[q01 + o + 1] + bx11 * d[q11 + o + 1] +
      by00 * d[q00 + o + 2] + by10 * d[q10 + o + 2] + by01 * d[q01 + o + 2] + by11 * d[q11 + o + 2] +
      c00 * d[q00 + o + 3] + c10 * d[q10 + o + 3] + c01 * d[q01 + o + 3] + c11 * d[q11 + o + 3];
  }
}
