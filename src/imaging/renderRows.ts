/**
 * The per-column work: for every pixel of a band of rows, integrate the
 * two-beam Howie-Whelan equations down the column through the displacement
 * field and store bright- and dark-field intensities. Pure computation on
 * plain data, so it runs the same in the main thread and in workers.
 */
import type { Vec3 } from '../math/vec3.js';
import type { ImageFrame } from '../geometry/frames.js';
import { columnEntryOffset, pixelX } from '../geometry/frames.js';
import { integrateColumn, perfectCrystal, type TwoBeamParams } from '../dynamics/twoBeam.js';
import { rk4Column } from '../dynamics/rk4Reference.js';
import { buildField, type FieldSpec } from './fieldSpecs.js';

export interface RenderJob {
  readonly width: number;
  readonly height: number;
  readonly pixel_nm: number;
  readonly frame: ImageFrame;
  /** g in the crystal Cartesian frame, nm^-1. */
  readonly g_cart: Vec3;
  readonly params: TwoBeamParams;
  /** Integrator tolerance (intensity). */
  readonly tol: number;
  readonly fields: readonly FieldSpec[];
  /** Baseline for benchmarks only: plain fixed-step RK4 with this many steps per column. */
  readonly rk4Steps?: number;
}

export interface RowStats {
  slices: number;
  columns: number;
}

/**
 * Fill rows [row0, row1) of the image into bf and df (offset 0 = first pixel
 * of row0). Returns slice statistics.
 */
export function renderRows(job: RenderJob, row0: number, row1: number, bf: Float32Array, df: Float32Array): RowStats {
  const { width, height, pixel_nm, frame, g_cart, params, tol } = job;
  const L = frame.columnLength_nm;
  const out = new Float64Array(4);
  const stats = { slices: 0 };
  const field = buildField(job.fields);
  if (field === null) {
    perfectCrystal(out, params, L);
    const i0 = out[0] * out[0] + out[1] * out[1];
    const ig = out[2] * out[2] + out[3] * out[3];
    bf.fill(i0, 0, (row1 - row0) * width);
    df.fill(ig, 0, (row1 - row0) * width);
    return { slices: (row1 - row0) * width, columns: (row1 - row0) * width };
  }
  // beta'(z) = g . (grad R) . ez = sum_ij g_i dR_i/dx_j ez_j
  const [gx, gy, gz] = g_cart;
  const [kx, ky, kz] = frame.ez;
  const grad = new Float64Array(9);
  let cx = 0;
  let cy = 0;
  let cz = 0;
  const betaPrime = (z: number): number => {
    field.gradient(grad, cx + z * kx, cy + z * ky, cz + z * kz);
    return (
      gx * (grad[0] * kx + grad[1] * ky + grad[2] * kz) +
      gy * (grad[3] * kx + grad[4] * ky + grad[5] * kz) +
      gz * (grad[6] * kx + grad[7] * ky + grad[8] * kz)
    );
  };
  const noFaults = new Float64Array(0);
  const [ex0, ex1, ex2] = frame.ex;
  const [ey0, ey1, ey2] = frame.ey;
  let k = 0;
  for (let j = row0; j < row1; j++) {
    const y = pixelX(j, height, pixel_nm);
    for (let i = 0; i < width; i++, k++) {
      const x = pixelX(i, width, pixel_nm);
      const tau0 = columnEntryOffset(frame, x, y);
      cx = x * ex0 + y * ey0 + tau0 * kx;
      cy = x * ex1 + y * ey1 + tau0 * ky;
      cz = x * ex2 + y * ey2 + tau0 * kz;
      if (job.rk4Steps === undefined) integrateColumn(out, params, L, betaPrime, noFaults, tol, stats);
      else {
        rk4Column(out, params, L, betaPrime, job.rk4Steps);
        stats.slices += job.rk4Steps;
      }
      bf[k] = out[0] * out[0] + out[1] * out[1];
      df[k] = out[2] * out[2] + out[3] * out[3];
    }
  }
  return { slices: stats.slices, columns: (row1 - row0) * width };
}
