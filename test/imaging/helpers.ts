/** Test helpers: build scenarios and render them in-thread. */
import { parseScenario } from '../../src/scenario/parse.js';
import type { Scenario } from '../../src/scenario/types.js';
import { renderScenario, type ConditionImages } from '../../src/imaging/renderScenario.js';
import { createRenderPool } from '../../src/imaging/workerPool.js';

export function scenario(over: Record<string, unknown>): Scenario {
  return parseScenario({
    name: 'test',
    material: 'Cu',
    kV: 200,
    foil: { thickness_nm: 100, normal: [0, 0, 1] },
    beam: [0, 0, 1],
    imageX: [1, 0, 0],
    image: { width_px: 64, height_px: 8, pixel_nm: 1 },
    absorption: 0.1,
    conditions: [{ id: 'g200', g: [2, 0, 0], s_per_nm: 0 }],
    defects: [],
    ...over,
  });
}

export async function render(sc: Scenario, tol?: number): Promise<ConditionImages[]> {
  const pool = createRenderPool(1);
  try {
    return await renderScenario(sc, pool, undefined, tol);
  } finally {
    await pool.close();
  }
}

/** Row j of an image as a plain array. */
export function row(img: Float32Array, width: number, j: number): number[] {
  return Array.from(img.subarray(j * width, (j + 1) * width));
}

/** Largest |I - background| over the image. */
export function maxContrast(img: Float32Array, bg: number): number {
  let m = 0;
  for (const v of img) m = Math.max(m, Math.abs(v - bg));
  return m;
}

/** Contrast-weighted mean position (nm) along x of one row, relative to the image centre. */
export function contrastCentroid(profile: readonly number[], bg: number, pixel_nm: number): number {
  let s = 0;
  let w = 0;
  const n = profile.length;
  profile.forEach((v, i) => {
    const c = Math.abs(v - bg);
    s += c * (i + 0.5 - n / 2) * pixel_nm;
    w += c;
  });
  return s / w;
}
