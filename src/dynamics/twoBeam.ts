/**
 * Two-beam Howie-Whelan column integration (physics.md section 3): public
 * entry points. Amplitude arrays are Float64Array [re phi0, im phi0, re phig,
 * im phig]; bright field |phi0|^2, dark field |phig|^2.
 *
 * Fault convention (derived in twoBeamColumn.ts): crossing a planar fault
 * at which g.R jumps by Delta going down the column (R_below - R_above),
 * alpha = 2 pi g.(R_below - R_above), multiplies phig by e^{+i alpha}; phi0
 * is unchanged.
 */

import { checkThickness, checkTwoBeamParams, type TwoBeamParams } from './twoBeamParams.js';
import { stepSlice } from './twoBeamKernel.js';

export type { TwoBeamParams } from './twoBeamParams.js';
export { checkTwoBeamParams } from './twoBeamParams.js';
export {
  integrateColumn,
  MIN_SLICE_NM,
  MAX_SLICES,
  DEFAULT_MAX_SLICE_NM,
  type ColumnStats,
} from './twoBeamColumn.js';

/**
 * Exit amplitudes of a perfect crystal of thickness t_nm (exact slab matrix),
 * written to out[0..3].
 */
export function perfectCrystal(out: Float64Array, p: TwoBeamParams, t_nm: number): void {
  checkTwoBeamParams(p);
  checkThickness(t_nm);
  out[0] = 1;
  out[1] = 0;
  out[2] = 0;
  out[3] = 0;
  stepSlice(out, 0, 1 / p.xi_nm, 1 / p.xiAbs_nm, p.s_per_nm, 0, t_nm, 1 / p.xiAbs0_nm);
}

/**
 * Dark-field intensity of a perfect crystal without absorption, the
 * Pendelloesung formula (Hirsch et al. 1965):
 *   I_g = sin^2(pi t s_eff) / (xi_g s_eff)^2,  s_eff = sqrt(s^2 + 1/xi_g^2).
 * The absorption lengths in p are ignored. Bright field is 1 - I_g.
 */
export function pendelloesungIntensity(p: TwoBeamParams, t_nm: number): number {
  checkTwoBeamParams(p);
  checkThickness(t_nm);
  const sEff = Math.sqrt(p.s_per_nm * p.s_per_nm + 1 / (p.xi_nm * p.xi_nm));
  const sn = Math.sin(Math.PI * t_nm * sEff);
  const x = p.xi_nm * sEff;
  return (sn * sn) / (x * x);
}

/**
 * Multiplies state[0..3] in place by the exact matrix of a slab of length
 * D_nm with constant effective deviation sEff = s + beta' (nm^-1); p supplies
 * xi_g, xi'_g and xi'_0 (p.s_per_nm is not used). No checks: hot-loop use.
 */
export function applySlab(state: Float64Array, p: TwoBeamParams, sEff: number, D_nm: number): void {
  stepSlice(state, 0, 1 / p.xi_nm, 1 / p.xiAbs_nm, sEff, 0, D_nm, 1 / p.xiAbs0_nm);
}

export { applyFaultPhase } from './twoBeamKernel.js';
