/**
 * Bloch waves of the many-beam engine (src/dynamics/blochWaves.ts,
 * blochWaveProfile.ts, manyBeamStructureMatrix.ts) against physics.md
 * sections 3 and 4, Hirsch, Howie, Nicholson, Pashley & Whelan (1965),
 * scipy.linalg.expm (fixture of scripts/ref_manybeam_columns.py) and the
 * two-beam engine (src/dynamics/twoBeam.ts).
 * All crystal numbers are invented test inputs (realistic magnitudes).
 */
import { describe, expect, it } from 'vitest';
import { amplitudesAt, blochAmplitudeDecayLength_nm, blochWaves } from '../../src/dynamics/blochWaves.js';
import { blochWaveProfile } from '../../src/dynamics/blochWaveProfile.js';
import { structureMatrix, type ManyBeamInput } from '../../src/dynamics/manyBeamStructureMatrix.js';
import { systematicRowInput, systematicRowOrders } from '../../src/dynamics/manyBeamSystematicRow.js';
import { pendelloesungIntensity, perfectCrystal } from '../../src/dynamics/twoBeam.js';
import { InternalError } from '../../src/errors.js';
import {
  G_200_PER_NM,
  LAMBDA_200KV_NM,
  inventedAbsorption,
  inventedPotential,
  maxAbsDiff,
  readFixture,
  toInput,
  totalIntensity,
  type FixtureInputs,
} from './manybeamFixtures.js';

const K = 1 / LAMBDA_200KV_NM;

/**
 * Two beams (0, g) in the many-beam form from the two-beam parameters of
 * physics.md section 3: U_g = K/xi_g, U'_g = K/xi'_g, U'_0 = K/xi'_0.
 */
function twoBeamInput(xi: number, xiAbs: number, xiAbs0: number, s: number): ManyBeamInput {
  const u = K / xi;
  const up = xiAbs === Infinity ? 0 : K / xiAbs;
  const up0 = xiAbs0 === Infinity ? 0 : K / xiAbs0;
  return {
    excitationErrors_per_nm: Float64Array.from([0, s]),
    potentialRe_per_nm2: Float64Array.from([0, u, u, 0]),
    potentialIm_per_nm2: new Float64Array(4),
    absorptionRe_per_nm2: Float64Array.from([up0, up, up, up0]),
    absorptionIm_per_nm2: new Float64Array(4),
    waveNumber_per_nm: K,
  };
}

/**
 * Two-beam slab matrix of physics.md section 3, applied to (1, 0):
 * exp(pi i M D) = e^{pi i s D}[cos(pi sigma D) I + i sin(pi sigma D)/sigma (M - s I)] e^{-pi D/xi'0},
 * M = [[0, q], [q, 2s]], q = 1/xi_g + i/xi'_g, sigma = sqrt(s^2 + q^2). Written out
 * here with plain complex arithmetic, independently of the engines.
 */
function twoBeamClosedForm(xi: number, xiAbs: number, xiAbs0: number, s: number, t: number): number[] {
  type C = [number, number];
  const mul = (a: C, b: C): C => [a[0] * b[0] - a[1] * b[1], a[0] * b[1] + a[1] * b[0]];
  const div = (a: C, b: C): C => {
    const d = b[0] * b[0] + b[1] * b[1];
    return [(a[0] * b[0] + a[1] * b[1]) / d, (a[1] * b[0] - a[0] * b[1]) / d];
  };
  const sqrtC = (a: C): C => {
    const r = Math.hypot(a[0], a[1]);
    const re = Math.sqrt((r + a[0]) / 2);
    const im = Math.sign(a[1] || 1) * Math.sqrt(Math.max(r - a[0], 0) / 2);
    return [re, im];
  };
  const cosC = (a: C): C => [Math.cos(a[0]) * Math.cosh(a[1]), -Math.sin(a[0]) * Math.sinh(a[1])];
  const sinC = (a: C): C => [Math.sin(a[0]) * Math.cosh(a[1]), Math.cos(a[0]) * Math.sinh(a[1])];
  const q: C = [1 / xi, xiAbs === Infinity ? 0 : 1 / xiAbs];
  const q2 = mul(q, q);
  const sigma = sqrtC([s * s + q2[0], q2[1]]);
  const arg: C = [Math.PI * sigma[0] * t, Math.PI * sigma[1] * t];
  const c = cosC(arg);
  const sn = div(sinC(arg), sigma);
  const damp = xiAbs0 === Infinity ? 1 : Math.exp(-Math.PI * t / xiAbs0);
  const ph: C = [damp * Math.cos(Math.PI * s * t), damp * Math.sin(Math.PI * s * t)];
  // phi0 = ph [cos + i sin/sigma (0 - s)], phig = ph [i sin/sigma q]
  const phi0 = mul(ph, [c[0] + s * sn[1], c[1] - s * sn[0]]);
  const isq = mul([-sn[1], sn[0]], q);
  const phig = mul(ph, isq);
  return [phi0[0], phi0[1], phig[0], phig[1]];
}

