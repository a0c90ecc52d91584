/**
 * Systematic-row helpers (src/dynamics/manyBeamSystematicRow.ts) against
 * physics.md sections 3 and 4: the excitation error from the incident wave
 * vector, s_g = -(2 k.g + g^2)/(2k), and the weak-beam condition of
 * Cockayne, Ray & Whelan (1969) / Williams & Carter.
 */
import { describe, expect, it } from 'vitest';
import {
  systematicRowExcitationErrors,
  systematicRowInput,
  systematicRowOrders,
  weakBeamDeviation,
} from '../../src/dynamics/manyBeamSystematicRow.js';
import { InternalError } from '../../src/errors.js';
import { G_200_PER_NM, LAMBDA_200KV_NM, inventedAbsorption, inventedPotential } from './manybeamFixtures.js';

describe('systematic row excitation errors', () => {
  it('equal s_ng = -(2 k.(n g) + n^2 g^2)/(2k) for an incident k tilted in the plane of the row (physics.md section 3)', () => {
    const lambda = LAMBDA_200KV_NM;
    const k = 1 / lambda;
    const g = G_200_PER_NM;
    for (const kx of [-0.5 * g, -1.5 * g, 0.3 * g, -2.2 * g]) {
      // k = (kx, 0, kz) with |k| = 1/lambda; g_n = (n g, 0, 0)
      const sOf = (n: number): number => -(2 * kx * n * g + n * n * g * g) / (2 * k);
      const s = systematicRowExcitationErrors(-3, 4, sOf(1), lambda, g);
      for (let n = -3; n <= 4; n++) {
        // physics.md sections 3 and 4 (the definition of s with |k| = 1/lambda)
        expect(s[n + 3]).toBeCloseTo(sOf(n), 13);
      }
    }
  });

  it('s_0 = 0 and s_1 = s_g (definition)', () => {
    const s = systematicRowExcitationErrors(-2, 2, 0.037, LAMBDA_200KV_NM, G_200_PER_NM);
    expect(s[2]).toBe(0);
    expect(s[3]).toBeCloseTo(0.037, 15);
  });

  it('weak-beam deviation (n-1) lambda g^2/2 puts the Ewald sphere through n g: s_ng = 0 (Cockayne, Ray & Whelan 1969; Williams & Carter)', () => {
    const lambda = LAMBDA_200KV_NM;
    const g = G_200_PER_NM;
    for (const n of [2, 3, 4, -1]) {
      const sg = weakBeamDeviation(n, lambda, g);
      expect(sg).toBeCloseTo(((n - 1) * lambda * g * g) / 2, 15);
      const s = systematicRowExcitationErrors(-2, 4, sg, lambda, g);
      expect(Math.abs(s[n + 2])).toBeLessThan(1e-15);
    }
    // g(3g) at 200 kV for |g| = 5.53 nm^-1 (invented fundamental): s_g = lambda g^2 = 0.0767 nm^-1,
    // i.e. w = s xi_g of about 3.8 for xi_g = 50 nm: well outside the strong-beam range (common practice, w > ~3..5)
    expect(weakBeamDeviation(3, lambda, g)).toBeCloseTo(lambda * g * g, 15);
    expect(weakBeamDeviation(3, lambda, g)).toBeCloseTo(0.07669, 4);
  });

  it('systematicRowInput fills U_{(n_i - n_j) g} and U\'_{(n_i - n_j) g}, with U\'_0 on the diagonal', () => {
    const input = systematicRowInput({
      nMin: -1,
      nMax: 2,
      s_g: 0.01,
      lambda_nm: LAMBDA_200KV_NM,
      g_per_nm: G_200_PER_NM,
      potential: inventedPotential(0.3),
      absorption: inventedAbsorption(0.1, 0.2),
    });
    const n = 4;
    const u = inventedPotential(0.3);
    const up = inventedAbsorption(0.1, 0.2);
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        const m = i - j;
        expect(input.potentialRe_per_nm2[i * n + j]).toBe(m === 0 ? 0 : u(m)[0]);
        expect(input.potentialIm_per_nm2[i * n + j]).toBe(m === 0 ? 0 : u(m)[1]);
        expect(input.absorptionRe_per_nm2[i * n + j]).toBe(up(m)[0]);
        expect(input.absorptionIm_per_nm2[i * n + j]).toBe(up(m)[1]);
      }
    }
    expect(input.waveNumber_per_nm).toBeCloseTo(1 / LAMBDA_200KV_NM, 12);
    expect(Array.from(systematicRowOrders(-1, 2))).toEqual([-1, 0, 1, 2]);
  });

  it('rejects rows without the transmitted beam, and bad lambda or g, with an InternalError', () => {
    expect(() => systematicRowExcitationErrors(1, 3, 0, LAMBDA_200KV_NM, G_200_PER_NM)).toThrow(InternalError);
    expect(() => systematicRowExcitationErrors(-1, 1, 0, 0, G_200_PER_NM)).toThrow(/lambda_nm/);
    expect(() => weakBeamDeviation(3, LAMBDA_200KV_NM, -1)).toThrow(/g_per_nm/);
  });
});
