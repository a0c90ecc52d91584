import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { type Vec3, cross, dot, norm, scale, unit } from '../../src/math/vec3.js';
import { getMaterial } from '../../src/crystal/materials.js';
import { materialStiffness, stiffnessTensor } from '../../src/elasticity/stiffness.js';
import { anisotropicDislocation } from '../../src/elasticity/anisotropicDislocation.js';
import { type DisplacementField, directionalProbe, superpose } from '../../src/elasticity/field.js';
import { voigtStiffness } from '../../src/elasticity/stiffness.js';
import { strohHalfSpaceImages } from '../../src/elasticity/surfaceImagesStroh.js';
import { surfaceCorrection, surfaceCorrectionFor } from '../../src/elasticity/surfaceRelaxation.js';
import {
  plateStrohCorrection,
  plateStrohInterpolate,
  plateStrohProblem,
  plateStrohResidualDirect,
  plateStrohSpectrum,
  plateStrohTable,
} from '../../src/elasticity/surfacePlateStroh.js';
import { fdGradient, maxAbs, maxAbsDiff, polygonIntegral, rng } from './helpers.js';
import { needPython, pythonJson } from '../python.js';

/** Hooke's law with the crystal's own stiffness tensor: the traction C_ijkl u_k,l n_j. */
const tractionC = (C: Float64Array, g: ArrayLike<number>, n: Vec3): Vec3 => {
  const out = [0, 0, 0];
  for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) for (let k = 0; k < 3; k++) for (let l = 0; l < 3; l++) out[i] += C[((i * 3 + j) * 3 + k) * 3 + l] * g[3 * k + l] * n[j];
  return out as unknown as Vec3;
};

const T = 60;
const cases: [string, string, Vec3, Vec3, Vec3, number][] = [
  ['Cu, [1 1 1] foil, 60-degree line along [1 -1 0], b along [1 0 -1], 10 nm deep', 'Cu', [1, 1, 1], [1, -1, 0], [1, 0, -1], 10],
  ['Cu, [0 0 1] foil, screw along [1 1 0], 30 nm deep', 'Cu', [0, 0, 1], [1, 1, 0], [1, 1, 0], 30],
  ['Cu, [1 1 1] foil, edge along [1 1 -2], b along [1 -1 0], 3 nm below the exit surface', 'Cu', [1, 1, 1], [1, 1, -2], [1, -1, 0], 57],
  ['alpha-Fe, [0 1 1] foil, mixed line along [1 0 0], b along [1 1 1], 20 nm deep', 'alpha-Fe', [0, 1, 1], [1, 0, 0], [1, 1, 1], 20],
  ['Zn, Cartesian [1 0 0] foil, mixed line along Cartesian [0 1 1], 7 nm deep', 'Zn', [1, 0, 0], [0, 1, 1], [0.3, 1, 0.2], 7],
  ['Cu, [1 1 0] foil, mixed line along [0 0 1], b along [1 0 1], 0.5 nm below the entrance surface', 'Cu', [1, 1, 0], [0, 0, 1], [1, 0, 1], 0.5],
];
const OFFSETS = [-1000, -300, -120, -40, -12, -4, -1, -0.3, 0, 0.3, 1, 4, 12, 40, 120, 300, 1000];

const setUp = (mat: string, nrm: Vec3, line: Vec3, bdir: Vec3, depth: number) => {
  const voigt = materialStiffness(getMaterial(mat));
  const n = unit(nrm);
  const u = unit(line);
  const b = scale(unit(bdir), 0.25);
  const P: Vec3 = [0, 1, 2].map((i) => depth * n[i] + 0.7 * u[i] + 1.3 * cross(n, u)[i]) as unknown as Vec3;
  const inf = anisotropicDislocation({ b_nm: b, line: u, point_nm: P, stiffness_GPa: voigt, coreRadius_nm: 1e-6 });
  const corr = plateStrohCorrection({ b_nm: b, line: u, point_nm: P, normal: n, thickness_nm: T, stiffness_GPa: voigt });
  return { voigt, C: stiffnessTensor(voigt), n, u, b, P, m: cross(n, u), inf, corr };
};

