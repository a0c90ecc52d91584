/**
 * Neutral-atom scattering factors from Gaussian fits, read once from
 * data/electron-scattering-factors.json (written by
 * scripts/export_scattering_factors.py from python3-gemmi).
 *
 * Electron:  fe(s) = sum_{i=1..5} a_i exp(-b_i s^2), fe in Angstrom,
 *   International Tables for Crystallography Vol. C (2006), Table 4.3.2.2
 *   (fits of Peng, Ren, Dudarev & Whelan 1996, Acta Cryst. A52, 257).
 * X-ray:     fx(s) = sum_{i=1..4} a_i exp(-b_i s^2) + c, fx in electrons,
 *   International Tables Vol. C, Table 6.1.1.4.
 * s = sin(theta)/lambda = |g|/2 in 1/Angstrom.
 *
 * Range: the fits are made for 0 <= s <= 2 A^-1 (electron) and
 * 0 <= s <= 2 A^-1 (X-ray). Beyond s = 2 A^-1 the functions are still
 * evaluated as written: the electron Gaussians decay smoothly towards 0, so
 * far reflections get a small, not a wrong-signed or infinite, factor; such
 * reflections carry negligible weight in diffraction-contrast work. The X-ray
 * fit tends to the constant c there and is not meaningful beyond its range.
 * Factors depend on s^2 only, so the sign of s does not matter.
 */
import { readFileSync } from 'node:fs';
import { InputError } from '../errors.js';
/** Upper end of the fitted range of s, 1/Angstrom. */
export const S_MAX_FITTED_perA = 2;
let table;
function loadTable() {
    if (table)
        return table;
    const url = new URL('../../data/electron-scattering-factors.json', import.meta.url);
    const doc = JSON.parse(readFileSync(url, 'utf8'));
    const electron = new Map();
    const xray = new Map();
    for (const el of doc.elements) {
        if (el.electron.a.length !== 5 || el.electron.b.length !== 5 || el.xray.a.length !== 4 || el.xray.b.length !== 4) {
            throw new Error(`malformed scattering-factor entry for ${el.symbol} in ${url.pathname}`);
        }
        electron.set(el.symbol, {
            Z: el.Z,
            symbol: el.symbol,
            a: Float64Array.from(el.electron.a),
            b: Float64Array.from(el.electron.b),
        });
        xray.set(el.symbol, {
            Z: el.Z,
            symbol: el.symbol,
            a: Float64Array.from(el.xray.a),
            b: Float64Array.from(el.xray.b),
            c: el.xray.c,
        });
    }
    table = { header: doc.header, electron, xray };
    return table;
}
/** "cu", "CU", " Cu " -> "Cu". */
function normaliseSymbol(element) {
    const t = element.trim();
    return t.length === 0 ? t : t[0].toUpperCase() + t.slice(1).toLowerCase();
}
function unknownElement(element) {
    return new InputError(`unknown element "${element}" in a site's element field; use a neutral-atom symbol from H to Cf (Z = 1..98), e.g. "Cu".`);
}
/** The table header (sources, units, gemmi version, writer script). */
export function scatteringTableHeader() {
    return loadTable().header;
}
/** The 5-Gaussian electron coefficients of an element symbol; InputError when unknown. */
export function electronCoefficients(element) {
    const c = loadTable().electron.get(normaliseSymbol(element));
    if (!c)
        throw unknownElement(element);
    return c;
}
/** The 4-Gaussian + c X-ray coefficients of an element symbol; InputError when unknown. */
export function xrayCoefficients(element) {
    const c = loadTable().xray.get(normaliseSymbol(element));
    if (!c)
        throw unknownElement(element);
    return c;
}
/** Atomic number of an element symbol; InputError when unknown. */
export function atomicNumber(element) {
    return electronCoefficients(element).Z;
}
/** fe(s) in Angstrom from given coefficients and s^2 in A^-2 (the hot-path form). */
export function electronFactorFromCoefficients(c, s2_perA2) {
    const a = c.a;
    const b = c.b;
    return (a[0] * Math.exp(-b[0] * s2_perA2) +
        a[1] * Math.exp(-b[1] * s2_perA2) +
        a[2] * Math.exp(-b[2] * s2_perA2) +
        a[3] * Math.exp(-b[3] * s2_perA2) +
        a[4] * Math.exp(-b[4] * s2_perA2));
}
function checkS(s_perA) {
    if (!Number.isFinite(s_perA))
        throw new RangeError(`scattering vector s must be finite, got ${s_perA}`);
}
/** Electron scattering factor fe(s) of a neutral atom in Angstrom, s = sin(theta)/lambda in A^-1. */
export function electronScatteringFactor_A(element, s_perA) {
    checkS(s_perA);
    return electronFactorFromCoefficients(electronCoefficients(element), s_perA * s_perA);
}
/** X-ray scattering factor fx(s) of a neutral atom in electrons, s = sin(theta)/lambda in A^-1. */
export function xrayScatteringFactor(element, s_perA) {
    checkS(s_perA);
    const c = xrayCoefficients(element);
    const s2 = s_perA * s_perA;
    let f = c.c;
    for (let i = 0; i < 4; i++)
        f += c.a[i] * Math.exp(-c.b[i] * s2);
    return f;
}
