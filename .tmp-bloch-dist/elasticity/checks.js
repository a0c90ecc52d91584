/** Input checks shared by the elasticity modules (errors a user can cause). */
import { InputError } from '../errors.js';
import { norm } from '../math/vec3.js';
export function finiteVec3(v, field) {
    if (!Array.isArray(v) || v.length !== 3 || !v.every((c) => Number.isFinite(c))) {
        throw new InputError(`${field} must be three finite numbers; give a vector like [1, 0, 0].`);
    }
    return [v[0], v[1], v[2]];
}
export function nonZeroVec3(v, field) {
    const w = finiteVec3(v, field);
    if (!(norm(w) > 0))
        throw new InputError(`${field} must not be the zero vector; give a direction.`);
    return w;
}
export function poisson(nu, field) {
    if (!Number.isFinite(nu) || nu <= -1 || nu > 0.5) {
        throw new InputError(`${field} must be a Poisson ratio in (-1, 0.5]; typical metals have 0.3 to 0.4.`);
    }
    return nu;
}
export function positive(v, field, hint) {
    if (!Number.isFinite(v) || v <= 0)
        throw new InputError(`${field} must be a positive finite number; ${hint}.`);
    return v;
}
