/**
 * Dissociation of a perfect a/2<110> dislocation on a {111} plane of an fcc
 * crystal into two Shockley partials a/6<112> bounding an intrinsic stacking
 * fault, and the isotropic equilibrium width of the ribbon (Hirth & Lothe
 * 1982, Theory of Dislocations, ch. 10).
 *
 * Which partial goes where (derived here from first principles, and checked
 * atom by atom in test/elasticity/dissociation.test.ts):
 * 1. Stacking. Along the plane normal n the close-packed layers follow
 *    ...ABCABC... The in-plane projections of the nearest-neighbour vectors
 *    that climb one layer along +n form a set T of three a/6<112> vectors
 *    (for n = (111): a/6[11-2], a/6[1-21], a/6[-211]). Shifting the crystal on
 *    the +n side of a plane by t in T turns ABC|ABC into ABC|BCA, the intrinsic
 *    fault; shifting it by -t gives ABC|CAB (C on C), which is not a
 *    close-packed stacking. The two partials of b = a/2<110> are b/2 +- w
 *    (w in the plane, perpendicular to b, |w| = |b|/(2 sqrt 3)); exactly one of
 *    them lies in T, the other in -T.
 * 2. Sign of the jump. With the FS/RH convention of straightDislocation.ts, a
 *    dislocation (b_p, u) whose cut runs along c satisfies
 *    R(-m side) - R(+m side) = b_p, m = u x c. For a cut in the glide plane
 *    along c = u x n one has m = -n: the crystal on the +n side is shifted by
 *    +b_p relative to the -n side on that half-plane.
 * 3. Hence for partial 1 at the -(u x n) edge of the ribbon and partial 2 at
 *    the +(u x n) edge, the fault between them is the half-plane of partial 1
 *    running along u x n, with fault vector +b1 (mod lattice translations;
 *    the same as -b2, since b1 + b2 = b). The fault is intrinsic iff b1 is in T.
 *    So: b1 = the partial in T, and the ribbon runs from partial 1 to
 *    partial 2 along u x n. Reversing n swaps T and -T and reverses u x n,
 *    so the physical arrangement does not depend on the sign of n.
 */
import { type Vec3, add, cross, dot, norm, scale, sub } from '../math/vec3.js';
import { InputError } from '../errors.js';
import { type Lattice, directionToCartesian, planeNormalToCartesian } from '../crystal/lattice.js';
import { nonZeroVec3, poisson, positive } from './checks.js';
import { energyFactorMatrix } from './anisotropicDislocation.js';

export interface ShockleySplitOptions {
  /** Conventional cubic cell of the fcc crystal. */
  readonly lattice: Lattice;
  /** Perfect Burgers vector in lattice units, a/2<110>, e.g. [0.5, -0.5, 0]. */
  readonly b: Vec3;
  /** Miller indices of the {111} glide plane containing b, e.g. [1, 1, 1]. */
  readonly planeNormal: Vec3;
  /** Line direction u in the crystal's Cartesian frame (any length), lying in the glide plane. */
  readonly lineCartesian: Vec3;
}

export interface ShockleyPair {
  /** Partial 1 and 2, lattice units (multiples of 1/6); b1 + b2 = b. */
  readonly b1: Vec3;
  readonly b2: Vec3;
  /** The same, Cartesian nm. */
  readonly b1_nm: Vec3;
  readonly b2_nm: Vec3;
  /** Unit Cartesian line direction u. */
  readonly line: Vec3;
  /** Unit Cartesian glide-plane normal n (sign as given). */
  readonly planeNormal: Vec3;
  /** Unit Cartesian vector u x n: in the plane, from partial 1 to partial 2. */
  readonly ribbonDirection: Vec3;
  /**
   * Shift of the crystal on the +n side relative to the -n side inside the
   * ribbon (lattice units; equal to b1 modulo lattice translations): an
   * intrinsic-fault vector a/6<112>.
   */
  readonly faultVector: Vec3;
}

