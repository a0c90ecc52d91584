import { InternalError } from '../errors.js';

/**
 * Reflection parameters of one two-beam condition (physics.md section 3).
 * Lengths in nm, s in nm^-1. An absorption length of Infinity means no
 * absorption of that kind.
 */
export interface TwoBeamParams {
  /** extinction distance xi_g (nm), finite and > 0 */
  xi_nm: number;
  /** absorption length xi'_g of the coupling (nm), > 0, Infinity = none */
  xiAbs_nm: number;
  /** normal absorption length xi'_0 (nm), > 0, Infinity = none */
  xiAbs0_nm: number;
  /** deviation parameter s (nm^-1), > 0 when g lies inside the Ewald sphere */
  s_per_nm: number;
}

/** Throws InternalError naming the field when a parameter cannot be used. */
export function checkTwoBeamParams(p: TwoBeamParams): void {
  if (!(p.xi_nm > 0) || p.xi_nm === Infinity) {
    throw new InternalError(`xi_nm must be a finite positive extinction distance in nm, got ${p.xi_nm}.`);
  }
  if (!(p.xiAbs_nm > 0)) {
    throw new InternalError(`xiAbs_nm must be a positive absorption length in nm (Infinity for none), got ${p.xiAbs_nm}.`);
  }
  if (!(p.xiAbs0_nm > 0)) {
    throw new InternalError(`xiAbs0_nm must be a positive absorption length in nm (Infinity for none), got ${p.xiAbs0_nm}.`);
  }
  if (!Number.isFinite(p.s_per_nm)) {
    throw new InternalError(`s_per_nm must be a finite deviation parameter in nm^-1, got ${p.s_per_nm}.`);
  }
}

/** Throws InternalError unless t is a finite thickness >= 0. */
export function checkThickness(t_nm: number): void {
  if (!(t_nm >= 0) || t_nm === Infinity) {
    throw new InternalError(`the column length t_nm must be a finite thickness >= 0 in nm, got ${t_nm}.`);
  }
}
