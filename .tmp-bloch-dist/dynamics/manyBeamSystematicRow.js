/**
 * Systematic-row helpers: beams n g for n = nMin..nMax along one reciprocal
 * lattice row (physics.md section 4).
 *
 *   excitation error of beam n g (parabolic approximation of the Ewald sphere):
 *       s_ng = n s_g + n (1 - n) lambda g^2 / 2
 *   weak-beam condition g(ng), Ewald sphere through n g (Cockayne, Ray &
 *   Whelan 1969; Williams & Carter):
 *       s_g = (n - 1) lambda g^2 / 2
 */
import { InputError } from '../errors.js';
function checkRow(nMin, nMax) {
    if (!Number.isInteger(nMin) || !Number.isInteger(nMax) || nMin > 0 || nMax < 0 || nMax <= nMin) {
        throw new InputError(`beam orders ${nMin}..${nMax}: give integers nMin <= 0 <= nMax with at least two beams (e.g. -1..3).`);
    }
}
function checkPositive(name, v) {
    if (!(Number.isFinite(v) && v > 0))
        throw new InputError(`${name} is ${v}: give a positive number.`);
}
/**
 * Excitation errors s_ng (nm^-1) of the beams n = nMin..nMax of a systematic
 * row, index n - nMin; s_g is the excitation error of the fundamental g.
 */
export function systematicRowExcitationErrors(nMin, nMax, s_g, lambda_nm, g_per_nm) {
    checkRow(nMin, nMax);
    checkPositive('lambda_nm', lambda_nm);
    checkPositive('g_per_nm', g_per_nm);
    if (!Number.isFinite(s_g))
        throw new InputError(`s_g is ${s_g}: give a finite excitation error in nm^-1.`);
    const out = new Float64Array(nMax - nMin + 1);
    const half = 0.5 * lambda_nm * g_per_nm * g_per_nm;
    for (let n = nMin; n <= nMax; n++)
        out[n - nMin] = n * s_g + n * (1 - n) * half;
    return out;
}
/**
 * Excitation error s_g (nm^-1) of the fundamental g that puts the Ewald sphere
 * through n g: the weak-beam condition g(ng), s_g = (n - 1) lambda g^2 / 2.
 */
export function weakBeamDeviation(n, lambda_nm, g_per_nm) {
    if (!Number.isFinite(n))
        throw new InputError(`weak-beam order n is ${n}: give a finite number such as 3.`);
    checkPositive('lambda_nm', lambda_nm);
    checkPositive('g_per_nm', g_per_nm);
    return 0.5 * (n - 1) * lambda_nm * g_per_nm * g_per_nm;
}
/** Beam orders n = nMin..nMax as a Float64Array (the strain factors of the row). */
export function systematicRowOrders(nMin, nMax) {
    checkRow(nMin, nMax);
    const out = new Float64Array(nMax - nMin + 1);
    for (let n = nMin; n <= nMax; n++)
        out[n - nMin] = n;
    return out;
}
/**
 * The many-beam input of a systematic row: excitation errors from
 * systematicRowExcitationErrors and the tables U_{(n_i - n_j) g},
 * U'_{(n_i - n_j) g}. The transmitted beam has index -nMin.
 */
export function systematicRowInput(spec) {
    const s = systematicRowExcitationErrors(spec.nMin, spec.nMax, spec.s_g, spec.lambda_nm, spec.g_per_nm);
    const n = s.length;
    const uR = new Float64Array(n * n);
    const uI = new Float64Array(n * n);
    const pR = new Float64Array(n * n);
    const pI = new Float64Array(n * n);
    for (let i = 0; i < n; i++) {
        for (let j = 0; j < n; j++) {
            const m = i - j;
            const ij = i * n + j;
            if (m !== 0) {
                const u = spec.potential(m);
                uR[ij] = u[0];
                uI[ij] = u[1];
            }
            const p = spec.absorption(m);
            pR[ij] = p[0];
            pI[ij] = p[1];
        }
    }
    return {
        excitationErrors_per_nm: s,
        potentialRe_per_nm2: uR,
        potentialIm_per_nm2: uI,
        absorptionRe_per_nm2: pR,
        absorptionIm_per_nm2: pI,
        waveNumber_per_nm: 1 / spec.lambda_nm,
    };
}