describe('exact anisotropic plate correction of a line parallel to the surfaces (surfacePlateStroh.ts)', () => {
  for (const [label, mat, nrm, line, bdir, depth] of cases) {
    it(`${label}: both surfaces are free of traction (anisotropic Hooke's law) near the line and 300 / 1000 nm aside`, () => {
      const s = setUp(mat, nrm, line, bdir, depth);
      const g = new Float64Array(9), h = new Float64Array(9);
      let worstI = 0, worstR = 0;
      const rows: string[] = [];
      for (const z of [0, T]) for (const x of OFFSETS) {
        const p = [0, 1, 2].map((i) => s.P[i] + (z - depth) * s.n[i] + x * s.m[i] + 3 * s.u[i]);
        s.inf.gradient(g, p[0], p[1], p[2]);
        worstI = Math.max(worstI, norm(tractionC(s.C, g, s.n)));
        s.corr.gradient(h, p[0], p[1], p[2]);
        for (let i = 0; i < 9; i++) h[i] += g[i];
        const r = norm(tractionC(s.C, h, s.n));
        worstR = Math.max(worstR, r);
        rows.push(`${z}/${x}: ${r.toExponential(1)}`);
      }
      console.log(`${label}: worst relaxed / unrelaxed ${(worstR / worstI).toExponential(2)}; ${rows.join(' ')}`);
      expect(worstR / worstI).toBeLessThan(1e-6);
    });
    it(`${label}: the kink of the far halves from anisotropic pure bending (Betti's reciprocity, beam theory) equals the k -> 0 limit of the Fourier solution, -k Im omega^(k) extrapolated from k t = 1e-3 and 2e-3 (to 1e-3 of it; the error falls as k)`, () => {
      const s = setUp(mat, nrm, line, bdir, depth);
      const p = plateStrohProblem({ b_nm: s.b, line: s.u, point_nm: s.P, normal: s.n, thickness_nm: T, stiffness_GPa: s.voigt });
      const spec = new Float64Array(24);
      const limit = (kt: number): number => {
        plateStrohSpectrum(p, kt / T, [depth], spec, false);
        // omega^ = (u_y,x - u_x,y)/2 = (n.G_x - m.G_y)/2, local y along n, x along m
        let wi = 0;
        for (let i = 0; i < 3; i++) wi += 0.5 * (s.n[i] * spec[2 * i + 1] - s.m[i] * spec[6 + 2 * i + 1]);
        return -(kt / T) * wi;
      };
      const l3 = limit(1e-3), l2 = limit(1e-2);
      // the limit is approached linearly in k: Richardson from k t = 1e-3 and 2e-3
      const lr = 2 * l3 - limit(2e-3);
      console.log(`${label}: kink ${p.kink.toExponential(4)} (lambda ${p.lambda.toFixed(4)}), Fourier limit ${l2.toExponential(4)} (k t = 1e-2), ${l3.toExponential(4)} (1e-3), extrapolated ${lr.toExponential(4)}`);
      // rounding in the nearly singular 6 x 6 system grows as 1/k^2: about 2e-9 at k t = 1e-3 (measured), hence the absolute part
      expect(Math.abs(lr - p.kink)).toBeLessThan(1e-3 * Math.abs(p.kink) + 1e-8);
      // the error falls as k: ten times smaller k, about ten times closer
      if (Math.abs(p.kink) > 1e-6) expect(Math.abs(l3 - p.kink)).toBeLessThan(0.2 * Math.abs(l2 - p.kink));
      if (Math.abs(p.lambda) > 0.05) {
        // the coupling term lambda b.u matters: without it the beam value misses the Fourier limit
        const noCoupling = (-6 * dot(s.b, s.m) * depth * (T - depth)) / T ** 3;
        expect(Math.abs(noCoupling - l3)).toBeGreaterThan(50 * Math.abs(l3 - p.kink));
      }
    });
  }

  /** The point at depth z, x across the line from P, w along the line. */
  const at = (s: ReturnType<typeof setUp>, depth: number, z: number, x: number, w = 0): Vec3 =>
    [0, 1, 2].map((i) => s.P[i] + (z - depth) * s.n[i] + x * s.m[i] + w * s.u[i]) as unknown as Vec3;

  for (const [label, mat, nrm, line, bdir, depth] of [cases[0], cases[3], cases[4]]) {
    it(`${label}: the correction is in equilibrium (C_ijkl u_k,lj = 0 by central differences of the stress, h = 1e-3 nm): by the direct k integral to 1e-5 of the largest term, through the table to 3e-3 of C b/(2 pi t^2); its gradient is that of its displacement (finite differences of the path integral, to 3e-5 of b/(2 pi d))`, () => {
      const s = setUp(mat, nrm, line, bdir, depth);
      const p = plateStrohProblem({ b_nm: s.b, line: s.u, point_nm: s.P, normal: s.n, thickness_nm: T, stiffness_GPa: s.voigt });
      const images = strohHalfSpaceImages({ b_nm: s.b, line: s.u, point_nm: s.P, normal: s.n, thickness_nm: T, stiffness_GPa: s.voigt });
      const x0 = dot(s.P, s.m);
      const ig = new Float64Array(9), r6 = new Float64Array(6);
      const direct: DisplacementField = {
        displacement: s.corr.displacement,
        directional: s.corr.directional,
        gradient(out, x, y, z) {
          images.gradient(ig, x, y, z);
          plateStrohResidualDirect(p, x * s.m[0] + y * s.m[1] + z * s.m[2] - x0, x * s.n[0] + y * s.n[1] + z * s.n[2], r6);
          for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) out[3 * i + j] = ig[3 * i + j] + r6[i] * s.m[j] + r6[3 + i] * s.n[j];
        },
      };
      const g = new Float64Array(9);
      const E: Vec3[] = [[1, 0, 0], [0, 1, 0], [0, 0, 1]];
      const navier = (f: DisplacementField, q: Vec3): [number, number] => {
        const h = 1e-3;
        const div = [0, 0, 0];
        let terms = 0;
        for (let j = 0; j < 3; j++) {
          f.gradient(g, q[0] + h * E[j][0], q[1] + h * E[j][1], q[2] + h * E[j][2]);
          const sp = E.map((e) => tractionC(s.C, g, e)); // sp[k][i] = sigma_ik
          f.gradient(g, q[0] - h * E[j][0], q[1] - h * E[j][1], q[2] - h * E[j][2]);
          const sm = E.map((e) => tractionC(s.C, g, e));
          for (let i = 0; i < 3; i++) {
            div[i] += (sp[j][i] - sm[j][i]) / (2 * h);
            terms = Math.max(terms, Math.abs(sp[j][i] - sm[j][i]) / (2 * h));
          }
        }
        return [maxAbs(div), terms];
      };
      const scaleC = maxAbs(s.voigt) * norm(s.b) / (2 * Math.PI * T * T);
      const rows: string[] = [];
      for (const [z, x] of [[0.5, 3], [depth + 0.8, 0.7], [30, -8], [59.5, 2], [20, 70], [45, -250]] as const) {
        const q = at(s, depth, z, x, 1);
        const [dd, terms] = navier(direct, q);
        const [dt] = navier(s.corr, q);
        const fd = fdGradient(s.corr, q, 1e-3);
        s.corr.gradient(g, q[0], q[1], q[2]);
        const dg = maxAbsDiff(fd, g);
        rows.push(`(${z}, ${x}): direct ${(dd / terms).toExponential(1)}, table ${(dt / scaleC).toExponential(1)}, displacement ${(dg / (norm(s.b) / (2 * Math.PI * depth))).toExponential(1)}`);
        expect(dd).toBeLessThan(1e-5 * terms);
        expect(dt).toBeLessThan(3e-3 * scaleC);
        expect(dg).toBeLessThan(3e-5 * (norm(s.b) / (2 * Math.PI * depth))); // measured up to 1.3e-5 (alpha-Fe)
      }
      console.log(`${label}: equilibrium / gradient of the displacement: ${rows.join('; ')}`);
    });

    it(`${label}: the Burgers circuit of the relaxed field (infinite + correction) closes to the same b as the infinite field's (the correction is single-valued), to 1e-7 nm (16 x 16 Gauss-Legendre points per side)`, () => {
      const s = setUp(mat, nrm, line, bdir, depth);
      const loop: Vec3[] = [at(s, depth, 0.5, -25), at(s, depth, 0.5, 25), at(s, depth, T - 0.5, 25), at(s, depth, T - 0.5, -25)];
      const inf = polygonIntegral(s.inf, loop, 16, 16);
      const tot = polygonIntegral(superpose([s.inf, s.corr]), loop, 16, 16);
      expect(Math.min(maxAbsDiff(inf, s.b), maxAbsDiff(inf, scale(s.b, -1)))).toBeLessThan(1e-7);
      expect(maxAbsDiff(tot, inf)).toBeLessThan(1e-7);
    });

    it(`${label}: the table (bicubic Hermite) against the direct k integral; the seam at |x| = X between the table and the far form; directionalAt against the gradient`, () => {
      const s = setUp(mat, nrm, line, bdir, depth);
      const p = plateStrohProblem({ b_nm: s.b, line: s.u, point_nm: s.P, normal: s.n, thickness_nm: T, stiffness_GPa: s.voigt });
      const tb = plateStrohTable(p);
      const r = rng(7);
      const a = new Float64Array(6), b6 = new Float64Array(6);
      const unitG = norm(s.b) / (2 * Math.PI * T);
      let worst = 0;
      for (let q = 0; q < 40; q++) {
        const x = (2 * r() - 1) * 2 * T, y = r() * T;
        plateStrohInterpolate(tb, x, y, a);
        plateStrohResidualDirect(p, x, y, b6);
        worst = Math.max(worst, maxAbsDiff(a, b6));
      }
      console.log(`${label}: table vs direct ${(worst / unitG).toExponential(2)} of b/(2 pi t)`);
      // bicubic Hermite on t/24 steps: measured 5e-7 (Zn) to 2.8e-5 (alpha-Fe) of b/(2 pi t)
      expect(worst).toBeLessThan(1e-4 * unitG);
      const X = -tb.x0;
      const g1 = new Float64Array(9), g2 = new Float64Array(9);
      let seam = 0;
      for (const side of [-1, 1]) for (const z of [0, 10, 30, 60]) {
        const q1 = at(s, depth, z, side * (X - 1e-9)), q2 = at(s, depth, z, side * (X + 1e-9));
        s.corr.gradient(g1, q1[0], q1[1], q1[2]);
        s.corr.gradient(g2, q2[0], q2[1], q2[2]);
        seam = Math.max(seam, maxAbsDiff(g1, g2));
      }
      console.log(`${label}: seam at |x| = ${X} nm: ${(seam / unitG).toExponential(2)} of b/(2 pi t)`);
      // measured 1e-8 to 1e-7 for the lines here; a review measured 1e-6 to 6e-6 for other orientations (Pb, NiAl,
      // Zn [100] in a [001] foil: the settling length grows with the largest Im p, the range with 1/sqrt(min Im p)),
      // about 1e-9 in beta', below any image effect
      expect(seam).toBeLessThan(1e-6 * unitG);
      const gv: [number, number, number] = [2.1, -1.3, 0.6], kv: [number, number, number] = [0.2, -0.1, 0.97];
      const probe = directionalProbe(s.corr, gv, kv);
      const pt = new Float64Array(4);
      for (const [z, x] of [[1, 0.2], [depth, 3], [40, -30], [59, 200], [5, -900]] as const) {
        const q = at(s, depth, z, x, 2);
        pt[0] = q[0]; pt[1] = q[1]; pt[2] = q[2];
        probe(pt);
        s.corr.gradient(g1, q[0], q[1], q[2]);
        let ref = 0;
        for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) ref += gv[i] * g1[3 * i + j] * kv[j];
        expect(Math.abs(pt[3] - ref)).toBeLessThan(1e-12 + 1e-9 * Math.abs(ref));
      }
    });
  }

  it('thick-plate limit (Cu, 60-degree line 10 nm below the entrance surface): near that surface the plate correction tends to the single Stroh half-space image of that surface (Ting 1996 ch. 8), the difference falling faster than 1/t (measured 3.7e-3 -> 1.5e-4 for 5x the thickness)', () => {
    const diffs: number[] = [];
    for (const t of [600, 3000]) {
      const voigt = materialStiffness(getMaterial('Cu'));
      const n = unit([1, 1, 1]), u = unit([1, -1, 0]);
      const b = scale(unit([1, 0, -1]), 0.25);
      const P = scale(n, 10);
      const corr = plateStrohCorrection({ b_nm: b, line: u, point_nm: P, normal: n, thickness_nm: t, stiffness_GPa: voigt });
      const img = strohHalfSpaceImages({ b_nm: b, line: u, point_nm: P, normal: n, thickness_nm: t, stiffness_GPa: voigt, only: 'entrance' });
      const m = cross(n, u);
      const g = new Float64Array(9), h = new Float64Array(9);
      let d = 0, big = 0;
      for (const z of [0, 5, 10, 20]) for (const x of [-20, -5, 0, 3, 15]) {
        const q = [0, 1, 2].map((i) => P[i] + (z - 10) * n[i] + x * m[i]);
        corr.gradient(g, q[0], q[1], q[2]);
        img.gradient(h, q[0], q[1], q[2]);
        d = Math.max(d, maxAbsDiff(g, h));
        big = Math.max(big, maxAbs(h));
      }
      diffs.push(d / big);
    }
    console.log(`thick-plate limit: |plate - entrance image| / |image| = ${diffs.map((v) => v.toExponential(2)).join(' (t = 600 nm), ')} (t = 3000 nm)`);
    expect(diffs[1]).toBeLessThan(3e-3);
    expect(diffs[1]).toBeLessThan(diffs[0] / 3);
  });

  it('isotropic limit: near-isotropic cubic Cij (C11 = 200, C12 = 100, C44 = 50 A GPa) approach the isotropic plate correction (surfacePlateEdge.ts plus the screw image series, nu = 1/3) linearly in A - 1; exactly isotropic Cij fall back to that isotropic correction (degenerate Stroh eigenvalues)', () => {
    const n = unit([0, 0, 1]), u = unit([1, 1, 0]);
    const b = scale(unit([1, 0, 1]), 0.25);
    const P = scale(n, 15);
    const iso = voigtStiffness({ C11: 200, C12: 100, C44: 50 }, 'cubic');
    const spec = surfaceCorrectionFor(b, u, P, n, T, iso);
    expect(spec?.kind).toBe('parallel-edge-plate');
    const isoCorr = surfaceCorrection({ b_nm: b, line: u, point_nm: P, correction: spec!, stiffness_GPa: iso, poissonRatio: 1 / 3 });
    const m = cross(n, u);
    const g = new Float64Array(9), h = new Float64Array(9);
    const dev: number[] = [];
    const As = [1.2, 1.1];
    for (const A of As) {
      const voigt = voigtStiffness({ C11: 200, C12: 100, C44: 50 * A }, 'cubic');
      const sp = surfaceCorrectionFor(b, u, P, n, T, voigt);
      expect(sp?.kind).toBe('parallel-stroh-plate');
      const corr = surfaceCorrection({ b_nm: b, line: u, point_nm: P, correction: sp!, stiffness_GPa: voigt, poissonRatio: 1 / 3 });
      let d = 0, big = 0;
      for (const z of [0, 7, 15, 40, 60]) for (const x of [-300, -40, -6, 0.5, 2, 25, 120]) {
        // (not x = 0 at the line's depth: the isotropic screw image series loses its digits on the line itself)
        const q = [0, 1, 2].map((i) => P[i] + (z - 15) * n[i] + x * m[i]);
        corr.gradient(g, q[0], q[1], q[2]);
        isoCorr.gradient(h, q[0], q[1], q[2]);
        d = Math.max(d, maxAbsDiff(g, h));
        big = Math.max(big, maxAbs(h));
      }
      dev.push(d / big);
    }
    console.log(`isotropic limit: max |anisotropic - isotropic| / max |isotropic| = ${dev.map((v, i) => `${v.toExponential(2)} (A = ${As[i]})`).join(', ')}`);
    expect(dev[1]).toBeLessThan(0.1);
    // linear in A - 1: halving A - 1 halves the deviation (to 25 %)
    expect(dev[1] / dev[0]).toBeGreaterThan(0.5 * 0.75);
    expect(dev[1] / dev[0]).toBeLessThan(0.5 * 1.25);
  });
});

