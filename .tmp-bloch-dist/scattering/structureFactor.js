import { reciprocalMetric } from '../crystal/lattice.js';
import { InputError } from '../errors.js';
import { electronCoefficients, electronFactorFromCoefficients } from './scatteringFactor.js';
const cache = new WeakMap();
const TWO_PI = 2 * Math.PI;
function pack(material) {
    const sites = material.sites;
    if (sites.length === 0) {
        throw new InputError(`material "${material.name}" has no atom sites; give at least one site with element, position, occupancy and debyeWaller_A2.`);
    }
    const n = sites.length;
    const x = new Float64Array(n);
    const y = new Float64Array(n);
    const z = new Float64Array(n);
    const occ = new Float64Array(n);
    const B = new Float64Array(n);
    const kind = new Int32Array(n);
    const elements = [];
    const index = new Map();
    sites.forEach((site, j) => {
        const where = `material "${material.name}" site ${j} (${site.element})`;
        const [px, py, pz] = site.position;
        if (!Number.isFinite(px) || !Number.isFinite(py) || !Number.isFinite(pz)) {
            throw new InputError(`${where} has a non-numeric position; give three fractional coordinates.`);
        }
        if (!Number.isFinite(site.occupancy) || site.occupancy < 0 || site.occupancy > 1) {
            throw new InputError(`${where} has occupancy ${site.occupancy}; give a value between 0 and 1.`);
        }
        if (!Number.isFinite(site.debyeWaller_A2) || site.debyeWaller_A2 < 0) {
            throw new InputError(`${where} has debyeWaller_A2 ${site.debyeWaller_A2}; give a value >= 0 in Angstrom^2.`);
        }
        const c = electronCoefficients(site.element);
        let k = index.get(c.Z);
        if (k === undefined) {
            k = elements.length;
            index.set(c.Z, k);
            elements.push(c);
        }
        x[j] = px;
        y[j] = py;
        z[j] = pz;
        occ[j] = site.occupancy;
        B[j] = site.debyeWaller_A2;
        kind[j] = k;
    });
    const G = reciprocalMetric(material.lattice);
    const gm = Float64Array.of(G[0][0], G[1][1], G[2][2], G[0][1], G[0][2], G[1][2]);
    return { n, x, y, z, occ, B_A2: B, kind, elements, fe: new Float64Array(elements.length), gm };
}
function packed(material) {
    let p = cache.get(material);
    if (!p) {
        p = pack(material);
        cache.set(material, p);
    }
    return p;
}
/** Throws an InputError unless h, k, l are integers. */
export function checkMillerIndices(hkl, field = 'g') {
    if (hkl.length !== 3 || !Number.isInteger(hkl[0]) || !Number.isInteger(hkl[1]) || !Number.isInteger(hkl[2])) {
        throw new InputError(`reflection ${field} = (${hkl.join(' ')}) must have three integer Miller indices (convert 4-index hkil to hkl first).`);
    }
}
/**
 * Writes into `out` (length >= 4):
 *   out[0] = Re F_g (A), out[1] = Im F_g (A),
 *   out[2] = sum_j occ_j |fe_j(s)| exp(-B_j s^2) (A), the scale a symmetry zero is judged against,
 *   out[3] = s = |g|/2 in A^-1.
 * h, k, l are taken as given (integers expected; not checked here, for speed).
 */
export function structureFactorInto(out, material, h, k, l) {
    const p = packed(material);
    const gm = p.gm;
    const g2_per_nm2 = h * h * gm[0] + k * k * gm[1] + l * l * gm[2] + 2 * (h * k * gm[3] + h * l * gm[4] + k * l * gm[5]);
    // s = |g|/2 with |g| in A^-1 = |g|_nm / 10, so s^2 = g^2_nm / 400
    const s2 = g2_per_nm2 / 400;
    const fe = p.fe;
    for (let e = 0; e < p.elements.length; e++)
        fe[e] = electronFactorFromCoefficients(p.elements[e], s2);
    let re = 0;
    let im = 0;
    let scale = 0;
    for (let j = 0; j < p.n; j++) {
        const f = p.occ[j] * fe[p.kind[j]] * Math.exp(-p.B_A2[j] * s2);
        const phase = TWO_PI * (h * p.x[j] + k * p.y[j] + l * p.z[j]);
        re += f * Math.cos(phase);
        im += f * Math.sin(phase);
        scale += Math.abs(f);
    }
    out[0] = re;
    out[1] = im;
    out[2] = scale;
    out[3] = Math.sqrt(s2);
    return out;
}
const scratch = new Float64Array(4);
/** Electron structure factor F_g in Angstrom for integer Miller indices hkl (3-index). */
export function structureFactor_A(material, hkl) {
    checkMillerIndices(hkl);
    structureFactorInto(scratch, material, hkl[0], hkl[1], hkl[2]);
    return { re: scratch[0], im: scratch[1] };
}