describe('structure matrix (physics.md section 4)', () => {
  it('two beams: A_0g = 1/(2 xi_g) + i/(2 xi\'_g), A_00 = i/(2 xi\'_0), A_gg = s + i/(2 xi\'_0)', () => {
    // physics.md section 3 vs 4: xi_g = 1/(lambda |U_g|) = K/|U_g|, so 2 pi i A_0g = pi i q
    const xi = 42;
    const xiA = 420;
    const xiA0 = 380;
    const s = 0.013;
    const re = new Float64Array(4);
    const im = new Float64Array(4);
    structureMatrix(re, im, twoBeamInput(xi, xiA, xiA0, s));
    expect(re[1]).toBeCloseTo(1 / (2 * xi), 15);
    expect(im[1]).toBeCloseTo(1 / (2 * xiA), 15);
    expect(re[2]).toBeCloseTo(1 / (2 * xi), 15);
    expect(re[0]).toBe(0);
    expect(im[0]).toBeCloseTo(1 / (2 * xiA0), 15);
    expect(re[3]).toBeCloseTo(s, 15);
    expect(im[3]).toBeCloseTo(1 / (2 * xiA0), 15);
    // so dphi0/dz = 2 pi i A_0g phig = pi i phig / xi_g (physics.md section 3, no absorption)
    expect(2 * Math.PI * re[1]).toBeCloseTo(Math.PI / xi, 14);
  });

  it('complex U and U\' enter as (U + i U\')/(2K) (physics.md section 4)', () => {
    const input: ManyBeamInput = {
      excitationErrors_per_nm: Float64Array.from([0, 0.02]),
      potentialRe_per_nm2: Float64Array.from([0, 3, 3, 0]),
      potentialIm_per_nm2: Float64Array.from([0, -1, 1, 0]),
      absorptionRe_per_nm2: Float64Array.from([0.5, 0.3, 0.3, 0.5]),
      absorptionIm_per_nm2: Float64Array.from([0, -0.2, 0.2, 0]),
      waveNumber_per_nm: 400,
    };
    const re = new Float64Array(4);
    const im = new Float64Array(4);
    structureMatrix(re, im, input);
    // (3 - i + i (0.3 - 0.2 i)) / 800 = (3.2 - 0.7 i)/800
    expect(re[1]).toBeCloseTo(3.2 / 800, 15);
    expect(im[1]).toBeCloseTo(-0.7 / 800, 15);
    // (3 + i + i (0.3 + 0.2 i)) / 800 = (2.8 + 1.3 i)/800
    expect(re[2]).toBeCloseTo(2.8 / 800, 15);
    expect(im[2]).toBeCloseTo(1.3 / 800, 15);
  });

  it('rejects tables of the wrong size with an InternalError naming the field', () => {
    const bad = { ...twoBeamInput(40, 400, 400, 0), potentialRe_per_nm2: new Float64Array(3) };
    expect(() => structureMatrix(new Float64Array(4), new Float64Array(4), bad)).toThrow(InternalError);
    expect(() => structureMatrix(new Float64Array(4), new Float64Array(4), bad)).toThrow(/potentialRe_per_nm2/);
  });
});