const sixths = (v: Vec3): Vec3 => [Math.round(6 * v[0]) / 6, Math.round(6 * v[1]) / 6, Math.round(6 * v[2]) / 6];

/** True when v (lattice units of the conventional cell) is a translation of the fcc lattice. */
export function isFccTranslation(v: Vec3, tol = 1e-9): boolean {
  const h = [2 * v[0], 2 * v[1], 2 * v[2]];
  const r = h.map(Math.round);
  if (h.some((x, i) => Math.abs(x - r[i]) > tol)) return false;
  return (((r[0] + r[1] + r[2]) % 2) + 2) % 2 === 0;
}

export function shockleySplit(opts: ShockleySplitOptions): ShockleyPair {
  const l = opts.lattice;
  if (l.system !== 'cubic') {
    throw new InputError('Shockley dissociation needs the cubic cell of an fcc crystal; use a cubic lattice.');
  }
  const b = nonZeroVec3(opts.b, 'dissociation b');
  const n0 = nonZeroVec3(opts.planeNormal, 'dissociation planeNormal');
  const u0 = nonZeroVec3(opts.lineCartesian, 'dissociation lineCartesian');

  // b must be a/2<110>: two components +-1/2, one zero
  const ab = b.map((x) => Math.abs(x)).sort((p, q) => p - q);
  if (Math.abs(ab[0]) > 1e-9 || Math.abs(ab[1] - 0.5) > 1e-9 || Math.abs(ab[2] - 0.5) > 1e-9) {
    throw new InputError('dissociation b must be a perfect fcc Burgers vector a/2<110>, e.g. [0.5, -0.5, 0].');
  }
  // n must be a {111} normal: all components of equal magnitude
  const s = Math.abs(n0[0]);
  if (!(s > 0) || Math.abs(Math.abs(n0[1]) - s) > 1e-9 * s || Math.abs(Math.abs(n0[2]) - s) > 1e-9 * s) {
    throw new InputError('dissociation planeNormal must be a {111} plane, e.g. [1, 1, 1] or [1, -1, 1].');
  }
  const n: Vec3 = [Math.sign(n0[0]), Math.sign(n0[1]), Math.sign(n0[2])]; // (+-1, +-1, +-1)
  if (Math.abs(dot(n, b)) > 1e-9) {
    throw new InputError('dissociation b must lie in the glide plane (b . n = 0); choose a plane containing b.');
  }

  // the two candidates b/2 +- (n x b)/6 (|n| = sqrt 3, |b| = 1/sqrt 2 in units of a; |w| = |b|/(2 sqrt 3))
  const w = scale(cross(n, b), 1 / 6);
  const p = sixths(add(scale(b, 0.5), w));
  const m = sixths(sub(scale(b, 0.5), w));
  // T: t + n/3 is a lattice translation (t = projection of a nearest-neighbour vector climbing one layer along +n)
  const inT = (t: Vec3): boolean => isFccTranslation(add(t, scale(n, 1 / 3)));
  const pIn = inT(p);
  if (pIn === inT(m)) throw new Error('internal: exactly one Shockley partial must climb along +n');
  const b1 = pIn ? p : m;
  const b2 = pIn ? m : p;

  const nC = planeNormalToCartesian(l, n);
  const nHat = scale(nC, 1 / norm(nC));
  const uHat = scale(u0, 1 / norm(u0));
  if (Math.abs(dot(uHat, nHat)) > 1e-6) {
    throw new InputError('dissociation lineCartesian must lie in the glide plane (u . n = 0); project it onto the plane.');
  }
  const r = cross(uHat, nHat);
  return {
    b1,
    b2,
    b1_nm: directionToCartesian(l, b1),
    b2_nm: directionToCartesian(l, b2),
    line: uHat,
    planeNormal: nHat,
    ribbonDirection: scale(r, 1 / norm(r)),
    faultVector: b1,
  };
}

