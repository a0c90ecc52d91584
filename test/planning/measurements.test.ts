/**
 * Measuring s from Kikuchi lines, thickness from convergent-beam fringes and
 * from projected widths. Sources are named beside each check.
 */
import { describe, expect, it } from 'vitest';
import { deviationFromAngle, deviationFromKikuchi } from '../../src/planning/kikuchi.js';
import { fitFringes, fringeDeviations } from '../../src/planning/convergentBeam.js';
import { thicknessFromFaultWidth, thicknessFromLineLength } from '../../src/planning/projectedWidth.js';
import { perfectCrystal } from '../../src/dynamics/twoBeam.js';
import { InputError } from '../../src/errors.js';

describe('s from the Kikuchi line', () => {
  // 200 kV: lambda = 2.5079 pm (physics.md check value, CODATA); Cu a = 0.3615 nm (handbook value, from memory)
  const lambda = 0.0025079;
  const g = 2 / 0.3615; // |g_200| = 5.5325 nm^-1

  it('a worked example by hand: Cu 200 at 200 kV, line 1/10 of the spot distance outside the spot', () => {
    // s = lambda g^2 x / R (Williams & Carter 2009, Kikuchi chapter; Edington 1975; from memory)
    // by hand: 0.0025079 * 5.5325^2 * 0.1 = 0.0025079 * 30.609 * 0.1 = 7.676e-3 nm^-1
    const r = deviationFromKikuchi(1.2, 12, lambda, g);
    expect(r.s_per_nm).toBeCloseTo(7.676e-3, 6);
    // and w = s xi_g with xi_200(Cu, 200 kV) about 50 nm gives w about 0.38 (order of magnitude used in practice)
  });

  it('the sign: a line outside the spot means g inside the Ewald sphere (s > 0), checked with the exact Ewald construction', () => {
    // Exact geometry (physics.md section 3): s = -(2 k.g + g^2) / (2K), K = 1/lambda. Beam at angle theta to the planes,
    // k = K (-sin(theta), cos(theta)), g = (g, 0): s = g sin(theta) - g^2 / (2K). theta = thetaB + Delta_theta, with
    // Delta_theta = lambda g x / R from the pattern scale (R <-> 2 thetaB). Small-angle formula vs exact: |rel| < 1e-3.
    const K = 1 / lambda;
    const thetaB = Math.asin((lambda * g) / 2);
    for (const xOverR of [-0.3, -0.05, 0.02, 0.1, 0.4]) {
      const dTheta = lambda * g * xOverR;
      const theta = thetaB + dTheta;
      const kx = -K * Math.sin(theta);
      const sExact = -(2 * kx * g + g * g) / (2 * K);
      const r = deviationFromKikuchi(xOverR * 10, 10, lambda, g);
      expect(Math.sign(r.s_per_nm)).toBe(Math.sign(xOverR));
      expect(Math.abs(r.s_per_nm - sExact) / Math.abs(sExact)).toBeLessThan(1e-3);
      // g inside the sphere <=> |k + g| < K
      const inside = Math.hypot(kx + g, K * Math.cos(theta)) < K;
      expect(inside).toBe(xOverR > 0);
    }
  });

  it('from the angle: Cu 200 at 200 kV turned 1 mrad past Bragg gives s = g cos(thetaB) x 1 mrad (by hand, 5.5325e-3 nm^-1), agreeing with the Kikuchi form', () => {
    // thetaB = asin(0.0025079 * 5.5325 / 2) = 6.937 mrad, cos = 0.99998: s = 5.5325 * 0.99998 * 1e-3 = 5.5324e-3 nm^-1 (to 1e-6 rel.)
    expect(deviationFromAngle(1e-3, lambda, g)).toBeCloseTo(5.5324e-3, 7);
    // the same tilt read as a Kikuchi distance: x / R = Delta_theta / (lambda g)
    const x = 1e-3 / (lambda * g);
    // (the Kikuchi form drops cos(thetaB) ~ 1 - 2.4e-5: agreement to 1e-4 relative)
    const k = deviationFromKikuchi(x, 1, lambda, g).s_per_nm, a = deviationFromAngle(1e-3, lambda, g);
    expect(Math.abs(k - a) / a).toBeLessThan(1e-4);
  });

  it('refuses unusable distances', () => {
    expect(() => deviationFromKikuchi(1, 0, lambda, g)).toThrow(InputError);
    expect(() => deviationFromKikuchi(20, 10, lambda, g)).toThrow(/exceeds/);
  });
});

