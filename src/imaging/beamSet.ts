/**
 * A general set of beams for the many-beam engine (physics.md section 4):
 * the incident wave vector is tilted from the condition's beam direction,
 * in the plane of the beam and g, until g has the requested deviation s;
 * every beam h then gets its exact excitation error
 *   s_h = -(2 k.h + h^2) / (2K)        (s > 0 inside the Ewald sphere),
 * and the structure matrix holds U_{h_i - h_j} and U'_{h_i - h_j} for every
 * pair (opticalPotential_per_nm2: the thermal-diffuse model's own value per
 * pair, or r U with a constant ratio). Normal absorption U'_0 = K / xi'_0 of
 * the imaging reflection (the model's U'_0, or xi'_0 = xi'_g with a ratio),
 * as in the two-beam engine.
 */
import type { Vec3 } from '../math/vec3.js';
import { dot, norm, scale, sub, unit } from '../math/vec3.js';
import { planeNormalToCartesian } from '../crystal/lattice.js';
import type { ManyBeamInput } from '../dynamics/manyBeamStructureMatrix.js';
import { normalAbsorption_per_nm2, opticalPotential_per_nm2 } from '../scattering/reflection.js';
import type { Scenario } from '../scenario/types.js';
import type { ResolvedCondition } from './resolveCondition.js';
import { InputError } from '../errors.js';

export interface GeneralBeamSet {
  readonly hkl: readonly Vec3[];
  readonly input: ManyBeamInput;
  /** Cartesian g_j (nm^-1), N x 3. */
  readonly beamVectors_per_nm: Float64Array;
  readonly incident: number;
  readonly darkField: number;
  /** Incident wave vector (nm^-1, Cartesian). */
  readonly k: Vec3;
}

/** The incident wave vector K (cos phi b + sin phi t) that puts g at deviation s (t: unit of g across the beam). */
export function incidentWaveVector(beamUnit: Vec3, g_cart: Vec3, s_per_nm: number, K: number): Vec3 {
  const A = dot(g_cart, beamUnit);
  const gPerp = sub(g_cart, scale(beamUnit, A));
  const B = norm(gPerp);
  const t = unit(gPerp);
  const R = Math.hypot(A, B);
  const C = -s_per_nm - dot(g_cart, g_cart) / (2 * K); // A cos phi + B sin phi = C
  if (Math.abs(C) > R) throw new InputError(`deviation s = ${s_per_nm} nm^-1 cannot be reached by tilting the beam: choose a smaller |s|`);
  const psi = Math.atan2(B, A);
  const d = Math.acos(C / R);
  const phi = [psi - d, psi + d].map((x) => Math.atan2(Math.sin(x), Math.cos(x))).reduce((a, b) => (Math.abs(a) < Math.abs(b) ? a : b));
  return [
    K * (Math.cos(phi) * beamUnit[0] + Math.sin(phi) * t[0]),
    K * (Math.cos(phi) * beamUnit[1] + Math.sin(phi) * t[1]),
    K * (Math.cos(phi) * beamUnit[2] + Math.sin(phi) * t[2]),
  ];
}

/** Exact excitation error of a beam h for the incident wave vector k. */
export function excitationError(k: Vec3, h_cart: Vec3): number {
  const K = norm(k);
  return -(2 * dot(k, h_cart) + dot(h_cart, h_cart)) / (2 * K);
}

export function generalBeamSet(sc: Scenario, c: ResolvedCondition, beams: readonly Vec3[]): GeneralBeamSet {
  const m = sc.material;
  const hkl: Vec3[] = [[0, 0, 0], ...beams];
  const n = hkl.length;
  const K = 1 / c.lambda_nm;
  const k = incidentWaveVector(c.frame.ez, c.g_cart, c.s_per_nm, K);
  const vectors = new Float64Array(3 * n);
  const s = new Float64Array(n);
  hkl.forEach((h, i) => {
    const hc = planeNormalToCartesian(m.lattice, h);
    vectors.set(hc, 3 * i);
    s[i] = i === 0 ? 0 : excitationError(k, hc);
  });
  const pRe = new Float64Array(n * n);
  const pIm = new Float64Array(n * n);
  const aRe = new Float64Array(n * n);
  const aIm = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      if (i === j) {
        aRe[i * n + j] = normalAbsorption_per_nm2(c.lambda_nm, c.xiAbs0_nm);
        continue;
      }
      const d: Vec3 = [hkl[i][0] - hkl[j][0], hkl[i][1] - hkl[j][1], hkl[i][2] - hkl[j][2]];
      const u = opticalPotential_per_nm2(m, d, sc.kV, sc.absorption);
      pRe[i * n + j] = u.re;
      pIm[i * n + j] = u.im;
      aRe[i * n + j] = u.absRe;
      aIm[i * n + j] = u.absIm;
    }
  }
  return {
    hkl,
    input: { excitationErrors_per_nm: s, potentialRe_per_nm2: pRe, potentialIm_per_nm2: pIm, absorptionRe_per_nm2: aRe, absorptionIm_per_nm2: aIm, waveNumber_per_nm: K },
    beamVectors_per_nm: vectors,
    incident: 0,
    darkField: 1,
    k,
  };
}