describe('two beams reproduce the two-beam closed form (physics.md section 3)', () => {
  const cases = [
    { xi: 30, xiA: 300, xiA0: 300, s: -0.03 },
    { xi: 42, xiA: 420, xiA0: 380, s: 0 },
    { xi: 55, xiA: 550, xiA0: 550, s: 0.021 },
    { xi: 55, xiA: Infinity, xiA0: Infinity, s: 0.011 },
  ];
  for (const c of cases) {
    it(`xi=${c.xi} xi'=${c.xiA} s=${c.s}: phi(t) to 1e-12`, () => {
      const waves = blochWaves(twoBeamInput(c.xi, c.xiA, c.xiA0, c.s), 0);
      const out = new Float64Array(4);
      for (const t of [0, 13.7, 100, 271]) {
        amplitudesAt(out, waves, t);
        // exact slab matrix of physics.md section 3 (written out in this test)
        expect(maxAbsDiff(out, twoBeamClosedForm(c.xi, c.xiA, c.xiA0, c.s, t))).toBeLessThan(1e-12);
      }
    });
  }

  it('agrees with the two-beam engine perfectCrystal (src/dynamics/twoBeam.ts) to 1e-12', () => {
    const p = { xi_nm: 37, xiAbs_nm: 370, xiAbs0_nm: 330, s_per_nm: -0.017 };
    const waves = blochWaves(twoBeamInput(p.xi_nm, p.xiAbs_nm, p.xiAbs0_nm, p.s_per_nm), 0);
    const a = new Float64Array(4);
    const b = new Float64Array(4);
    for (const t of [5, 60, 180]) {
      amplitudesAt(a, waves, t);
      perfectCrystal(b, p, t);
      expect(maxAbsDiff(a, b)).toBeLessThan(1e-12);
    }
  });

  it('no absorption: dark field equals the Pendelloesung formula (Hirsch et al. 1965)', () => {
    const xi = 48;
    const out = new Float64Array(4);
    for (const s of [0, 0.01, -0.025]) {
      const waves = blochWaves(twoBeamInput(xi, Infinity, Infinity, s), 0);
      for (const t of [10, 33, 120]) {
        amplitudesAt(out, waves, t);
        const sEff = Math.sqrt(s * s + 1 / (xi * xi));
        const ig = Math.sin(Math.PI * t * sEff) ** 2 / (xi * sEff) ** 2; // Hirsch et al. 1965
        expect(Math.abs(out[2] ** 2 + out[3] ** 2 - ig)).toBeLessThan(1e-12);
        // and the two-beam engine's implementation of the same formula
        expect(Math.abs(ig - pendelloesungIntensity({ xi_nm: xi, xiAbs_nm: Infinity, xiAbs0_nm: Infinity, s_per_nm: s }, t))).toBeLessThan(1e-14);
      }
    }
  });

  it('thickness fringes have period xi_eff = xi_g / sqrt(1 + w^2) (Hirsch et al. 1965)', () => {
    const xi = 50;
    for (const w of [0, 0.7, -1.5]) {
      const s = w / xi;
      const xiEff = xi / Math.sqrt(1 + w * w);
      // without absorption: locate the zeros of I_g(t) and measure their spacing
      const waves = blochWaves(twoBeamInput(xi, Infinity, Infinity, s), 0);
      const out = new Float64Array(4);
      const ig = (t: number): number => {
        amplitudesAt(out, waves, t);
        return out[2] ** 2 + out[3] ** 2;
      };
      const minima: number[] = [];
      const dt = xiEff / 400;
      for (let t = dt; t < 6 * xiEff; t += dt) {
        if (ig(t) < ig(t - dt) && ig(t) <= ig(t + dt)) {
          let a = t - dt;
          let b = t + dt;
          for (let k = 0; k < 100; k++) {
            const m1 = b - 0.618 * (b - a);
            const m2 = a + 0.618 * (b - a);
            if (ig(m1) < ig(m2)) b = m2;
            else a = m1;
          }
          minima.push(0.5 * (a + b));
        }
      }
      expect(minima.length).toBeGreaterThanOrEqual(5);
      for (let k = 1; k < minima.length; k++) {
        // fringe period xi_eff (Hirsch et al. 1965); golden-section search of a quadratic minimum
        // resolves it to ~sqrt(machine eps) relative, hence 1e-6
        expect(Math.abs(minima[k] - minima[k - 1] - xiEff)).toBeLessThan(1e-6 * xiEff);
      }
      // with absorption U' = 0.1 U the beat frequency of the two Bloch waves is Re sigma,
      // sigma = sqrt(s^2 + q^2), q = 1/xi_g + i/xi'_g (physics.md section 3)
      const wa = blochWaves(twoBeamInput(xi, 10 * xi, 10 * xi, s), 0);
      const qr = 1 / xi;
      const qi = 1 / (10 * xi);
      const a2r = s * s + qr * qr - qi * qi;
      const a2i = 2 * qr * qi;
      const sigRe = Math.sqrt((Math.hypot(a2r, a2i) + a2r) / 2);
      expect(Math.abs(wa.gammaRe_per_nm[0] - wa.gammaRe_per_nm[1] - sigRe)).toBeLessThan(1e-14);
      // which is 1/xi_eff up to second order in xi_g/xi'_g (here 0.5 %)
      expect(Math.abs(sigRe * xiEff - 1)).toBeLessThan(0.005);
    }
  });
});

