/**
 * Weak-beam ribbon width: peak separation across the line, the correction by simulated strips, and the
 * stacking-fault energy it implies.
 *
 * The "micrograph" here is made by thinfoil's own renderer (with added noise), so the end-to-end test checks
 * that the read-out and the inversion recover the width the image was made with (the plumbing and the
 * consistency of profile, peaks and strips), not the physics of the weak-beam image itself; the physics of
 * the weak-beam peak position is checked elsewhere (physics.md section 4, test/imaging).
 */
import { describe, expect, it } from 'vitest';
import type { Vec3 } from '../../src/math/vec3.js';
import { add, cross, scale } from '../../src/math/vec3.js';
import { parseScenario } from '../../src/scenario/parse.js';
import { getMaterial } from '../../src/crystal/materials.js';
import { directionToCartesian, planeNormalToCartesian } from '../../src/crystal/lattice.js';
import { renderScenario } from '../../src/imaging/renderScenario.js';
import { createRenderPool } from '../../src/imaging/workerPool.js';
import { shockleySplit, ribbonWidth_nm, anisotropicRibbonWidth_nm } from '../../src/elasticity/dissociation.js';
import { isotropicVoigt, materialStiffness } from '../../src/elasticity/stiffness.js';
import { anisotropicSfeFromWidth_mJ_per_m2, isotropicSfeFromWidth_mJ_per_m2 } from '../../src/elasticity/ribbonEnergy.js';
import { lineProfile, prominence, refinePeak, removeBackground, twoPeaks } from '../../src/analysis/ribbonProfile.js';
import { profileAgreement, ribbonStripGeometry, widthFromSeparation } from '../../src/analysis/ribbonWidth.js';
import { InputError } from '../../src/errors.js';

const Cu = getMaterial('Cu');
const a = Cu.lattice.a_nm;
const unitOf = (v: Vec3): Vec3 => scale(v, 1 / Math.hypot(...v));

describe('stacking-fault energy from a ribbon width', () => {
  it('inverts the isotropic closed form G b_p^2 (2 - nu) / (8 pi gamma (1 - nu)) [1 - 2 nu cos(2 beta) / (2 - nu)] (Hirth & Lothe 1982 ch. 10; Hull & Bacon 2011 ch. 5; form from memory)', () => {
    const G = Cu.elastic.shearModulus_GPa, nu = Cu.elastic.poissonRatio;
    for (const beta of [0, Math.PI / 6, Math.PI / 3, Math.PI / 2]) {
      const b: Vec3 = [0.5, -0.5, 0];
      const bC = unitOf(directionToCartesian(Cu.lattice, b));
      const nC = unitOf(planeNormalToCartesian(Cu.lattice, [1, 1, 1]));
      const u = add(scale(bC, Math.cos(beta)), scale(cross(nC, bC), Math.sin(beta)));
      const p = shockleySplit({ lattice: Cu.lattice, b, planeNormal: [1, 1, 1], lineCartesian: u });
      const d = 3.7; // nm, any measured width
      const want = ((1e3 * G * (a * a) / 6) * (2 - nu) / (8 * Math.PI * d * (1 - nu))) * (1 - (2 * nu * Math.cos(2 * beta)) / (2 - nu));
      expect(Math.abs(isotropicSfeFromWidth_mJ_per_m2(p.b1_nm, p.b2_nm, u, G, nu, d) - want) / want).toBeLessThan(1e-12);
    }
  });

  it('round-trips gamma -> width -> gamma, isotropic and anisotropic (Stroh energy factors)', () => {
    const p = shockleySplit({ lattice: Cu.lattice, b: [0.5, -0.5, 0], planeNormal: [1, 1, 1], lineCartesian: directionToCartesian(Cu.lattice, [1, 1, -2]) });
    const C = materialStiffness(Cu);
    for (const gamma of [10, 45, 160]) {
      const wi = ribbonWidth_nm(p.b1_nm, p.b2_nm, p.line, Cu.elastic.shearModulus_GPa, Cu.elastic.poissonRatio, gamma);
      expect(isotropicSfeFromWidth_mJ_per_m2(p.b1_nm, p.b2_nm, p.line, Cu.elastic.shearModulus_GPa, Cu.elastic.poissonRatio, wi)).toBeCloseTo(gamma, 9);
      const wa = anisotropicRibbonWidth_nm(p.b1_nm, p.b2_nm, p.line, C, gamma);
      expect(anisotropicSfeFromWidth_mJ_per_m2(p.b1_nm, p.b2_nm, p.line, C, wa)).toBeCloseTo(gamma, 9);
    }
  });
});

