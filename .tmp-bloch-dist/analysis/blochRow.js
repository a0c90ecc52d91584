import { InputError } from '../errors.js';
import { blochWaves } from '../dynamics/blochWaves.js';
import { systematicRowInput, systematicRowOrders } from '../dynamics/manyBeamSystematicRow.js';
import { opticalPotential_per_nm2, reflectionParameters } from '../scattering/reflection.js';
/** Largest beam count accepted (a systematic row -20..20). */
export const MAX_BEAMS = 41;
/** Beam orders of a beam count: 2 -> (0, 1); odd N = 2m + 1 -> -m..m. InputError otherwise. */
export function rowOrders(beams) {
    if (!Number.isInteger(beams) || beams < 2 || beams > MAX_BEAMS || (beams !== 2 && beams % 2 === 0)) {
        throw new InputError(`--beams ${beams}: give 2 for two-beam or an odd number from 3 to ${MAX_BEAMS} for a systematic row -m g .. m g.`);
    }
    if (beams === 2)
        return { nMin: 0, nMax: 1 };
    const m = (beams - 1) / 2;
    return { nMin: -m, nMax: m };
}
/** Set up the beams of reflection hkl; InputError for g = 000, a forbidden g or a bad beam count. */
export function blochRow(material, hkl, kV, absorptionRatio, beams) {
    const { nMin, nMax } = rowOrders(beams);
    const reflection = reflectionParameters(material, hkl, kV, { absorptionRatio });
    const K = 1 / reflection.lambda_nm;
    const u0abs = Number.isFinite(reflection.xiAbs0_nm) ? K / reflection.xiAbs0_nm : 0;
    const cacheU = new Map();
    const cacheA = new Map();
    const coefficients = (m) => {
        const p = opticalPotential_per_nm2(material, [m * hkl[0], m * hkl[1], m * hkl[2]], kV, absorptionRatio);
        cacheU.set(m, [p.re, p.im]);
        cacheA.set(m, m === 0 ? [u0abs, 0] : [p.absRe, p.absIm]);
    };
    return {
        material,
        hkl: [hkl[0], hkl[1], hkl[2]],
        kV,
        absorptionRatio,
        reflection,
        beams,
        nMin,
        nMax,
        orders: systematicRowOrders(nMin, nMax),
        incident: -nMin,
        darkField: 1 - nMin,
        potential(m) {
            if (!cacheU.has(m))
                coefficients(m);
            return cacheU.get(m);
        },
        absorption(m) {
            if (!cacheA.has(m))
                coefficients(m);
            return cacheA.get(m);
        },
    };
}
/** The many-beam input at excitation error s_g (nm^-1) of the fundamental g. */
export function blochRowInput(row, s_g) {
    if (!Number.isFinite(s_g))
        throw new InputError(`deviation parameter s = ${s_g}: give a finite number in nm^-1.`);
    // two beams (orders 0, 1): s_0 = 0 and s_g exactly, the Ewald-sphere term n (1 - n) vanishes
    return systematicRowInput({
        nMin: row.nMin,
        nMax: row.nMax,
        s_g,
        lambda_nm: row.reflection.lambda_nm,
        g_per_nm: row.reflection.g_per_nm,
        potential: (m) => row.potential(m),
        absorption: (m) => row.absorption(m),
    });
}
/** Bloch waves at s_g with the transmitted beam incident (sorted by decreasing Re gamma). */
export function blochRowWaves(row, s_g) {
    return blochWaves(blochRowInput(row, s_g), row.incident);
}
/** Display name of beam order n: "0" for the transmitted beam, "g", "-g", "2g", ... */
export function beamName(n) {
    if (n === 0)
        return '0';
    if (n === 1)
        return 'g';
    if (n === -1)
        return '-g';
    return `${n}g`;
}