describe('two-beam Bloch waves (physics.md section 3, Hirsch et al. 1965)', () => {
  it('no absorption: eigenvectors (sin(beta/2), cos(beta/2)) and (cos(beta/2), -sin(beta/2)), cot(beta) = w', () => {
    const xi = 40;
    for (const w of [0, 0.5, -1.2, 2]) {
      const waves = blochWaves(twoBeamInput(xi, Infinity, Infinity, w / xi), 0);
      const beta = Math.atan2(1, w); // cot(beta) = w, beta in (0, pi)
      const want = [
        [Math.sin(beta / 2), Math.cos(beta / 2)], // eigenvalue (s + sigma)/2, the larger
        [Math.cos(beta / 2), -Math.sin(beta / 2)],
      ];
      for (let j = 0; j < 2; j++) {
        // overlap |<want, C_j>| = 1 (both unit vectors, equal up to a phase)
        const pr = want[j][0] * waves.cRe[j] + want[j][1] * waves.cRe[2 + j];
        const pi = want[j][0] * waves.cIm[j] + want[j][1] * waves.cIm[2 + j];
        expect(Math.abs(1 - Math.hypot(pr, pi))).toBeLessThan(1e-13);
      }
      // eigenvalues (s +- sigma)/2 of A = M/2
      const sigma = Math.sqrt((w / xi) ** 2 + 1 / xi ** 2);
      expect(waves.gammaRe_per_nm[0]).toBeCloseTo((w / xi + sigma) / 2, 14);
      expect(waves.gammaRe_per_nm[1]).toBeCloseTo((w / xi - sigma) / 2, 14);
    }
  });

  it('s = 0, U_g > 0: the wave of larger Re gamma peaks on the planes and is absorbed more; the other peaks between them and is transmitted', () => {
    const waves = blochWaves(twoBeamInput(40, 400, 400, 0), 0);
    const samples = 64;
    const orders = Float64Array.from([0, 1]);
    const p0 = blochWaveProfile(new Float64Array(samples), waves, 0, orders);
    const p1 = blochWaveProfile(new Float64Array(samples), waves, 1, orders);
    const argmax = (p: Float64Array): number => p.indexOf(Math.max(...p));
    const argmin = (p: Float64Array): number => p.indexOf(Math.min(...p));
    expect(waves.gammaRe_per_nm[0]).toBeGreaterThan(waves.gammaRe_per_nm[1]);
    // physics.md section 3 (a fact of the trade): wave 1 peaks on the atomic planes x = 0 ...
    expect(argmax(p0)).toBe(0);
    expect(argmin(p0)).toBe(samples / 2);
    // ... wave 2 peaks between them, x = d/2
    expect(argmax(p1)).toBe(samples / 2);
    expect(argmin(p1)).toBe(0);
    // anomalous absorption: wave 1 absorbed more strongly, Im gamma = (1/xi'0 +- 1/xi'g)/2
    expect(waves.gammaIm_per_nm[0]).toBeGreaterThan(waves.gammaIm_per_nm[1]);
    expect(waves.gammaIm_per_nm[0]).toBeCloseTo((1 / 400 + 1 / 400) / 2, 12);
    expect(waves.gammaIm_per_nm[1]).toBeCloseTo(0, 12);
    expect(blochAmplitudeDecayLength_nm(waves, 0)).toBeCloseTo(1 / (2 * Math.PI * waves.gammaIm_per_nm[0]), 9);
    // at x = 0 the channelled wave has (sin - cos)^2 = 0 (sigma-sign structure of the eigenvectors)
    expect(p1[0]).toBeLessThan(1e-20);
    expect(p0[0]).toBeCloseTo(2, 12);
  });

  it('profile across the planes is sampled at x_k = k d / samples: the 2-beam wave 1 is 1 + cos(2 pi g x)', () => {
    const waves = blochWaves(twoBeamInput(40, Infinity, Infinity, 0), 0);
    const p = blochWaveProfile(new Float64Array(8), waves, 0, Float64Array.from([0, 1]));
    for (let k = 0; k < 8; k++) expect(p[k]).toBeCloseTo(1 + Math.cos((2 * Math.PI * k) / 8), 12);
  });
});