describe('anisotropic plate correction against an independent evaluation (scripts/ref_plate_stroh.py: numpy eig of the Stroh matrix, the strip loaded with the line\'s own tractions, 6 x 6 by mpmath, the pole from the spectrum, scipy quad_vec)', () => {
  const py = needPython('scipy', 'numpy');
  const script = readFileSync(new URL('../../scripts/ref_plate_stroh.py', import.meta.url), 'utf8');
  for (const [label, mat, nrm, line, bdir, depth] of [cases[0], cases[4]]) {
    it(`${label}: 10 points (both surfaces, the line, far out): the gradient agrees to 1e-5 of its largest value (the table's bicubic interpolation, measured 2e-6), the kink (the reference takes it from its own spectrum) to 1e-5 of itself`, (ctx) => {
      py.require(ctx);
      const s = setUp(mat, nrm, line, bdir, depth);
      const local: [number, number][] = [[3, 0], [-2, 0], [0.5, 1], [0.3, depth + 0.5], [15, 30], [-40, 59], [7, 60], [-120, 20], [300, 0], [1, 4]];
      const ref = pythonJson<{ grad: number[][]; W: number }>(script, { voigt: s.voigt, m: s.m, n: s.n, u: s.u, b: s.b, d: depth, t: T, points: local });
      const p = plateStrohProblem({ b_nm: s.b, line: s.u, point_nm: s.P, normal: s.n, thickness_nm: T, stiffness_GPa: s.voigt });
      expect(Math.abs(ref.W - p.kink)).toBeLessThan(1e-5 * Math.abs(p.kink) + 1e-10);
      const g = new Float64Array(9);
      let worst = 0, size = 0;
      local.forEach(([x, y], q) => {
        const pt = [0, 1, 2].map((i) => s.P[i] + (y - depth) * s.n[i] + x * s.m[i]);
        s.corr.gradient(g, pt[0], pt[1], pt[2]);
        worst = Math.max(worst, maxAbsDiff(g, ref.grad[q]));
        size = Math.max(size, maxAbs(ref.grad[q]));
      });
      console.log(`${label}: against scripts/ref_plate_stroh.py: largest difference ${(worst / size).toExponential(2)} of the largest component; kink ${p.kink.toExponential(6)} vs ${ref.W.toExponential(6)}`);
      expect(worst).toBeLessThan(1e-5 * size);
    });
  }
});