describe('anisotropic read-out in the isotropic limit', () => {
  it('with isotropic stiffness (C11 - C12 = 2 C44) the anisotropic SFE equals the isotropic one (Hirth & Lothe 1982 ch. 13: the Stroh energy factors reduce to G and G/(1 - nu))', () => {
    const G = 40, nu = 0.3;
    const p = shockleySplit({ lattice: Cu.lattice, b: [0.5, -0.5, 0], planeNormal: [1, 1, 1], lineCartesian: directionToCartesian(Cu.lattice, [1, 1, -2]) });
    const iso = isotropicSfeFromWidth_mJ_per_m2(p.b1_nm, p.b2_nm, p.line, G, nu, 2.5);
    const ani = anisotropicSfeFromWidth_mJ_per_m2(p.b1_nm, p.b2_nm, p.line, isotropicVoigt(G, nu), 2.5);
    expect(Math.abs(ani - iso) / iso).toBeLessThan(1e-6);
  });
});

describe('profile and peaks', () => {
  it('parabola vertex: exact for a sampled parabola, and the error propagation matches a Monte Carlo of the noise', () => {
    const x = [0, 0.5, 1, 1.5, 2];
    const y = x.map((t) => 3 - (t - 1.13) ** 2);
    expect(refinePeak(x, y, undefined, 2).x_nm).toBeCloseTo(1.13, 12);
    // Monte Carlo with noise sigma = 0.01 on every sample
    let s = 0, s2 = 0;
    const N = 4000;
    let seed = 3;
    const rnd = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
    const gauss = () => Math.sqrt(-2 * Math.log(rnd() + 1e-12)) * Math.cos(2 * Math.PI * rnd());
    for (let k = 0; k < N; k++) {
      const v = refinePeak(x, y.map((q) => q + 0.01 * gauss()), undefined, 2).x_nm;
      s += v;
      s2 += v * v;
    }
    const sd = Math.sqrt(s2 / N - (s / N) ** 2);
    const pred = refinePeak(x, y, [0.01, 0.01, 0.01, 0.01, 0.01], 2).sigma_nm;
    expect(Math.abs(sd - pred) / pred).toBeLessThan(0.1);
  });

  it('picks the two narrow peaks by prominence over a higher broad hump, with or without the background removed', () => {
    const x = Array.from({ length: 161 }, (_, i) => (i - 80) * 0.1);
    const y = x.map((t) => 3 * Math.exp(-(((t + 5) / 6) ** 2)) + Math.exp(-(((t + 1) / 0.3) ** 2)) + Math.exp(-(((t - 1.5) / 0.3) ** 2)));
    // the hump's top (about -5) is a local maximum at least as high as the peak at 1.5: height alone would take it
    const k5 = 30;
    expect(y[k5]).toBeGreaterThan(y[80 + 15]);
    for (const yy of [y, removeBackground(x, y, 3)]) {
      const p = twoPeaks(x, yy, undefined, 0.5)!;
      expect(p.peaks[0].x_nm).toBeCloseTo(-1, 1);
      expect(p.peaks[1].x_nm).toBeCloseTo(1.5, 1);
    }
    expect(prominence(y, 70)).toBeGreaterThan(prominence(y, k5));
    // a straight background is removed exactly away from the ends
    const ramp = removeBackground(x, x.map((t) => 2 + 0.3 * t), 1);
    for (let k = 50; k < 110; k++) expect(Math.abs(ramp[k])).toBeLessThan(1e-9);
  });

  it('lineProfile averages along an oblique line: a ridge at 30 degrees gives its peak at the right distance', () => {
    const w = 80, h = 80, pix = 0.5;
    const ang = (30 * Math.PI) / 180;
    const across = [Math.cos(ang + Math.PI / 2), -Math.sin(ang + Math.PI / 2)];
    const data = new Float32Array(w * h);
    for (let j = 0; j < h; j++) for (let i = 0; i < w; i++) {
      const t = ((i + 0.5) * pix - 20) * across[0] + ((j + 0.5) * pix - 20) * across[1];
      data[j * w + i] = Math.exp(-(((t - 2.2) / 0.8) ** 2));
    }
    const prof = lineProfile({ width: w, height: h, data }, { lineAngle_deg: 30, pixel_nm: pix, halfWidth_nm: 8, binWidth_nm: 0.25 });
    const k = Array.from(prof.mean).indexOf(Math.max(...Array.from(prof.mean).filter(Number.isFinite)));
    expect(refinePeak(prof.x_nm, prof.mean, prof.sem, k).x_nm).toBeCloseTo(2.2, 1);
  });
});

