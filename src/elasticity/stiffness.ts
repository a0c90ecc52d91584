/**
 * The elastic stiffness of a crystal: the 6 x 6 Voigt matrix (GPa) from the
 * named constants Cij of its symmetry class, and the full fourth-rank tensor
 * C_ijkl in the crystal Cartesian frame (International Tables setting: x
 * along a1, z along c for hexagonal, tetragonal and orthorhombic cells, which
 * is also the setting in which Cij are tabulated, e.g. Simmons & Wang 1971).
 *
 * Voigt pairs: 1 = 11, 2 = 22, 3 = 33, 4 = 23, 5 = 13, 6 = 12 (Nye 1957).
 */
import { InputError } from '../errors.js';
import { isPositiveDefinite } from '../crystal/elasticAverage.js';

export type StiffnessSymmetry = 'cubic' | 'hexagonal' | 'tetragonal' | 'orthorhombic' | 'triclinic';

/** The independent constants of each class (Nye 1957, Physical Properties of Crystals, ch. VIII). */
export const STIFFNESS_KEYS: Readonly<Record<StiffnessSymmetry, readonly string[]>> = {
  cubic: ['C11', 'C12', 'C44'],
  hexagonal: ['C11', 'C12', 'C13', 'C33', 'C44'],
  tetragonal: ['C11', 'C12', 'C13', 'C33', 'C44', 'C66'],
  orthorhombic: ['C11', 'C22', 'C33', 'C12', 'C13', 'C23', 'C44', 'C55', 'C66'],
  triclinic: (() => {
    const k: string[] = [];
    for (let i = 1; i <= 6; i++) for (let j = i; j <= 6; j++) k.push(`C${i}${j}`);
    return k;
  })(),
};

/**
 * The 6 x 6 Voigt stiffness (GPa, row-major, 36 numbers) of a crystal from its
 * named constants. Constants a class does not need are ignored; a missing one
 * or a matrix that is not positive definite is an InputError naming `field`.
 */
export function voigtStiffness(c: Readonly<Record<string, number | undefined>>, symmetry: StiffnessSymmetry, field = 'elastic constants'): number[] {
  const get = (k: string): number => {
    const v = c[k];
    if (typeof v !== 'number' || !Number.isFinite(v)) {
      throw new InputError(`${field}.${k} is missing; a ${symmetry} crystal needs ${STIFFNESS_KEYS[symmetry].join(', ')} in GPa.`);
    }
    return v;
  };
  const m = new Array<number>(36).fill(0);
  const set = (i: number, j: number, v: number): void => {
    m[(i - 1) * 6 + (j - 1)] = v;
    m[(j - 1) * 6 + (i - 1)] = v;
  };
  switch (symmetry) {
    case 'cubic': {
      const [c11, c12, c44] = [get('C11'), get('C12'), get('C44')];
      for (let i = 1; i <= 3; i++) {
        for (let j = i; j <= 3; j++) set(i, j, i === j ? c11 : c12);
        set(i + 3, i + 3, c44);
      }
      break;
    }
    case 'hexagonal':
    case 'tetragonal': {
      const c11 = get('C11');
      const c12 = get('C12');
      set(1, 1, c11);
      set(2, 2, c11);
      set(1, 2, c12);
      set(1, 3, get('C13'));
      set(2, 3, get('C13'));
      set(3, 3, get('C33'));
      set(4, 4, get('C44'));
      set(5, 5, get('C44'));
      // hexagonal crystals are transversely isotropic: C66 = (C11 - C12)/2 (Nye 1957)
      set(6, 6, symmetry === 'hexagonal' ? (c11 - c12) / 2 : get('C66'));
      break;
    }
    case 'orthorhombic':
      for (const k of STIFFNESS_KEYS.orthorhombic) set(Number(k[1]), Number(k[2]), get(k));
      break;
    case 'triclinic':
      for (const k of STIFFNESS_KEYS.triclinic) set(Number(k[1]), Number(k[2]), get(k));
      break;
  }
  checkVoigt(m, field);
  return m;
}

/** Throws an InputError unless m is a finite, symmetric, positive-definite 6 x 6 matrix (36 numbers, GPa). */
export function checkVoigt(m: readonly number[], field: string): void {
  if (!Array.isArray(m) || m.length !== 36 || !m.every((x) => Number.isFinite(x))) {
    throw new InputError(`${field} must be a 6 x 6 Voigt stiffness matrix of 36 finite numbers in GPa.`);
  }
  const rows: number[][] = [];
  for (let i = 0; i < 6; i++) {
    rows.push(m.slice(6 * i, 6 * i + 6));
    for (let j = 0; j < i; j++) {
      if (Math.abs(m[6 * i + j] - m[6 * j + i]) > 1e-9 * (Math.abs(m[6 * i + j]) + Math.abs(m[6 * j + i]) + 1e-300)) {
        throw new InputError(`${field} must be symmetric (C${j + 1}${i + 1} = C${i + 1}${j + 1}); check the constants.`);
      }
    }
  }
  if (!isPositiveDefinite(rows)) {
    throw new InputError(`${field} is not mechanically stable (the stiffness matrix must be positive definite); check values and units (GPa).`);
  }
}

const VOIGT = [
  [0, 5, 4],
  [5, 1, 3],
  [4, 3, 2],
];

/** The tensor C_ijkl (81 numbers, index ((i*3 + j)*3 + k)*3 + l) from a Voigt matrix. */
export function stiffnessTensor(voigt: readonly number[]): Float64Array {
  const C = new Float64Array(81);
  for (let i = 0; i < 3; i++)
    for (let j = 0; j < 3; j++)
      for (let k = 0; k < 3; k++) for (let l = 0; l < 3; l++) C[((i * 3 + j) * 3 + k) * 3 + l] = voigt[VOIGT[i][j] * 6 + VOIGT[k][l]];
  return C;
}

/** Voigt matrix of an isotropic solid with shear modulus G and Poisson ratio nu (lambda = 2 G nu / (1 - 2 nu)). */
export function isotropicVoigt(G: number, nu: number): number[] {
  const lambda = (2 * G * nu) / (1 - 2 * nu);
  return voigtStiffness({ C11: lambda + 2 * G, C12: lambda, C44: G }, 'cubic');
}

/** The Voigt stiffness (GPa) of a material from its Cij (cubic or hexagonal lattice; the x3 axis along c). */
export function materialStiffness(m: { readonly name: string; readonly lattice: { readonly system: string }; readonly elastic: { readonly cij_GPa: object } }): number[] {
  const sym = m.lattice.system;
  if (sym !== 'cubic' && sym !== 'hexagonal' && sym !== 'tetragonal' && sym !== 'orthorhombic') {
    throw new InputError(`material ${m.name}: no stiffness matrix for a ${sym} lattice; use "elasticity": "isotropic".`);
  }
  return voigtStiffness(m.elastic.cij_GPa as Record<string, number>, sym, `material ${m.name} elastic.cij_GPa`);
}
