import { describe, expect, it } from 'vitest';
import { braggAngle_rad, relativisticGamma, wavelength_nm } from '../../src/scattering/wavelength.js';
import { InputError } from '../../src/errors.js';
import { needPython, pythonJson } from '../python.js';

// CODATA 2018 values written out here, independently of src/scattering/constants.ts
// (NIST reference on constants: h, c, e exact; m_e recommended).
const h = 6.62607015e-34; // J s
const c = 299792458; // m/s
const e = 1.602176634e-19; // C
const me = 9.1093837015e-31; // kg

function referenceWavelength_nm(kV: number): number {
  // lambda = h / sqrt(2 m0 e E (1 + e E / (2 m0 c^2))), physics.md section 1
  const E = kV * 1e3;
  return (h / Math.sqrt(2 * me * e * E * (1 + (e * E) / (2 * me * c * c)))) * 1e9;
}

describe('relativistic electron wavelength', () => {
  it.each([
    [100, 3.7014],
    [200, 2.5079],
    [300, 1.9687],
  ])('%d kV -> %f pm (CODATA 2018 via NIST, quoted in physics.md)', (kV, pm) => {
    // the published values have 5 significant figures: relative 1e-4
    expect(Math.abs(wavelength_nm(kV) * 1e3 - pm) / pm).toBeLessThan(1e-4);
  });

  it('matches the formula evaluated here with CODATA 2018 constants written out (relative 1e-12)', () => {
    for (const kV of [10, 60, 80, 100, 120, 200, 300, 400, 1000, 3000]) {
      const ref = referenceWavelength_nm(kV);
      expect(Math.abs(wavelength_nm(kV) - ref) / ref).toBeLessThan(1e-12);
    }
  });

  it('gamma = 1 + eE/(m0 c^2): 1.19569511 at 100 kV, 1.39139023 at 200 kV (m0 c^2 = 510.99895 keV, CODATA 2018)', () => {
    expect(relativisticGamma(100)).toBeCloseTo(1 + 100 / 510.99895, 8);
    expect(relativisticGamma(200)).toBeCloseTo(1 + 200 / 510.99895, 8);
  });

  it('Bragg angle: sin(thetaB) = lambda g / 2; Al 111 at 200 kV is 5.36 mrad (lambda/(2d) with a = 0.40495 nm)', () => {
    const lambda = wavelength_nm(200);
    const g = Math.sqrt(3) / 0.40495; // Al 111, a = 0.40495 nm
    const th = braggAngle_rad(lambda, g);
    expect(Math.sin(th)).toBeCloseTo((lambda * g) / 2, 14);
    expect(th).toBeGreaterThan(0.0053);
    expect(th).toBeLessThan(0.0054);
  });

  it('refuses voltages outside 10..3000 kV and Bragg angles that do not exist', () => {
    expect(() => wavelength_nm(5)).toThrow(InputError);
    expect(() => wavelength_nm(3001)).toThrow(/voltage_kV between 10 and 3000/);
    expect(() => relativisticGamma(Number.NaN)).toThrow(InputError);
    expect(() => braggAngle_rad(0.1, 30)).toThrow(InputError);
  });
});

describe('wavelength against scipy.constants (python3-scipy, CODATA 2018)', () => {
  const py = needPython('scipy');
  it('agrees to relative 1e-12 from 10 to 3000 kV', (ctx) => {
    py.require(ctx);
    const kVs = [10, 100, 200, 300, 1000, 3000];
    const ref = pythonJson<{ codata: string; lambda_nm: number[] }>(
      `import json, sys, math
from scipy import constants as C
kvs = json.load(sys.stdin)
out = []
for kv in kvs:
    E = kv * 1e3
    out.append(C.h / math.sqrt(2 * C.m_e * C.e * E * (1 + C.e * E / (2 * C.m_e * C.c**2))) * 1e9)
print(json.dumps({"codata": str(C.m_e), "lambda_nm": out}))`,
      kVs,
    );
    // scipy >= 1.4 ships CODATA 2018, where m_e = 9.1093837015e-31 kg
    expect(ref.codata).toBe('9.1093837015e-31');
    kVs.forEach((kV, i) => expect(Math.abs(wavelength_nm(kV) / ref.lambda_nm[i]! - 1)).toBeLessThan(1e-12));
  });
});
