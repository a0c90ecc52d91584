import { describe, expect, it } from 'vitest';
import { structureFactor_A, structureFactorInto } from '../../src/scattering/structureFactor.js';
import { electronScatteringFactor_A } from '../../src/scattering/scatteringFactor.js';
import { cellVolume_nm3, makeLattice } from '../../src/crystal/lattice.js';
import type { Material } from '../../src/crystal/material.js';
import type { Vec3 } from '../../src/math/vec3.js';
import { InputError } from '../../src/errors.js';
import { needPython, pythonJson } from '../python.js';
import { b2, bcc, diamond, fcc, hcp, material, zincblende } from './structures.js';

// Room-temperature lattice parameters and B values are rough (from memory); the
// comparison with gemmi is exact for whatever values are used.
const crystals: Material[] = [
  fcc('Cu', 0.36149, 0.55),
  bcc('Fe', 0.28665, 0.35),
  diamond('Si', 0.54310, 0.46),
  zincblende('Ga', 'As', 0.56533, 0.6, 0.55), // no centre of symmetry: F_g is complex
  hcp('Mg', 0.32094, 0.52107, 1.5),
  b2('Ni', 'Al', 0.2887, 0.4, 0.6),
  // a random fcc alloy site: 0.7 Cu + 0.3 Ni on each fcc site, different B per species
  material('CuNi', 'fcc', makeLattice('cubic', { a: 0.3590 }), [
    ...([[0, 0, 0], [0, 0.5, 0.5], [0.5, 0, 0.5], [0.5, 0.5, 0]] as Vec3[]).flatMap((p) => [
      { element: 'Cu', position: p, occupancy: 0.7, debyeWaller_A2: 0.55 },
      { element: 'Ni', position: p, occupancy: 0.3, debyeWaller_A2: 0.4 },
    ]),
  ]),
];

const HKL: Vec3[] = [];
for (let h = -3; h <= 3; h++) for (let k = -3; k <= 3; k++) for (let l = -3; l <= 3; l++) HKL.push([h, k, l]);

describe("structure factors against gemmi's StructureFactorCalculatorE (python3-gemmi, P1 cells)", () => {
  const py = needPython('gemmi');
  it.for(crystals.map((m) => [m.name, m] as const))('%s: every hkl with |h|,|k|,|l| <= 3 to 1e-10 of the site sum', ([_name, m], ctx) => {
    py.require(ctx);
    const L = m.lattice;
    const ref = pythonJson<[number, number][]>(
      `import json, sys, math, gemmi
d = json.load(sys.stdin)
lines = ["data_t", "_cell_length_a %r" % d["a"], "_cell_length_b %r" % d["b"], "_cell_length_c %r" % d["c"],
         "_cell_angle_alpha %r" % d["al"], "_cell_angle_beta %r" % d["be"], "_cell_angle_gamma %r" % d["ga"],
         "_symmetry_space_group_name_H-M 'P 1'",
         "loop_", "_atom_site_label", "_atom_site_type_symbol", "_atom_site_fract_x", "_atom_site_fract_y",
         "_atom_site_fract_z", "_atom_site_occupancy", "_atom_site_U_iso_or_equiv"]
for i, s in enumerate(d["sites"]):
    # gemmi takes U_iso; B = 8 pi^2 U
    lines.append("%s%d %s %r %r %r %r %r" % (s["el"], i, s["el"], s["x"], s["y"], s["z"], s["occ"], s["B"] / (8 * math.pi**2)))
st = gemmi.make_small_structure_from_block(gemmi.cif.read_string("\\n".join(lines) + "\\n").sole_block())
calc = gemmi.StructureFactorCalculatorE(st.cell)
out = []
for hkl in d["hkl"]:
    f = calc.calculate_sf_from_small_structure(st, hkl)
    out.append([f.real, f.imag])
print(json.dumps(out))`,
      {
        // gemmi wants Angstrom
        a: L.a_nm * 10,
        b: L.b_nm * 10,
        c: L.c_nm * 10,
        al: L.alpha_deg,
        be: L.beta_deg,
        ga: L.gamma_deg,
        sites: m.sites.map((s) => ({ el: s.element, x: s.position[0], y: s.position[1], z: s.position[2], occ: s.occupancy, B: s.debyeWaller_A2 })),
        hkl: HKL,
      },
    );
    const out = new Float64Array(4);
    HKL.forEach((hkl, i) => {
      structureFactorInto(out, m, hkl[0], hkl[1], hkl[2]);
      const tol = 1e-10 * Math.max(out[2]!, 1);
      expect(Math.abs(out[0]! - ref[i]![0]), `${m.name} ${hkl} re`).toBeLessThan(tol);
      expect(Math.abs(out[1]! - ref[i]![1]), `${m.name} ${hkl} im`).toBeLessThan(tol);
    });
  });
});

