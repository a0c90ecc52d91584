/**
 * Test crystals built directly from their textbook site lists (not from the
 * material library). Positions: International Tables Vol. A standard settings
 * (fcc Fm-3m 4a; bcc Im-3m 2a; diamond Fd-3m 8a; zincblende F-43m 4a + 4c;
 * hcp P6_3/mmc 2c at 1/3,2/3,1/4 and 2/3,1/3,3/4; B2 Pm-3m 1a + 1b).
 */
import { makeLattice, type Lattice } from '../../src/crystal/lattice.js';
import type { Material, Site } from '../../src/crystal/material.js';
import type { Vec3 } from '../../src/math/vec3.js';

// The scattering code does not read elastic data; these placeholders only fill the record.
const NO_ELASTIC = {
  cij_GPa: { C11: 1, C12: 0, C44: 0.5 },
  shearModulus_GPa: 0.5,
  poissonRatio: 0,
  average: 'placeholder for scattering tests',
} as const;

const FCC: Vec3[] = [
  [0, 0, 0],
  [0, 0.5, 0.5],
  [0.5, 0, 0.5],
  [0.5, 0.5, 0],
];

function site(element: string, position: Vec3, B: number, occupancy = 1): Site {
  return { element, position, occupancy, debyeWaller_A2: B };
}

export function material(name: string, structure: string, lattice: Lattice, sites: Site[]): Material {
  return { name, description: `${name} (test crystal)`, structure, lattice, sites, elastic: NO_ELASTIC, sources: {} };
}

export function fcc(element: string, a_nm: number, B: number): Material {
  return material(element, 'fcc', makeLattice('cubic', { a: a_nm }), FCC.map((p) => site(element, p, B)));
}

export function bcc(element: string, a_nm: number, B: number): Material {
  return material(element, 'bcc', makeLattice('cubic', { a: a_nm }), [site(element, [0, 0, 0], B), site(element, [0.5, 0.5, 0.5], B)]);
}

export function diamond(element: string, a_nm: number, B: number): Material {
  const shifted = FCC.map((p): Vec3 => [p[0] + 0.25, p[1] + 0.25, p[2] + 0.25]);
  return material(element, 'diamond', makeLattice('cubic', { a: a_nm }), [...FCC, ...shifted].map((p) => site(element, p, B)));
}

export function zincblende(cation: string, anion: string, a_nm: number, Bc: number, Ba: number): Material {
  const shifted = FCC.map((p): Vec3 => [p[0] + 0.25, p[1] + 0.25, p[2] + 0.25]);
  return material(`${cation}${anion}`, 'zincblende', makeLattice('cubic', { a: a_nm }), [
    ...FCC.map((p) => site(cation, p, Bc)),
    ...shifted.map((p) => site(anion, p, Ba)),
  ]);
}

export function hcp(element: string, a_nm: number, c_nm: number, B: number): Material {
  return material(element, 'hcp', makeLattice('hexagonal', { a: a_nm, c: c_nm }), [
    site(element, [1 / 3, 2 / 3, 0.25], B),
    site(element, [2 / 3, 1 / 3, 0.75], B),
  ]);
}

export function b2(a: string, b: string, a_nm: number, Ba: number, Bb: number): Material {
  return material(`${a}${b}`, 'B2', makeLattice('cubic', { a: a_nm }), [site(a, [0, 0, 0], Ba), site(b, [0.5, 0.5, 0.5], Bb)]);
}
