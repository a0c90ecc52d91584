import { InputError } from '../errors.js';
/** Throws InputError naming the field when a parameter cannot be used. */
export function checkTwoBeamParams(p) {
    if (!(p.xi_nm > 0) || p.xi_nm === Infinity) {
        throw new InputError(`xi_nm must be a finite positive extinction distance in nm, got ${p.xi_nm}.`);
    }
    if (!(p.xiAbs_nm > 0)) {
        throw new InputError(`xiAbs_nm must be a positive absorption length in nm (Infinity for none), got ${p.xiAbs_nm}.`);
    }
    if (!(p.xiAbs0_nm > 0)) {
        throw new InputError(`xiAbs0_nm must be a positive absorption length in nm (Infinity for none), got ${p.xiAbs0_nm}.`);
    }
    if (!Number.isFinite(p.s_per_nm)) {
        throw new InputError(`s_per_nm must be a finite deviation parameter in nm^-1, got ${p.s_per_nm}.`);
    }
}
/** Throws InputError unless t is a finite thickness >= 0. */
export function checkThickness(t_nm) {
    if (!(t_nm >= 0) || t_nm === Infinity) {
        throw new InputError(`the column length t_nm must be a finite thickness >= 0 in nm, got ${t_nm}.`);
    }
}
