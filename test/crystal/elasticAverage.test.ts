/**
 * Voigt-Reuss-Hill averages (Hill 1952, Proc. Phys. Soc. A65, 349) against
 * hand calculations, the isotropic limit, handbook polycrystal values, and
 * an independent implementation with numpy (python3-numpy: 6x6 stiffness
 * inverted with numpy.linalg.inv).
 */
import { describe, expect, it } from 'vitest';
import {
  cubicAnisotropy,
  invertMatrix,
  isPositiveDefinite,
  poissonFromBulkShear,
  stiffnessMatrix,
  voigtReussHill,
} from '../../src/crystal/elasticAverage.js';
import { getMaterial, listMaterials } from '../../src/crystal/materials.js';
import { lazyPythonJson, needPython } from '../python.js';

describe('cubic Voigt-Reuss-Hill, hand calculation for Cu (C11 168.4, C12 121.4, C44 75.4 GPa)', () => {
  const cu = { C11: 168.4, C12: 121.4, C44: 75.4 };
  const r = voigtReussHill(cu, 'cubic');
  it('Voigt G_V = (C11 - C12 + 3 C44)/5 = (47.0 + 226.2)/5 = 54.64 GPa', () => {
    expect(r.voigt.shearModulus_GPa).toBeCloseTo(54.64, 10);
  });
  it('Reuss G_R = 5 (C11 - C12) C44 / (4 C44 + 3 (C11 - C12)) = 17719 / 442.6 = 40.0339 GPa', () => {
    expect(r.reuss.shearModulus_GPa).toBeCloseTo(40.0339, 4);
  });
  it('Hill G = (54.64 + 40.0339)/2 = 47.337 GPa; K = (C11 + 2 C12)/3 = 137.067 GPa', () => {
    expect(r.shearModulus_GPa).toBeCloseTo(47.337, 3);
    expect(r.bulkModulus_GPa).toBeCloseTo(137.067, 3);
    expect(r.voigt.bulkModulus_GPa).toBeCloseTo(r.reuss.bulkModulus_GPa, 10); // cubic: K_V = K_R
  });
  it('nu = (3K - 2G) / (2 (3K + G)) = 316.526 / 917.074 = 0.34515', () => {
    expect(r.poissonRatio).toBeCloseTo(0.34515, 4);
  });
  it('close to handbook polycrystalline Cu (G about 48 GPa, nu about 0.34; from memory, +-5 % / +-0.02)', () => {
    expect(Math.abs(r.shearModulus_GPa - 48) / 48).toBeLessThan(0.05);
    expect(Math.abs(r.poissonRatio - 0.34)).toBeLessThan(0.02);
  });
  it('the library Cu gives the same numbers, computed at load time', () => {
    const m = getMaterial('Cu').elastic;
    expect(m.average).toBe('Voigt-Reuss-Hill');
    expect(m.shearModulus_GPa).toBeCloseTo(47.337, 3);
    expect(m.poissonRatio).toBeCloseTo(0.34515, 4);
  });
});

describe('isotropic limit C11 - C12 = 2 C44', () => {
  it('cubic: G = C44 exactly, nu = 2/7 for C11 200, C12 80, C44 60', () => {
    // isotropic Lame form: C12 = lambda, C44 = mu, K = lambda + 2 mu / 3 = 120, nu = lambda / (2 (lambda + mu)) = 80 / 280
    const r = voigtReussHill({ C11: 200, C12: 80, C44: 60 }, 'cubic');
    expect(r.voigt.shearModulus_GPa).toBeCloseTo(60, 12);
    expect(r.reuss.shearModulus_GPa).toBeCloseTo(60, 12);
    expect(r.shearModulus_GPa).toBeCloseTo(60, 12);
    expect(r.bulkModulus_GPa).toBeCloseTo(120, 12);
    expect(r.poissonRatio).toBeCloseTo(2 / 7, 12);
    expect(cubicAnisotropy({ C11: 200, C12: 80, C44: 60 })).toBe(1);
  });
  it('hexagonal with C11 = C33, C12 = C13, C44 = (C11 - C12)/2: G = C44, nu = 2/7', () => {
    const r = voigtReussHill({ C11: 200, C12: 80, C13: 80, C33: 200, C44: 60 }, 'hexagonal');
    expect(r.shearModulus_GPa).toBeCloseTo(60, 10);
    expect(r.reuss.shearModulus_GPa).toBeCloseTo(60, 10);
    expect(r.poissonRatio).toBeCloseTo(2 / 7, 10);
  });
});

