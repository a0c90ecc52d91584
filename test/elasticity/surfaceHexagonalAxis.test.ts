/**
 * A line along the c axis of a hexagonal crystal, parallel to the foil surfaces: the crystal is isotropic across
 * the line (transverse isotropy), its Stroh eigenvalues are degenerate, and the relaxed field falls back to the
 * isotropic plate correction of the edge part (surfaceRelaxation.ts). That is exact when the correction uses the
 * plane-strain Poisson ratio of the basal plane, nu = C12 / (C11 + C12) (from lambda = C12, mu = C66 =
 * (C11 - C12)/2 of the basal plane; isotropic elasticity, Hirth & Lothe 1982 ch. 2), and not with the material's
 * averaged nu. Checked by the traction on both foil surfaces, Hooke's law with Zn's own stiffness tensor.
 */
import { describe, expect, it } from 'vitest';
import { type Vec3, norm } from '../../src/math/vec3.js';
import { getMaterial } from '../../src/crystal/materials.js';
import { materialStiffness, stiffnessTensor } from '../../src/elasticity/stiffness.js';
import { inPlanePoissonRatio, surfaceCorrectionFor } from '../../src/elasticity/surfaceRelaxation.js';
import { buildField, type DislocationFieldSpec } from '../../src/imaging/fieldSpecs.js';

describe('hexagonal line along c, parallel to the surfaces (Zn)', () => {
  const zn = getMaterial('Zn');
  const voigt = materialStiffness(zn);
  const C = stiffnessTensor(voigt);
  const traction = (g: Float64Array, n: Vec3): number => {
    const o = [0, 0, 0];
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) for (let k = 0; k < 3; k++) for (let l = 0; l < 3; l++) o[i] += C[((i * 3 + j) * 3 + k) * 3 + l] * g[3 * k + l] * n[j];
    return Math.hypot(o[0], o[1], o[2]);
  };
  // Cartesian frame of the library: c along z. Foil normal x, line along z (c), b = a along y (edge across the line)
  const n: Vec3 = [1, 0, 0];
  const u: Vec3 = [0, 0, 1];
  const b: Vec3 = [0, 0.2665, 0];
  const t = 60;
  const P: Vec3 = [15, 0, 0];
  it('the basal plane-strain nu is C12 / (C11 + C12)', () => {
    // Voigt order C11, C12, C13, C22, ... as materialStiffness gives it: C11 = voigt[0], C12 = voigt[1]
    expect(inPlanePoissonRatio(voigt, u, n)).toBeCloseTo(voigt[1] / (voigt[0] + voigt[1]), 12);
  });
  it('the relaxed field frees both surfaces to 1e-6 of the largest unrelaxed traction (the averaged nu left about 25 %)', () => {
    const corr = surfaceCorrectionFor(b, u, P, n, t, voigt);
    expect(corr?.kind).toBe('parallel-edge-plate');
    const spec: DislocationFieldSpec = { kind: 'dislocation', b_nm: b, line: u, point_nm: P, poissonRatio: zn.elastic.poissonRatio, cutDirection: n, coreRadius_nm: 0.05, stiffness_GPa: voigt };
    const line = buildField([spec])!;
    const relaxed = buildField([{ ...spec, surfaceCorrection: corr! }])!;
    const g = new Float64Array(9);
    let worst = 0;
    let largest = 0;
    for (const x of [0, t]) {
      for (const y of [-200, -40, -10, -2, 0, 3, 12, 50, 300]) {
        line.gradient(g, x, y, 0.3);
        largest = Math.max(largest, traction(g, n));
        relaxed.gradient(g, x, y, 0.3);
        worst = Math.max(worst, traction(g, n));
      }
    }
    expect(norm(b)).toBeGreaterThan(0);
    expect(largest).toBeGreaterThan(0);
    expect(worst / largest).toBeLessThan(1e-6);
  });
});
