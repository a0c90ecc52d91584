/**
 * How absorption is set, apart from the model that computes it (so that the
 * command line can name the setting without loading the model at start-up).
 */

/** Scenario / option spelling of the thermal-diffuse-scattering model (absorption.ts). */
export const THERMAL_DIFFUSE = 'thermal-diffuse';

/**
 * How absorption is set: a number r = xi_g / xi'_g in 0..1 (the constant ratio
 * U'_g = r U_g of Hirsch et al. 1965, common practice) or "thermal-diffuse" (the model).
 */
export type AbsorptionSetting = number | typeof THERMAL_DIFFUSE;