describe('weak-beam ribbon: width and SFE back from a simulated micrograph (plumbing check, see the file comment)', () => {
  // invented example: Cu, screw ribbon 1/2[1 -1 0] on (111), g = 2 -2 0 at g(5g) with a 9-beam... automatic row
  const raw = (width: number) => ({
    name: 'ribbon test (invented)',
    material: 'Cu',
    kV: 200,
    foil: { thickness_nm: 80, normal: [0, 0, 1] },
    beam: [0, 0, 1],
    imageX: [1, 1, 0],
    image: { width_px: 64, height_px: 16, pixel_nm: 0.25 },
    conditions: [{ id: 'wb', g: [2, -2, 0], weakBeam: 5, beams: 'row' }],
    defects: [{ type: 'dissociated', b: '1/2[1 -1 0]', plane: [1, 1, 1], line: [1, -1, 0], point_nm: [0, 0, 30], separation_nm: width }],
  });

  it('a 6 nm ribbon with noise gives back 6 nm within the pixel size, and the SFE within the uncertainty it reports (one sigma)', async () => {
    const W = 6, pix = 0.25;
    const sc = parseScenario(raw(W));
    const pool = createRenderPool(1);
    const [img] = await renderScenario(sc, pool);
    await pool.close();
    // noise: 3 % of the peak intensity per pixel (seeded)
    let seed = 11;
    const rnd = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
    const gauss = () => Math.sqrt(-2 * Math.log(rnd() + 1e-12)) * Math.cos(2 * Math.PI * rnd());
    const peak = Math.max(...img.df);
    const noisy = img.df.map((v) => v + 0.03 * peak * gauss());
    const t = { sc, conditionIndex: 0, defectIndex: 0 };
    const g = ribbonStripGeometry(t);
    expect(g.projection).toBeCloseTo(Math.sqrt(2) / Math.sqrt(6), 9); // |(-1 -1 2) projected on (001)| / |(-1 -1 2)| (by hand)
    const prof = lineProfile({ width: img.width, height: img.height, data: noisy }, { lineAngle_deg: g.lineAngle_deg, pixel_nm: pix, centre_px: [img.width / 2 + g.x0 / pix, img.height / 2 + g.y0 / pix], halfWidth_nm: 7.5 });
    const y = removeBackground(prof.x_nm, prof.mean, 3);
    const pk = twoPeaks(prof.x_nm, y, prof.sem, 2 * pix)!;
    expect(pk).not.toBeNull();
    const sepErr = Math.hypot(pk.sigma_nm, (Math.SQRT2 * pix) / Math.sqrt(12));
    const opts = { binWidth_nm: pix, halfWidth_nm: 7.5, background_nm: 3 };
    const res = widthFromSeparation(t, pk.separation_nm, sepErr, opts);
    expect(Math.abs(res.width_nm - W)).toBeLessThan(pix);
    const p = shockleySplit({ lattice: Cu.lattice, b: [0.5, -0.5, 0], planeNormal: [1, 1, 1], lineCartesian: directionToCartesian(Cu.lattice, [1, -1, 0]) });
    const gTrue = isotropicSfeFromWidth_mJ_per_m2(p.b1_nm, p.b2_nm, p.line, Cu.elastic.shearModulus_GPa, Cu.elastic.poissonRatio, W);
    const gEst = isotropicSfeFromWidth_mJ_per_m2(p.b1_nm, p.b2_nm, p.line, Cu.elastic.shearModulus_GPa, Cu.elastic.poissonRatio, res.width_nm);
    const gErr = (gEst * res.widthError_nm) / res.width_nm;
    expect(Math.abs(gEst - gTrue)).toBeLessThan(gErr);
    // the simulated strip at the found width has the measured profile's shape
    expect(profileAgreement(t, res.width_nm, opts, prof.x_nm, y)).toBeGreaterThan(0.9);
  });

  it('an oblique line (120 degrees on the screen) with half-pixel bins: 6 nm back within the pixel size', async () => {
    const c = Math.cos(Math.PI / 6), s30 = Math.sin(Math.PI / 6);
    // imageX turned 30 degrees from [1 1 0] about the beam [001]: the line [1 -1 0] then runs at 120 degrees
    const sc = parseScenario({ ...raw(6), imageX: [c - s30, c + s30, 0], image: { width_px: 60, height_px: 60, pixel_nm: 0.25 } });
    const pool = createRenderPool(1);
    const [img] = await renderScenario(sc, pool);
    await pool.close();
    const t = { sc, conditionIndex: 0, defectIndex: 0 };
    const g = ribbonStripGeometry(t);
    expect(g.lineAngle_deg).toBeCloseTo(120, 9);
    const bin = 0.125;
    const prof = lineProfile({ width: img.width, height: img.height, data: img.df }, { lineAngle_deg: g.lineAngle_deg, pixel_nm: 0.25, halfWidth_nm: 6, binWidth_nm: bin });
    expect(Array.from(prof.count).every((n) => n > 0)).toBe(true); // the oblique line fills half-pixel bins
    const y = removeBackground(prof.x_nm, prof.mean, 3);
    const pk = twoPeaks(prof.x_nm, y, prof.sem, 0.5)!;
    const opts = { binWidth_nm: bin, halfWidth_nm: 6, background_nm: 3 };
    const res = widthFromSeparation(t, pk.separation_nm, Math.hypot(pk.sigma_nm, (bin * Math.SQRT2) / Math.sqrt(12)), opts);
    expect(Math.abs(res.width_nm - 6)).toBeLessThan(0.25);
    expect(profileAgreement(t, res.width_nm, opts, prof.x_nm, y)).toBeGreaterThan(0.9);
  });

  it('a ribbon too narrow to resolve (the equilibrium 1 nm of Cu) is flagged: its two strongest maxima are not reproduced in shape', async () => {
    const r = raw(6);
    delete (r.defects[0] as { separation_nm?: number }).separation_nm;
    const sc = parseScenario({ ...r, image: { width_px: 128, height_px: 8, pixel_nm: 0.1 } });
    const pool = createRenderPool(1);
    const [img] = await renderScenario(sc, pool);
    await pool.close();
    const t = { sc, conditionIndex: 0, defectIndex: 0 };
    const g = ribbonStripGeometry(t);
    const prof = lineProfile({ width: img.width, height: img.height, data: img.df }, { lineAngle_deg: g.lineAngle_deg, pixel_nm: 0.1, halfWidth_nm: 6.3 });
    const y = removeBackground(prof.x_nm, prof.mean, 3);
    const pk = twoPeaks(prof.x_nm, y, prof.sem, 0.2);
    const opts = { binWidth_nm: 0.1, halfWidth_nm: 6.4, background_nm: 3 };
    let flagged = pk === null;
    if (pk !== null) {
      try {
        const res = widthFromSeparation(t, pk.separation_nm, 0.05, opts);
        flagged = profileAgreement(t, res.width_nm, opts, prof.x_nm, y) < 0.5;
      } catch (e) {
        flagged = e instanceof InputError;
      }
    }
    expect(flagged).toBe(true);
  });
});
