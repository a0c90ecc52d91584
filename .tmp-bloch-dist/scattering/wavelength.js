/**
 * Electron optics of the incident beam: relativistic wavelength, Lorentz
 * factor and Bragg angle.
 *
 *   lambda = h / sqrt(2 m0 e E (1 + e E / (2 m0 c^2)))
 *   gamma  = 1 + e E / (m0 c^2)
 *   sin(thetaB) = lambda |g| / 2      (|g| = 1/d, no 2 pi)
 */
import { InputError } from '../errors.js';
import { ELECTRON_MASS_kg, ELEMENTARY_CHARGE_C, PLANCK_J_s, SPEED_OF_LIGHT_m_per_s } from './constants.js';
/** Accelerating voltages the program accepts, kV. */
export const VOLTAGE_RANGE_kV = { min: 10, max: 3000 };
/** Throws an InputError unless 10 <= kV <= 3000. */
export function checkVoltage_kV(kV) {
    if (!Number.isFinite(kV) || kV < VOLTAGE_RANGE_kV.min || kV > VOLTAGE_RANGE_kV.max) {
        throw new InputError(`accelerating voltage ${kV} kV is outside the supported range; give voltage_kV between ${VOLTAGE_RANGE_kV.min} and ${VOLTAGE_RANGE_kV.max} kV.`);
    }
}
/** Lorentz factor gamma = 1 + eE/(m0 c^2) of electrons accelerated through kV kilovolts. */
export function relativisticGamma(kV) {
    checkVoltage_kV(kV);
    const eE_J = ELEMENTARY_CHARGE_C * kV * 1e3;
    return 1 + eE_J / (ELECTRON_MASS_kg * SPEED_OF_LIGHT_m_per_s * SPEED_OF_LIGHT_m_per_s);
}
/** Relativistic electron wavelength in nm for an accelerating voltage in kV. */
export function wavelength_nm(kV) {
    checkVoltage_kV(kV);
    const eE_J = ELEMENTARY_CHARGE_C * kV * 1e3;
    const m0c2_J = ELECTRON_MASS_kg * SPEED_OF_LIGHT_m_per_s * SPEED_OF_LIGHT_m_per_s;
    const p_kg_m_per_s = Math.sqrt(2 * ELECTRON_MASS_kg * eE_J * (1 + eE_J / (2 * m0c2_J)));
    return (PLANCK_J_s / p_kg_m_per_s) * 1e9;
}
/** Bragg angle in radians from sin(thetaB) = lambda g / 2 (lambda in nm, g = 1/d in nm^-1). */
export function braggAngle_rad(lambda_nm, g_per_nm) {
    const sinTheta = (lambda_nm * g_per_nm) / 2;
    if (!Number.isFinite(sinTheta) || sinTheta < 0 || sinTheta > 1) {
        throw new InputError(`no Bragg angle exists for wavelength ${lambda_nm} nm and |g| = ${g_per_nm} nm^-1 (lambda |g| / 2 must lie in 0..1); choose a lower-order reflection.`);
    }
    return Math.asin(sinTheta);
}
