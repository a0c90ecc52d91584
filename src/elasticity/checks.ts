/** Input checks shared by the elasticity modules (errors a user can cause). */
import { InputError } from '../errors.js';
import { type Vec3, norm } from '../math/vec3.js';

export function finiteVec3(v: Vec3, field: string): Vec3 {
  if (!Array.isArray(v) || v.length !== 3 || !v.every((c) => Number.isFinite(c))) {
    throw new InputError(`${field} must be three finite numbers; give a vector like [1, 0, 0].`);
  }
  return [v[0], v[1], v[2]];
}

export function nonZeroVec3(v: Vec3, field: string): Vec3 {
  const w = finiteVec3(v, field);
  if (!(norm(w) > 0)) throw new InputError(`${field} must not be the zero vector; give a direction.`);
  return w;
}

export function poisson(nu: number, field: string): number {
  if (!Number.isFinite(nu) || nu <= -1 || nu > 0.5) {
    throw new InputError(`${field} must be a Poisson ratio in (-1, 0.5]; typical metals have 0.3 to 0.4.`);
  }
  return nu;
}

/** The core radius of a dislocation line or loop: the given one (positive, finite) or |b|. */
export function coreRadius(rc: number | undefined, bLen: number, field: string): number {
  const r = rc ?? bLen;
  if (!Number.isFinite(r) || r <= 0) throw new InputError(`${field} must be a positive finite length in nm; omit it to use |b|.`);
  return r;
}

export function positive(v: number, field: string, hint: string): number {
  if (!Number.isFinite(v) || v <= 0) throw new InputError(`${field} must be a positive finite number; ${hint}.`);
  return v;
}