/** Dark fringes (minima of I_g) of a rocking curve I_g(s) for s > 0, by sampling and parabolic refinement. */
function darkFringes(intensity: (s: number) => number, sMax: number, steps: number): number[] {
  const h = sMax / steps;
  const I = Array.from({ length: steps + 1 }, (_, i) => intensity(i * h));
  const out: number[] = [];
  for (let i = 1; i < steps; i++) {
    if (I[i] < I[i - 1] && I[i] <= I[i + 1]) {
      const den = I[i - 1] - 2 * I[i] + I[i + 1];
      out.push((i + (den > 0 ? (0.5 * (I[i - 1] - I[i + 1])) / den : 0)) * h);
    }
  }
  return out;
}

describe('thickness from two-beam convergent-beam fringes (Kelly et al. 1975)', () => {
  it('a hand-computed line: t = 100 nm, xi_g = 50 nm, fringes n = 3..6', () => {
    // s_n = sqrt(n^2/t^2 - 1/xi^2) (Kelly et al. 1975): by hand 0.022361, 0.034641, 0.045826, 0.056569 nm^-1
    const f = fitFringes([0.022361, 0.034641, 0.045826, 0.056569]);
    expect(f.n1).toBe(3);
    expect(f.thickness_nm).toBeCloseTo(100, 1);
    expect(f.xi_nm!).toBeCloseTo(50, 1);
  });

  it.each([
    [120, 42, 0],
    [85, 60, 0.1],
    [150, 35, 0.1],
    [200, 35, 0.05],
    [160, 75, 0.05],
  ])("rocking curves of thinfoil's perfect-crystal solution (t = %d nm, xi_g = %d nm, xi_g/xi'_g = %d) analysed back to t within 1 %%", (t, xi, r) => {
    // The synthetic pattern comes from the project's exact slab matrix (src/dynamics/twoBeam.ts perfectCrystal);
    // without absorption its minima are the zeros of the Pendelloesung formula (Hirsch et al. 1965), the basis of
    // Kelly et al. (1975); with absorption the minima shift slightly, which the 1 % tolerance must absorb.
    const out = new Float64Array(4);
    const Ig = (s: number) => {
      perfectCrystal(out, { xi_nm: xi, xiAbs_nm: r === 0 ? Infinity : xi / r, xiAbs0_nm: r === 0 ? Infinity : xi / r, s_per_nm: s }, t);
      return out[2] ** 2 + out[3] ** 2;
    };
    const minima = darkFringes(Ig, (t / xi + 7) / t, 16000).slice(0, 5);
    expect(minima.length).toBeGreaterThanOrEqual(4);
    // express them as distances on a pattern (R = 100 units between disc centres) and back, as a user would
    const lambda = 0.0025079, g = 5;
    const x = minima.map((s) => (s * 100) / (lambda * g * g));
    const f = fitFringes(fringeDeviations(x, 100, lambda, g));
    expect(Math.abs(f.thickness_nm - t) / t).toBeLessThan(0.01);
    expect(f.n1).toBe(Math.floor(t / xi) + 1); // first zero: n > t/xi_g (s_eff t = n with s_eff >= 1/xi_g)
    expect(Math.abs(f.xi_nm! - xi) / xi).toBeLessThan(0.05);
    expect(f.thicknessError_nm).toBeLessThan(0.02 * t);
  });

  it('the limit of the method with absorption (documented, measured here): t = 200 nm, xi_g = 35 nm, r = 0.1 misses by more than 1 %', () => {
    // With strong absorption in a thick foil (t/xi_g ~ 6, t/xi'_g ~ 0.6) the dark fringes near s = 0 are filled in and
    // shifted, and the straightest line is found for a wrong integer: this is why README limits the method to
    // t/xi_g below about 4 at xi_g/xi'_g = 0.1. The fit's standard errors do not include this systematic error.
    const out = new Float64Array(4);
    const t = 200, xi = 35;
    const Ig = (s: number) => {
      perfectCrystal(out, { xi_nm: xi, xiAbs_nm: xi / 0.1, xiAbs0_nm: xi / 0.1, s_per_nm: s }, t);
      return out[2] ** 2 + out[3] ** 2;
    };
    const f = fitFringes(darkFringes(Ig, (t / xi + 7) / t, 16000).slice(0, 5));
    expect(Math.abs(f.thickness_nm - t) / t).toBeGreaterThan(0.01);
  });

  it('literature example: none recalled reliably enough to quote; the hand-computed line above stands in (stated, not hidden)', () => {
    // We could not recall the numbers of a published worked example (Kelly et al. 1975; Williams & Carter 2009 show
    // the method with a plot) to a useful precision, so no value is claimed from the literature here. The check below
    // is the method's own statement (Kelly et al. 1975): with the wrong integer the points do not lie on a line.
    const f = fitFringes([0.022361, 0.034641, 0.045826, 0.056569]);
    const right = f.tried.find((q) => q.n1 === 3)!.rms;
    for (const q of f.tried) if (q.n1 !== 3) expect(q.rms).toBeGreaterThan(10 * right);
  });

  it('refuses too few or unordered fringes', () => {
    expect(() => fitFringes([0.01, 0.02])).toThrow(/at least 3/);
    expect(() => fitFringes([0.01, 0.03, 0.02])).toThrow(/increase/);
  });
});

