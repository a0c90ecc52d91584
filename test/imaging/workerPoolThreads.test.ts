/**
 * The render pool with worker threads (only from the compiled dist/, as the
 * CLI runs it): renders requested at the same time share one queue of tasks
 * (bands of rows, whole small shared-column jobs, parts of larger ones) and each must come back
 * exactly as the calling thread renders it alone. Plumbing, not physics: the
 * worker runs the same functions on the same data, so the images must be
 * equal to the last bit.
 */
import { describe, expect, it } from 'vitest';
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { scenario } from './helpers.js';
import { resolveCondition } from '../../src/imaging/resolveCondition.js';
import { renderJob } from '../../src/imaging/renderScenario.js';
import type { RenderJob } from '../../src/imaging/renderRows.js';
import { SPLIT_WORK, type RenderPool } from '../../src/imaging/workerPool.js';
import { translationPlan } from '../../src/imaging/translationColumns.js';

const DIST = fileURLToPath(new URL('../../dist/imaging/workerPool.js', import.meta.url));

function job(over: Record<string, unknown>): RenderJob {
  const sc = scenario({ surfaces: 'infinite', image: { width_px: 24, height_px: 24, pixel_nm: 2 }, conditions: [{ id: 'g', g: [2, 0, 0], w: 0.5 }], ...over });
  return renderJob(sc, resolveCondition(sc, sc.conditions[0]));
}

describe('render pool with worker threads (dist/)', () => {
  it.skipIf(!existsSync(DIST))('renders requested together come back equal to the last bit to the same renders in the calling thread, in any order', async () => {
    const { createRenderPool } = (await import(DIST)) as { createRenderPool: (threads?: number) => RenderPool };
    const line = (b: string, depth: number) => job({ defects: [{ type: 'dislocation', b, line: [1, 1, 2], point_nm: [0, 0, depth] }] });
    // an inclusion goes column by column (bands of rows); straight lines are small shared-column jobs
    const jobs = [
      job({ defects: [{ type: 'inclusion', centre_nm: [0, 0, 40], radius_nm: 6, misfit: 0.01 }] }),
      line('1/2[1 0 1]', 50),
      line('1/2[1 1 0]', 30),
      job({ image: { width_px: 20, height_px: 28, pixel_nm: 2 }, defects: [{ type: 'inclusion', centre_nm: [4, 0, 60], radius_nm: 5, misfit: -0.01 }] }),
      line('1/2[0 1 1]', 70),
      { ...line('1/2[1 0 1]', 50), shareColumns: false },
      // large enough to be cut into parts once the workers run (SPLIT_WORK), so one render alone uses every core
      job({ image: { width_px: 240, height_px: 240, pixel_nm: 0.5 }, defects: [{ type: 'dislocation', b: '1/2[1 0 1]', line: [1, 1, 2], point_nm: [0, 0, 50] }] }),
    ];
    const big = jobs[jobs.length - 1];
    expect(translationPlan(big)!.pathLength_nm).toBeGreaterThanOrEqual(SPLIT_WORK);
    const alone = createRenderPool(1);
    const expected = [];
    for (const j of jobs) expected.push(await alone.render(j));
    await alone.close();
    const pool = createRenderPool(2);
    try {
      expect(pool.threads).toBe(2);
      // the first (column by column) starts the workers; then all at once, twice over, so tasks of different renders interleave
      const first = await pool.render(jobs[0]);
      const together = await Promise.all([...jobs, ...jobs].map((j) => pool.render(j)));
      for (const [i, got] of [first, ...together].entries()) {
        const want = expected[i === 0 ? 0 : (i - 1) % jobs.length];
        expect(Array.from(got.bf)).toEqual(Array.from(want.bf));
        expect(Array.from(got.df)).toEqual(Array.from(want.df));
        expect(got.slices).toBe(want.slices);
      }
    } finally {
      await pool.close();
    }
  });
});