describe('handbook checks (from memory)', () => {
  it('Al: nu about 0.35 (handbook polycrystal 0.345, +-0.03) and G about 26 GPa (+-2)', () => {
    const al = getMaterial('Al').elastic;
    expect(Math.abs(al.poissonRatio - 0.35)).toBeLessThan(0.03);
    expect(Math.abs(al.shearModulus_GPa - 26)).toBeLessThan(2);
  });
  it('W is almost isotropic: A = 2 C44/(C11 - C12) = 1.01 (Hirth & Lothe 1982, from memory, +-0.03)', () => {
    expect(Math.abs(cubicAnisotropy(getMaterial('W').elastic.cij_GPa) - 1.01)).toBeLessThan(0.03);
  });
  it('Cu A = 3.2 (Hirth & Lothe 1982, from memory, +-0.1); Al A = 1.2 (+-0.05)', () => {
    expect(Math.abs(cubicAnisotropy(getMaterial('Cu').elastic.cij_GPa) - 3.2)).toBeLessThan(0.1);
    expect(Math.abs(cubicAnisotropy(getMaterial('Al').elastic.cij_GPa) - 1.22)).toBeLessThan(0.05);
  });
  it('Mg: G about 17 GPa, nu about 0.29; Ti: G about 44 GPa, nu about 0.32 (handbook polycrystals, from memory, +-10 % / +-0.03)', () => {
    const mg = getMaterial('Mg').elastic;
    const ti = getMaterial('Ti').elastic;
    expect(Math.abs(mg.shearModulus_GPa - 17) / 17).toBeLessThan(0.1);
    expect(Math.abs(mg.poissonRatio - 0.29)).toBeLessThan(0.03);
    expect(Math.abs(ti.shearModulus_GPa - 44) / 44).toBeLessThan(0.1);
    expect(Math.abs(ti.poissonRatio - 0.32)).toBeLessThan(0.03);
  });
  it('Voigt >= Hill >= Reuss for every library material (Hill 1952)', () => {
    for (const m of listMaterials()) {
      const r = voigtReussHill(m.elastic.cij_GPa, m.lattice.system as 'cubic' | 'hexagonal');
      expect(r.voigt.shearModulus_GPa).toBeGreaterThanOrEqual(r.reuss.shearModulus_GPa - 1e-9);
      expect(r.voigt.bulkModulus_GPa).toBeGreaterThanOrEqual(r.reuss.bulkModulus_GPa - 1e-9);
      expect(m.elastic.poissonRatio).toBeGreaterThan(0);
      expect(m.elastic.poissonRatio).toBeLessThan(0.5);
    }
  });
});

describe('matrix helpers', () => {
  it('stiffness x compliance = I; C66 = (C11 - C12)/2 for hexagonal', () => {
    const C = stiffnessMatrix({ C11: 59.4, C12: 25.6, C13: 21.4, C33: 61.6, C44: 16.4 }, 'hexagonal');
    expect(C[5][5]).toBeCloseTo(16.9, 12);
    const S = invertMatrix(C);
    for (let i = 0; i < 6; i++) for (let j = 0; j < 6; j++) expect(C[i].reduce((s, c, k) => s + c * S[k][j], 0)).toBeCloseTo(i === j ? 1 : 0, 12);
  });
  it('unstable constants are refused (C12 > C11: Born criterion C11 - C12 > 0)', () => {
    expect(isPositiveDefinite(stiffnessMatrix({ C11: 100, C12: 120, C44: 50 }, 'cubic'))).toBe(false);
    expect(() => voigtReussHill({ C11: 100, C12: 120, C44: 50 }, 'cubic')).toThrow(RangeError);
    expect(() => voigtReussHill({ C11: 100, C12: 50, C44: -1 }, 'cubic')).toThrow(RangeError);
  });
  it('poissonFromBulkShear: K = 5/3 G gives nu = 0.25 (isotropic elasticity, Landau & Lifshitz)', () => {
    expect(poissonFromBulkShear(5, 3)).toBeCloseTo(0.25, 12);
  });
});

describe('independent implementation with python3-numpy', () => {
  const mats = listMaterials().map((m) => ({ name: m.name, system: m.lattice.system, c: m.elastic.cij_GPa }));
  const py = needPython('numpy');
  const ref = lazyPythonJson<Record<string, { KV: number; GV: number; KR: number; GR: number; nu: number }>>(
    `
import json, sys
import numpy as np
out = {}
for m in json.load(sys.stdin):
    c = m['c']
    C = np.zeros((6, 6))
    if m['system'] == 'cubic':
        C[:3, :3] = c['C12']; np.fill_diagonal(C[:3, :3], c['C11'])
        C[3, 3] = C[4, 4] = C[5, 5] = c['C44']
    else:
        C[0, 0] = C[1, 1] = c['C11']; C[0, 1] = C[1, 0] = c['C12']
        C[0, 2] = C[2, 0] = C[1, 2] = C[2, 1] = c['C13']; C[2, 2] = c['C33']
        C[3, 3] = C[4, 4] = c['C44']; C[5, 5] = (c['C11'] - c['C12']) / 2
    S = np.linalg.inv(C)
    KV = (C[0,0] + C[1,1] + C[2,2] + 2 * (C[0,1] + C[1,2] + C[0,2])) / 9
    GV = (C[0,0] + C[1,1] + C[2,2] - (C[0,1] + C[1,2] + C[0,2]) + 3 * (C[3,3] + C[4,4] + C[5,5])) / 15
    KR = 1 / (S[0,0] + S[1,1] + S[2,2] + 2 * (S[0,1] + S[1,2] + S[0,2]))
    GR = 15 / (4 * (S[0,0] + S[1,1] + S[2,2]) - 4 * (S[0,1] + S[1,2] + S[0,2]) + 3 * (S[3,3] + S[4,4] + S[5,5]))
    K = (KV + KR) / 2; G = (GV + GR) / 2
    out[m['name']] = {'KV': KV, 'GV': GV, 'KR': KR, 'GR': GR, 'nu': (3 * K - 2 * G) / (2 * (3 * K + G))}
print(json.dumps(out))
`,
    mats,
  );
  it('Voigt, Reuss and Hill moduli of every library material agree to 1e-9 relative', (ctx) => {
    py.require(ctx);
    const r = ref();
    for (const m of listMaterials()) {
      const v = voigtReussHill(m.elastic.cij_GPa, m.lattice.system as 'cubic' | 'hexagonal');
      const p = r[m.name];
      expect(v.voigt.bulkModulus_GPa / p.KV).toBeCloseTo(1, 9);
      expect(v.voigt.shearModulus_GPa / p.GV).toBeCloseTo(1, 9);
      expect(v.reuss.bulkModulus_GPa / p.KR).toBeCloseTo(1, 9);
      expect(v.reuss.shearModulus_GPa / p.GR).toBeCloseTo(1, 9);
      expect(m.elastic.poissonRatio).toBeCloseTo(p.nu, 9);
    }
  });
});
