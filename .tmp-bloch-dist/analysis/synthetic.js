import { variantScenario } from './candidates.js';
import { conditionView, simulatedGAngle_deg } from './identifyView.js';
import { seededRandom } from './identifyRandom.js';
import { bilinear, gaussianBlur } from './preprocess.js';
/** File name for a synthetic micrograph: always starts with "synthetic-". */
export function syntheticFileName(conditionId, field, ext = 'tif') {
    return `synthetic-${conditionId}-${field}.${ext}`;
}
/** True for a file name that marks a synthetic micrograph. */
export function isSyntheticName(path) {
    const base = path.split(/[\\/]/).pop() ?? path;
    return base.startsWith('synthetic-');
}
export async function syntheticMicrographs(sc, hidden, specs, opts, render) {
    const { width: w, height: h, pixel_nm: p } = opts;
    if (!(opts.snr > 0))
        throw new RangeError(`syntheticMicrographs: snr must be > 0, got ${opts.snr}`);
    const truthSc = hidden ? variantScenario(sc, hidden) : sc;
    const label = hidden ? hidden.label : sc.defects.map((d) => d.label).join(' + ') || 'perfect crystal';
    const rnd = seededRandom(opts.seed);
    const os = Math.max(1, Math.round(opts.oversample ?? 2));
    const maxShift = opts.maxShift_nm ?? 0.1 * Math.min(w, h) * p;
    const maxRot = opts.maxRotation_deg ?? 2;
    const maxScale = opts.maxScale ?? 0;
    const gradient = opts.gradient ?? 0.1;
    const rel = [];
    for (const spec of specs) {
        const cond = truthSc.conditions.find((c) => c.id === spec.conditionId);
        if (!cond)
            throw new RangeError(`syntheticMicrographs: no condition "${spec.conditionId}"`);
        const gAngle = spec.gAngle_deg ?? simulatedGAngle_deg(truthSc, cond);
        const rotation = (2 * rnd.uniform() - 1) * maxRot;
        const scale = 1 + (2 * rnd.uniform() - 1) * maxScale;
        const shift = [(2 * rnd.uniform() - 1) * maxShift, (2 * rnd.uniform() - 1) * maxShift];
        const ramp = rnd.uniform() * 2 * Math.PI;
        // fine canvas covering the field after shift, rotation and scale
        const pf = p / os;
        const reach = (Math.hypot(w, h) * p) / 2 / Math.min(1, scale) + Math.hypot(shift[0], shift[1]) + 2 * p;
        const side = 2 * Math.ceil(reach / pf) + 2;
        const angle = (gAngle + rotation) * (spec.mirrored ? -1 : 1);
        const imgs = await render(conditionView(truthSc, cond, angle, side, side, pf));
        const ci = imgs[0];
        const src = spec.field === 'bf' ? ci.bf : ci.df;
        const bg = ci.background[spec.field];
        const data = new Float64Array(w * h);
        for (let y = 0; y < h; y++) {
            for (let x = 0; x < w; x++) {
                let acc = 0;
                for (let j = 0; j < os; j++) {
                    for (let i = 0; i < os; i++) {
                        // position in the micrograph (nm from its centre, +y down), then in the simulation
                        const X = (x + (i + 0.5) / os - w / 2) * p;
                        const Y = (y + (j + 0.5) / os - h / 2) * p;
                        const sx = (X - shift[0]) / scale;
                        let sy = (Y - shift[1]) / scale;
                        if (spec.mirrored)
                            sy = -sy;
                        acc += bilinear(src, side, side, sx / pf + side / 2 - 0.5, sy / pf + side / 2 - 0.5);
                    }
                }
                data[y * w + x] = acc / (os * os) / bg - 1;
            }
        }
        const blurred = gaussianBlur(new Float64Array(w * h), data, w, h, (opts.blur_nm ?? 0) / p);
        const rampImg = new Float64Array(w * h);
        const half = Math.hypot(w, h) / 2;
        for (let y = 0; y < h; y++) {
            for (let x = 0; x < w; x++) {
                rampImg[y * w + x] = 1 + (gradient * ((x + 0.5 - w / 2) * Math.cos(ramp) + (y + 0.5 - h / 2) * Math.sin(ramp))) / half;
            }
        }
        rel.push({
            data: blurred,
            spec,
            ramp: rampImg,
            truth: { candidate: label, gAngle_deg: gAngle, shift_nm: shift, rotation_deg: rotation, scale, noiseRelative: 0, backgroundLevel: 0 },
        });
    }
    let cMax = 0;
    for (const r of rel)
        for (const v of r.data)
            cMax = Math.max(cMax, Math.abs(v));
    // a set with no contrast at all: noise relative to a nominal 10 % contrast
    const sigmaRel = (cMax > 0 ? cMax : 0.1) / opts.snr;
    const poisson = (opts.noise ?? 'poisson') === 'poisson';
    const level = poisson ? 1 / (sigmaRel * sigmaRel) : 1000;
    return rel.map((r) => {
        const out = new Float32Array(w * h);
        for (let k = 0; k < out.length; k++) {
            const mean = level * (1 + r.data[k]) * r.ramp[k];
            out[k] = poisson ? rnd.poisson(Math.max(0, mean)) : mean + level * sigmaRel * r.ramp[k] * rnd.normal();
        }
        return {
            conditionId: r.spec.conditionId,
            field: r.spec.field,
            width: w,
            height: h,
            pixel_nm: p,
            data: out,
            synthetic: true,
            truth: { ...r.truth, noiseRelative: sigmaRel, backgroundLevel: level },
        };
    });
}
