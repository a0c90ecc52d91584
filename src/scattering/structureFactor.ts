/**
 * Electron structure factor of a unit cell (Angstrom):
 *
 *   F_g = sum_j occ_j fe_j(s) exp(-B_j s^2) exp(2 pi i g.r_j),   s = |g|/2 in A^-1,
 *
 * r_j the fractional site coordinates, g = (h, k, l), B_j = 8 pi^2 <u^2> the
 * site's Debye-Waller factor (A^2). |g| comes from the lattice (nm^-1) and is
 * converted to A^-1 (1 nm^-1 = 0.1 A^-1).
 *
 * Per material, the sites are packed once into typed arrays (cached in a
 * WeakMap keyed by the material object), so a call costs one exp per
 * distinct element, one exp and one sincos per site, and allocates nothing
 * in the `Into` form.
 */
import type { Material } from '../crystal/material.js';
import { reciprocalMetric } from '../crystal/lattice.js';
import type { Vec3 } from '../math/vec3.js';
import { InputError } from '../errors.js';
import { type ElectronCoefficients, electronCoefficients, electronFactorFromCoefficients } from './scatteringFactor.js';

export interface Complex {
  readonly re: number;
  readonly im: number;
}

/** The sites of a material packed into typed arrays (read-only for callers). */
export interface PackedCell {
  readonly n: number;
  readonly x: Float64Array;
  readonly y: Float64Array;
  readonly z: Float64Array;
  readonly occ: Float64Array;
  readonly B_A2: Float64Array;
  /** index of each site's element in `elements` */
  readonly kind: Int32Array;
  readonly elements: readonly ElectronCoefficients[];
  /** scratch: fe of each distinct element at the current s */
  readonly fe: Float64Array;
  /** reciprocal metric G*_ij in nm^-2: g11 g22 g33 g12 g13 g23 */
  readonly gm: Float64Array;
}

const cache = new WeakMap<Material, PackedCell>();
const TWO_PI = 2 * Math.PI;

function pack(material: Material): PackedCell {
  const sites = material.sites;
  if (sites.length === 0) {
    throw new InputError(`material "${material.name}" has no atom sites; give at least one site with element, position, occupancy and debyeWaller_A2.`);
  }
  const n = sites.length;
  const x = new Float64Array(n);
  const y = new Float64Array(n);
  const z = new Float64Array(n);
  const occ = new Float64Array(n);
  const B = new Float64Array(n);
  const kind = new Int32Array(n);
  const elements: ElectronCoefficients[] = [];
  const index = new Map<number, number>();
  sites.forEach((site, j) => {
    const where = `material "${material.name}" site ${j} (${site.element})`;
    const [px, py, pz] = site.position;
    if (!Number.isFinite(px) || !Number.isFinite(py) || !Number.isFinite(pz)) {
      throw new InputError(`${where} has a non-numeric position; give three fractional coordinates.`);
    }
    if (!Number.isFinite(site.occupancy) || site.occupancy < 0 || site.occupancy > 1) {
      throw new InputError(`${where} has occupancy ${site.occupancy}; give a value between 0 and 1.`);
    }
    if (!Number.isFinite(site.debyeWaller_A2) || site.debyeWaller_A2 < 0) {
      throw new InputError(`${where} has debyeWaller_A2 ${site.debyeWaller_A2}; give a value >= 0 in Angstrom^2.`);
    }
    const c = electronCoefficients(site.element);
    let k = index.get(c.Z);
    if (k === undefined) {
      k = elements.length;
      index.set(c.Z, k);
      elements.push(c);
    }
    x[j] = px;
    y[j] = py;
    z[j] = pz;
    occ[j] = site.occupancy;
    B[j] = site.debyeWaller_A2;
    kind[j] = k;
  });
  const G = reciprocalMetric(material.lattice);
  const gm = Float64Array.of(G[0][0], G[1][1], G[2][2], G[0][1], G[0][2], G[1][2]);
  return { n, x, y, z, occ, B_A2: B, kind, elements, fe: new Float64Array(elements.length), gm };
}

/** The packed sites of a material, built once and cached (InputError for bad sites). */
export function packed(material: Material): PackedCell {
  let p = cache.get(material);
  if (!p) {
    p = pack(material);
    cache.set(material, p);
  }
  return p;
}

/** Throws an InputError unless h, k, l are integers. */
export function checkMillerIndices(hkl: Vec3, field = 'g'): void {
  if (hkl.length !== 3 || !Number.isInteger(hkl[0]) || !Number.isInteger(hkl[1]) || !Number.isInteger(hkl[2])) {
    throw new InputError(`reflection ${field} = (${hkl.join(' ')}) must have three integer Miller indices (convert 4-index hkil to hkl first).`);
  }
}

/**
 * Writes into `out` (length >= 4):
 *   out[0] = Re F_g (A), out[1] = Im F_g (A),
 *   out[2] = sum_j occ_j |fe_j(s)| exp(-B_j s^2) (A), the scale a symmetry zero is judged against,
 *   out[3] = s = |g|/2 in A^-1.
 * h, k, l are taken as given (integers expected; not checked here, for speed).
 */
export function structureFactorInto(out: Float64Array, material: Material, h: number, k: number, l: number): Float64Array {
  const p = packed(material);
  const gm = p.gm;
  const g2_per_nm2 =
    h * h * gm[0]! + k * k * gm[1]! + l * l * gm[2]! + 2 * (h * k * gm[3]! + h * l * gm[4]! + k * l * gm[5]!);
  // s = |g|/2 with |g| in A^-1 = |g|_nm / 10, so s^2 = g^2_nm / 400
  const s2 = g2_per_nm2 / 400;
  const fe = p.fe;
  for (let e = 0; e < p.elements.length; e++) fe[e] = electronFactorFromCoefficients(p.elements[e]!, s2);
  let re = 0;
  let im = 0;
  let scale = 0;
  for (let j = 0; j < p.n; j++) {
    const f = p.occ[j]! * fe[p.kind[j]!]! * Math.exp(-p.B_A2[j]! * s2);
    const phase = TWO_PI * (h * p.x[j]! + k * p.y[j]! + l * p.z[j]!);
    re += f * Math.cos(phase);
    im += f * Math.sin(phase);
    scale += Math.abs(f);
  }
  out[0] = re;
  out[1] = im;
  out[2] = scale;
  out[3] = Math.sqrt(s2);
  return out;
}

const scratch = new Float64Array(4);

/** Electron structure factor F_g in Angstrom for integer Miller indices hkl (3-index). */
export function structureFactor_A(material: Material, hkl: Vec3): Complex {
  checkMillerIndices(hkl);
  structureFactorInto(scratch, material, hkl[0], hkl[1], hkl[2]);
  return { re: scratch[0]!, im: scratch[1]! };
}
