import { blochRow, blochRowInput } from '../analysis/blochRow.js';
import { defectModel } from './fieldSpecs.js';
import { resolveCondition } from './resolveCondition.js';
import { columnEvaluator } from './renderRows.js';
/** Default integrator tolerance on intensity per column. */
export const DEFAULT_TOLERANCE = 1e-4;
export function twoBeamParams(c) {
    return { xi_nm: c.xi_nm, xiAbs_nm: c.xiAbs_nm, xiAbs0_nm: c.xiAbs0_nm, s_per_nm: c.s_per_nm };
}
/** The many-beam part of a job for a systematic-row condition, or undefined for two beams. */
export function manyBeamJob(sc, c) {
    if (c.beams.kind !== 'row')
        return undefined;
    const row = blochRow(sc.material, c.g, sc.kV, sc.absorption, c.beams.count);
    return { input: blochRowInput(row, c.s_per_nm), orders: row.orders, incident: row.incident, darkField: row.darkField };
}
export function renderJob(sc, c, tol = DEFAULT_TOLERANCE) {
    const mb = manyBeamJob(sc, c);
    return {
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
export function background(job) {
    const out = new Float64Array(4);
    columnEvaluator({ ...job, model: { fields: [], surfaces: [] } }).column(out, 0, 0);
    return { bf: out[0] * out[0] + out[1] * out[1], df: out[2] * out[2] + out[3] * out[3] };
}
export async function renderScenario(sc, pool, onProgress, tol = DEFAULT_TOLERANCE) {
    const result = [];
    for (let i = 0; i < sc.conditions.length; i++) {
        const c = resolveCondition(sc, sc.conditions[i]);
        const progress = onProgress ? (d, t) => onProgress(i, d, t) : undefined;
        const job = renderJob(sc, c, tol);
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
        });
    }
    return result;
}
