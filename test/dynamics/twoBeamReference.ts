/**
 * Shared helpers of the two-beam tests: the committed scipy fixture
 * (test/reference/twobeam-scipy.json, written by
 * `/usr/bin/python3 scripts/twobeam_reference.py`, scipy.integrate.solve_ivp
 * DOP853 rtol = atol = 1e-12) and the Lorentzian beta' profiles it uses.
 * Running the script itself goes through test/python.ts.
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import type { TwoBeamParams } from '../../src/dynamics/twoBeam.js';

export interface Lorentz {
  A: number;
  w: number;
  z0: number;
}

export interface ScipyCase {
  name: string;
  xi_nm: number;
  xiAbs_nm: number | 'Infinity';
  xiAbs0_nm: number | 'Infinity';
  s_per_nm: number;
  t_nm: number;
  lorentz?: Lorentz[];
  amplitudes?: [number, number, number, number];
}

const root = fileURLToPath(new URL('../../', import.meta.url));

export function loadScipyFixture(): ScipyCase[] {
  const text = readFileSync(`${root}test/reference/twobeam-scipy.json`, 'utf8');
  return (JSON.parse(text) as { cases: ScipyCase[] }).cases;
}

const num = (v: number | 'Infinity'): number => (v === 'Infinity' ? Infinity : v);

export function paramsOf(c: ScipyCase): TwoBeamParams {
  return { xi_nm: c.xi_nm, xiAbs_nm: num(c.xiAbs_nm), xiAbs0_nm: num(c.xiAbs0_nm), s_per_nm: c.s_per_nm };
}

/** beta'(z) = sum A / (1 + ((z - z0)/w)^2), as in the generator script. */
export function lorentzBeta(list: readonly Lorentz[]): (z: number) => number {
  return (z: number): number => {
    let v = 0;
    for (const l of list) {
      const u = (z - l.z0) / l.w;
      v += l.A / (1 + u * u);
    }
    return v;
  };
}

export const intensities = (a: ArrayLike<number>): [number, number] => [
  a[0] * a[0] + a[1] * a[1],
  a[2] * a[2] + a[3] * a[3],
];

export const maxAbsDiff = (a: ArrayLike<number>, b: ArrayLike<number>): number => {
  let m = 0;
  for (let i = 0; i < 4; i++) m = Math.max(m, Math.abs(a[i] - b[i]));
  return m;
};