describe('thickness from projected widths (geometry)', () => {
  it('an inclined (111) fault in a (001) foil seen along [001]: W = t tan(35.26 deg) = t / sqrt(2) (by hand; Edington 1975 w = t tan(phi), phi between fault plane and beam, from memory)', () => {
    // the (111) plane makes 90 - 54.74 = 35.26 deg with the [001] beam: tan = 1/sqrt(2)
    expect(thicknessFromFaultWidth(100 / Math.SQRT2, [1, 1, 1], [0, 0, 1], [0, 0, 1])).toBeCloseTo(100, 9);
    // a [111] dislocation makes 54.74 deg with [001]: its projection is t tan(54.74 deg) = t sqrt(2)
    expect(thicknessFromLineLength(100 * Math.SQRT2, [1, 1, 1], [0, 0, 1], [0, 0, 1])).toBeCloseTo(100, 9);
  });

  it('a tilted beam: compared with explicit intersection points of the fault with both surfaces (computed here)', () => {
    // fault plane through the origin with normal m; foil 0 <= z <= t; beam k. Take a point on the top line and the
    // point of the bottom line straight "down the fault"; project both along k onto the image plane and measure the
    // distance between the two projected lines.
    const t = 80;
    const m = [1, -1, 1].map((v) => v / Math.sqrt(3));
    const k = [0.2, 0.1, 1].map((v) => v / Math.hypot(0.2, 0.1, 1));
    const l = [m[1] * 1 - m[2] * 0, m[2] * 0 - m[0] * 1, 0]; // m x (0,0,1)
    // bottom line: points p with p.m = 0, p.z = t; take p = (a, b, t) minimising |(a,b)|: a m0 + b m1 = -t m2
    const d = m[0] ** 2 + m[1] ** 2;
    const p = [(-t * m[2] * m[0]) / d, (-t * m[2] * m[1]) / d, t];
    const proj = (v: number[]) => { const kv = v[0] * k[0] + v[1] * k[1] + v[2] * k[2]; return v.map((x, i) => x - kv * k[i]); };
    const P = proj(p), L = proj(l);
    const Ln = Math.hypot(...L);
    const along = (P[0] * L[0] + P[1] * L[1] + P[2] * L[2]) / Ln;
    const W = Math.sqrt(Math.hypot(...P) ** 2 - along ** 2); // distance between the projected top line (through 0) and bottom line
    expect(thicknessFromFaultWidth(W, [1, -1, 1], [0, 0, 1], k as unknown as [number, number, number])).toBeCloseTo(t, 9);
  });

  it('refuses a fault parallel to the foil', () => {
    expect(() => thicknessFromFaultWidth(10, [0, 0, 1], [0, 0, 1], [0, 0, 1])).toThrow(InputError);
  });
});