/**
 * Equilibrium separation (nm) of two parallel partials b1, b2 (Cartesian nm)
 * with common line direction u, isotropic elasticity (Hirth & Lothe 1982,
 * ch. 10): the repulsion per unit length
 *   F = (G / (2 pi d)) [ (b1.u)(b2.u) + ((b1 x u).(b2 x u)) / (1 - nu) ]
 * balances the fault energy gamma, so
 *   d = (G / (2 pi gamma)) [ (b1.u)(b2.u) + ((b1 x u).(b2 x u)) / (1 - nu) ].
 * Units: G in GPa, gamma in mJ/m^2, b in nm: G b^2 / gamma = 1e3 nm per GPa nm^2 m^2/mJ.
 */
export function ribbonWidth_nm(
  b1_nm: Vec3,
  b2_nm: Vec3,
  u: Vec3,
  shearModulus_GPa: number,
  poissonRatio: number,
  sfe_mJ_per_m2: number,
): number {
  const G = positive(shearModulus_GPa, 'shearModulus_GPa', 'give the isotropic shear modulus in GPa');
  const nu = poisson(poissonRatio, 'poissonRatio');
  const gamma = positive(sfe_mJ_per_m2, 'stackingFaultEnergy_mJ_per_m2', 'give the intrinsic stacking-fault energy in mJ/m^2');
  const b1 = nonZeroVec3(b1_nm, 'partial b1_nm');
  const b2 = nonZeroVec3(b2_nm, 'partial b2_nm');
  const uu = nonZeroVec3(u, 'line direction');
  const e = scale(uu, 1 / norm(uu));
  const bracket = dot(b1, e) * dot(b2, e) + dot(cross(b1, e), cross(b2, e)) / (1 - nu);
  if (!(bracket > 0)) {
    throw new InputError('these partials attract each other, so no ribbon of finite width is in equilibrium; check b1, b2 and the line direction.');
  }
  return (1e3 * G * bracket) / (2 * Math.PI * gamma);
}

/**
 * Points on the two partials of a ribbon of the given width centred on
 * `centre_nm`: partial 1 at -width/2, partial 2 at +width/2 along the ribbon
 * direction (u x n), so that the fault lies between them.
 */
export function ribbonPartialPoints(pair: ShockleyPair, centre_nm: Vec3, width_nm: number): [Vec3, Vec3] {
  return [add(centre_nm, scale(pair.ribbonDirection, -width_nm / 2)), add(centre_nm, scale(pair.ribbonDirection, width_nm / 2))];
}

/**
 * Equilibrium separation (nm) of two parallel partials in an anisotropic
 * crystal (Hirth & Lothe 1982, ch. 13): the interaction energy per unit length
 * of two parallel straight dislocations is -(b1.K.b2 / 2 pi) ln r + a function
 * of the angle only, so the force along the line joining them (here the glide
 * direction in the common plane) is b1.K.b2 / (2 pi d), K the energy-factor
 * matrix of the line direction (anisotropicDislocation.ts). Balanced by the
 * fault energy gamma: d = b1.K.b2 / (2 pi gamma). In the isotropic limit
 * K = G (u u) + G/(1-nu) (I - u u), which is `ribbonWidth_nm`.
 */
export function anisotropicRibbonWidth_nm(b1_nm: Vec3, b2_nm: Vec3, u: Vec3, stiffness_GPa: readonly number[], sfe_mJ_per_m2: number): number {
  const gamma = positive(sfe_mJ_per_m2, 'stackingFaultEnergy_mJ_per_m2', 'give the intrinsic stacking-fault energy in mJ/m^2');
  const b1 = nonZeroVec3(b1_nm, 'partial b1_nm');
  const b2 = nonZeroVec3(b2_nm, 'partial b2_nm');
  const K = energyFactorMatrix(stiffness_GPa, nonZeroVec3(u, 'line direction'));
  let s = 0;
  for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) s += b1[i] * K[i * 3 + j] * b2[j];
  if (!(s > 0)) {
    throw new InputError('these partials attract each other, so no ribbon of finite width is in equilibrium; check b1, b2 and the line direction.');
  }
  return (1e3 * s) / (2 * Math.PI * gamma);
}
