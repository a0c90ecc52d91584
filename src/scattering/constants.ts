/**
 * Physical constants, CODATA 2018 (Tiesinga et al. 2021, Rev. Mod. Phys. 93,
 * 025010; NIST reference on constants). h, c and e are exact in the 2019 SI;
 * m_e is the recommended value (relative standard uncertainty 3.0e-10).
 */

/** Planck constant h in J s (exact). */
export const PLANCK_J_s = 6.62607015e-34;
/** Speed of light in vacuum c in m/s (exact). */
export const SPEED_OF_LIGHT_m_per_s = 299792458;
/** Elementary charge e in C (exact). */
export const ELEMENTARY_CHARGE_C = 1.602176634e-19;
/** Electron rest mass m_e in kg (recommended value). */
export const ELECTRON_MASS_kg = 9.1093837015e-31;