describe('many beams', () => {
  interface ColumnsFixture {
    cases: Array<{ name: string; incident: number; inputs: FixtureInputs; perfect: Array<{ t_nm: number; phi: number[] }> }>;
  }
  const fixture = readFixture<ColumnsFixture>('manybeam-columns.json');
  for (const c of fixture.cases) {
    it(`${c.name}: perfect-crystal amplitudes equal scipy.linalg.expm (scripts/ref_manybeam_columns.py) to 1e-10`, () => {
      const waves = blochWaves(toInput(c.inputs), c.incident);
      const out = new Float64Array(2 * waves.n);
      for (const p of c.perfect) {
        amplitudesAt(out, waves, p.t_nm);
        expect(maxAbsDiff(out, p.phi)).toBeLessThan(1e-10); // scipy.linalg.expm(2 pi i A t) phi(0)
      }
    });
  }

  it('without absorption sum |phi_g|^2 = 1 to 1e-10 for N = 3, 5, 7, 11 (unitarity, physics.md section 4)', () => {
    for (const half of [1, 2, 3, 5]) {
      const input = systematicRowInput({
        nMin: -half,
        nMax: half,
        s_g: 0.013,
        lambda_nm: LAMBDA_200KV_NM,
        g_per_nm: G_200_PER_NM,
        potential: inventedPotential(0.4), // complex U, U_{-g} = conj(U_g): a Hermitian A
        absorption: () => [0, 0],
      });
      const waves = blochWaves(input, half);
      const out = new Float64Array(2 * waves.n);
      for (const t of [7, 50, 333, 1000]) {
        amplitudesAt(out, waves, t);
        expect(Math.abs(totalIntensity(out) - 1)).toBeLessThan(1e-10);
      }
    }
  });

  it('with absorption the total intensity decreases with depth (U\' > 0, physics.md section 2)', () => {
    const input = systematicRowInput({
      nMin: -2,
      nMax: 2,
      s_g: 0,
      lambda_nm: LAMBDA_200KV_NM,
      g_per_nm: G_200_PER_NM,
      potential: inventedPotential(),
      absorption: inventedAbsorption(),
    });
    const waves = blochWaves(input, 2);
    const out = new Float64Array(10);
    let last = 1;
    for (const t of [10, 40, 90, 200]) {
      amplitudesAt(out, waves, t);
      const I = totalIntensity(out);
      expect(I).toBeLessThan(last);
      last = I;
    }
    for (let j = 0; j < waves.n; j++) expect(waves.gammaIm_per_nm[j]).toBeGreaterThan(0);
  });

  it('excitations alpha = C^-1 phi(0) rebuild phi(0) = C alpha', () => {
    const input = systematicRowInput({
      nMin: -3,
      nMax: 3,
      s_g: 0.02,
      lambda_nm: LAMBDA_200KV_NM,
      g_per_nm: G_200_PER_NM,
      potential: inventedPotential(0.3),
      absorption: inventedAbsorption(0.1, 0.15),
    });
    const waves = blochWaves(input, 3);
    const out = new Float64Array(14);
    amplitudesAt(out, waves, 0);
    const e = new Float64Array(14);
    e[6] = 1;
    expect(maxAbsDiff(out, e)).toBeLessThan(1e-13);
    expect(() => amplitudesAt(out, waves, -1)).toThrow(InternalError);
    expect(() => blochWaves(input, 7)).toThrow(InternalError);
    expect(() => blochWaveProfile(new Float64Array(4), waves, 0, systematicRowOrders(-1, 1))).toThrow(InternalError);
  });
});