describe('structure factor rules (textbook selection rules and Friedel law)', () => {
  it('fcc: F = 4 fe exp(-B s^2) for unmixed hkl (Cu 111), s = sqrt(3)/(2a) in 1/A', () => {
    const a = 0.36149;
    const s = Math.sqrt(3) / (2 * a * 10);
    const F = structureFactor_A(fcc('Cu', a, 0.55), [1, 1, 1]);
    expect(F.re).toBeCloseTo(4 * electronScatteringFactor_A('Cu', s) * Math.exp(-0.55 * s * s), 12);
    expect(Math.abs(F.im)).toBeLessThan(1e-12);
  });

  it('F_000 = sum of occ fe(0) (no Debye-Waller at s = 0)', () => {
    const F0 = structureFactor_A(zincblende('Ga', 'As', 0.56533, 0.6, 0.55), [0, 0, 0]);
    expect(F0.re).toBeCloseTo(4 * electronScatteringFactor_A('Ga', 0) + 4 * electronScatteringFactor_A('As', 0), 12);
    expect(F0.im).toBe(0);
  });

  it('zincblende 111 is complex and F(-g) = conj F(g) (Friedel law for real site factors)', () => {
    const m = zincblende('Ga', 'As', 0.56533, 0.6, 0.55);
    const Fp = structureFactor_A(m, [1, 1, 1]);
    const Fm = structureFactor_A(m, [-1, -1, -1]);
    expect(Math.abs(Fp.im)).toBeGreaterThan(0.1);
    expect(Fm.re).toBeCloseTo(Fp.re, 12);
    expect(Fm.im).toBeCloseTo(-Fp.im, 12);
  });

  it('uses the lattice metric: the hcp (100) s is 1/(sqrt(3) a), not 1/(2a)', () => {
    const m = hcp('Mg', 0.32094, 0.52107, 0);
    const out = structureFactorInto(new Float64Array(4), m, 1, 0, 0);
    // d_100 = a sqrt(3)/2 for a hexagonal lattice, s = 1/(2 d) in 1/A
    expect(out[3]).toBeCloseTo(1 / (Math.sqrt(3) * 3.2094), 12);
    expect(cellVolume_nm3(m.lattice)).toBeCloseTo((Math.sqrt(3) / 2) * 0.32094 ** 2 * 0.52107, 12);
  });

  it('refuses non-integer indices, unknown elements, bad occupancy and empty cells with InputError', () => {
    const cu = fcc('Cu', 0.36149, 0.55);
    expect(() => structureFactor_A(cu, [1, 0.5, 0])).toThrow(InputError);
    expect(() => structureFactor_A(fcc('Qq', 0.4, 0.5), [1, 1, 1])).toThrow(/unknown element "Qq"/);
    const bad = material('bad', 'custom', makeLattice('cubic', { a: 0.4 }), [{ element: 'Cu', position: [0, 0, 0], occupancy: 1.5, debyeWaller_A2: 0.5 }]);
    expect(() => structureFactor_A(bad, [1, 0, 0])).toThrow(/occupancy 1.5/);
    const empty = material('empty', 'custom', makeLattice('cubic', { a: 0.4 }), []);
    expect(() => structureFactor_A(empty, [1, 0, 0])).toThrow(/no atom sites/);
  });
});
