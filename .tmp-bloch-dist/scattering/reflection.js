import { cellVolume_nm3, gLength_per_nm } from '../crystal/lattice.js';
import { InputError } from '../errors.js';
import { checkMillerIndices, structureFactorInto } from './structureFactor.js';
import { braggAngle_rad, checkVoltage_kV, relativisticGamma, wavelength_nm } from './wavelength.js';
/** |F_g| below this fraction of sum_j occ_j |fe_j| exp(-B_j s^2) counts as a symmetry zero. */
export const FORBIDDEN_RELATIVE_TOLERANCE = 1e-6;
/** Default r = xi_g / xi'_g (common practice, Hirsch et al. 1965). */
export const DEFAULT_ABSORPTION_RATIO = 0.1;
const volumes = new WeakMap();
function volume_nm3(material) {
    let v = volumes.get(material);
    if (v === undefined) {
        v = cellVolume_nm3(material.lattice);
        if (!(v > 0) || !Number.isFinite(v)) {
            throw new InputError(`material "${material.name}" has a degenerate cell (volume ${v} nm^3); check its lattice parameters.`);
        }
        volumes.set(material, v);
    }
    return v;
}
function checkAbsorptionRatio(r) {
    if (!Number.isFinite(r) || r < 0 || r > 1) {
        throw new InputError(`absorptionRatio ${r} is out of range; give xi_g/xi'_g between 0 and 1 (0.1 is common practice).`);
    }
}
const out4 = new Float64Array(4);
function isSymmetryZero(f) {
    return Math.hypot(f[0], f[1]) <= FORBIDDEN_RELATIVE_TOLERANCE * f[2];
}
/** True when |F_g| vanishes by symmetry for this material's structure (never true for 000). */
export function isForbidden(material, hkl) {
    checkMillerIndices(hkl);
    structureFactorInto(out4, material, hkl[0], hkl[1], hkl[2]);
    return isSymmetryZero(out4);
}
/** U_g and U'_g = r U_g (nm^-2) for any integer hkl, 000 included (U_0 from F_0 at s = 0); exact 0 for a symmetry zero. */
export function opticalPotential_per_nm2(material, hkl, kV, absorptionRatio) {
    checkMillerIndices(hkl);
    checkVoltage_kV(kV);
    checkAbsorptionRatio(absorptionRatio);
    structureFactorInto(out4, material, hkl[0], hkl[1], hkl[2]);
    if (isSymmetryZero(out4))
        return { re: 0, im: 0, absRe: 0, absIm: 0 };
    // F in nm = F_A / 10
    const k = relativisticGamma(kV) / (Math.PI * volume_nm3(material) * 10);
    const re = k * out4[0];
    const im = k * out4[1];
    return { re, im, absRe: absorptionRatio * re, absIm: absorptionRatio * im };
}
/** Two-beam parameters of reflection hkl at kV kilovolts; InputError for 000 or a forbidden reflection. */
export function reflectionParameters(material, hkl, kV, options = {}) {
    checkMillerIndices(hkl);
    checkVoltage_kV(kV);
    const r = options.absorptionRatio ?? DEFAULT_ABSORPTION_RATIO;
    checkAbsorptionRatio(r);
    const cosThetaFactor = options.cosThetaFactor ?? false;
    const label = `(${hkl[0]} ${hkl[1]} ${hkl[2]})`;
    if (hkl[0] === 0 && hkl[1] === 0 && hkl[2] === 0) {
        throw new InputError(`reflection g = ${label} is the transmitted beam, not a reflection; give a nonzero g.`);
    }
    const f = structureFactorInto(new Float64Array(4), material, hkl[0], hkl[1], hkl[2]);
    if (isSymmetryZero(f)) {
        throw new InputError(`reflection g = ${label} is forbidden for the ${material.structure} structure of material "${material.name}" (its structure factor vanishes by symmetry, so it has no extinction distance); choose an allowed reflection.`);
    }
    const Vc = volume_nm3(material);
    const lambda = wavelength_nm(kV);
    const gamma = relativisticGamma(kV);
    const g = gLength_per_nm(material.lattice, hkl);
    const theta = braggAngle_rad(lambda, g);
    const F_A = { re: f[0], im: f[1] };
    const absF_A = Math.hypot(f[0], f[1]);
    const k = gamma / (Math.PI * Vc * 10);
    const U = { re: k * F_A.re, im: k * F_A.im };
    const xi = (cosThetaFactor ? Math.cos(theta) : 1) / (lambda * k * absF_A);
    const xiAbs = r === 0 ? Infinity : xi / r;
    return {
        hkl: [hkl[0], hkl[1], hkl[2]],
        d_nm: 1 / g,
        g_per_nm: g,
        lambda_nm: lambda,
        gamma,
        braggAngle_rad: theta,
        F_A,
        absF_A,
        U_per_nm2: U,
        xi_nm: xi,
        xiAbs_nm: xiAbs,
        xiAbs0_nm: xiAbs,
        absorptionRatio: r,
        cosThetaFactor,
        cellVolume_nm3: Vc,
    };
}
