/**
 * Scenario -> images: for every condition, the bright- and dark-field
 * intensity images (fractions of the incident beam) and the perfect-crystal
 * background of that condition.
 */
import type { TwoBeamParams } from '../dynamics/twoBeam.js';
import { blochRow, blochRowInput } from './blochRow.js';
import { generalBeamSet } from './beamSet.js';
import type { Scenario } from '../scenario/types.js';
import { defectModel } from './fieldSpecs.js';
import { resolveCondition, type ResolvedCondition } from './resolveCondition.js';
import { columnEvaluator, type ManyBeamJob, type RenderJob } from './renderRows.js';
import { coreMask } from './cores.js';
import type { Progress, RenderPool } from './workerPool.js';

/** Default integrator tolerance on intensity per column. */
export const DEFAULT_TOLERANCE = 1e-4;

export interface ConditionImages {
  readonly condition: ResolvedCondition;
  readonly width: number;
  readonly height: number;
  readonly pixel_nm: number;
  readonly bf: Float32Array;
  readonly df: Float32Array;
  /** Perfect-crystal intensities of this condition. */
  readonly background: { readonly bf: number; readonly df: number };
  readonly slices: number;
  /** Pixels whose area reaches a dislocation core (1), averaged over their area outside the core (cores.ts). */
  readonly coreMask: Uint8Array;
}

export function twoBeamParams(c: ResolvedCondition): TwoBeamParams {
  return { xi_nm: c.xi_nm, xiAbs_nm: c.xiAbs_nm, xiAbs0_nm: c.xiAbs0_nm, s_per_nm: c.s_per_nm };
}

/** The many-beam part of a job for a systematic-row condition, or undefined for two beams. */
export function manyBeamJob(sc: Scenario, c: ResolvedCondition): ManyBeamJob | undefined {
  if (c.beams.kind === 'set') {
    const set = generalBeamSet(sc, c, c.beams.beams);
    return { input: set.input, orders: new Float64Array(set.hkl.length), incident: set.incident, darkField: set.darkField, beamVectors: set.beamVectors_per_nm };
  }
  if (c.beams.kind !== 'row') return undefined;
  const row = blochRow(sc.material, c.g, sc.kV, sc.absorption, { nMin: c.beams.nMin, nMax: c.beams.nMax });
  return { input: blochRowInput(row, c.s_per_nm), orders: row.orders, incident: row.incident, darkField: row.darkField };
}

export function renderJob(sc: Scenario, c: ResolvedCondition, tol = DEFAULT_TOLERANCE, shareColumns = true): RenderJob {
  const mb = manyBeamJob(sc, c);
  return {
    ...(shareColumns ? {} : { shareColumns: false }),
    ...(mb === undefined ? {} : { manyBeam: mb }),
    width: sc.image.width_px,
    height: sc.image.height_px,
    pixel_nm: sc.image.pixel_nm,
    frame: c.frame,
    g_cart: c.g_cart,
    params: twoBeamParams(c),
    tol,
    model: defectModel(sc),
  };
}

/** Perfect-crystal intensities of a job's condition (two-beam or many-beam as the job says). */
export function background(job: RenderJob): { bf: number; df: number } {
  const out = new Float64Array(4);
  columnEvaluator({ ...job, model: { fields: [], surfaces: [] } }).column(out, 0, 0);
  return { bf: out[0] * out[0] + out[1] * out[1], df: out[2] * out[2] + out[3] * out[3] };
}

export async function renderScenario(
  sc: Scenario,
  pool: RenderPool,
  onProgress?: (conditionIndex: number, doneRows: number, totalRows: number) => void,
  tol = DEFAULT_TOLERANCE,
  /** false: every column integrated on its own (no translation method for straight defects). */
  shareColumns = true,
): Promise<ConditionImages[]> {
  const result: ConditionImages[] = [];
  for (let i = 0; i < sc.conditions.length; i++) {
    const c = resolveCondition(sc, sc.conditions[i]);
    const progress: Progress | undefined = onProgress ? (d, t) => onProgress(i, d, t) : undefined;
    const job = renderJob(sc, c, tol, shareColumns);
    const img = await pool.render(job, progress);
    result.push({
      condition: c,
      width: sc.image.width_px,
      height: sc.image.height_px,
      pixel_nm: sc.image.pixel_nm,
      bf: img.bf,
      df: img.df,
      background: background(job),
      slices: img.slices,
      coreMask: coreMask(job),
    });
  }
  return result;
}
