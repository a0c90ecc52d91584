/**
 * The material library (data/materials.json) and parseMaterial validation.
 * Handbook numbers quoted here are from memory (CRC Handbook of Chemistry
 * and Physics densities; lattice parameters as stated in the brief) with
 * tolerances that say so; atomic weights come from python3-gemmi
 * (gemmi.Element(...).weight, IUPAC standard atomic weights).
 */
import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/errors.js';
import { cellVolume_nm3 } from '../../src/crystal/lattice.js';
import { getMaterial, listMaterials, parseMaterial } from '../../src/crystal/materials.js';
import { structureSites } from '../../src/crystal/structures.js';
import { lazyPythonJson, needPython } from '../python.js';

const REQUIRED = [
  'Al', 'Cu', 'Ni', 'Ag', 'Au', 'Pt', 'Pd', 'Pb', 'gamma-Fe',
  'alpha-Fe', 'Mo', 'W', 'Nb', 'Ta', 'Cr', 'V',
  'Si', 'Ge', 'GaAs', 'Mg', 'Ti', 'Zn', 'Zr', 'Co', 'NiAl', 'Ni3Al', 'MgO',
]; // prettier-ignore

describe('library', () => {
  const all = listMaterials();
  it('holds at least 24 materials including every required one', () => {
    expect(all.length).toBeGreaterThanOrEqual(24);
    const names = all.map((m) => m.name);
    for (const n of REQUIRED) expect(names).toContain(n);
    expect(new Set(names.map((n) => n.toLowerCase())).size).toBe(names.length);
  });
  it('every entry has sites, positive numbers and sources for lattice, debyeWaller and elastic', () => {
    for (const m of all) {
      expect(m.sites.length).toBeGreaterThanOrEqual(1);
      expect(m.lattice.a_nm).toBeGreaterThan(0.2);
      expect(m.lattice.a_nm).toBeLessThan(0.6);
      expect(m.lattice.c_nm).toBeGreaterThan(0);
      expect(m.description.length).toBeGreaterThan(3);
      for (const s of m.sites) {
        // room-temperature B of these solids lies between about 0.1 and 2.5 A^2 (common practice)
        expect(s.debyeWaller_A2).toBeGreaterThan(0.1);
        expect(s.debyeWaller_A2).toBeLessThan(2.5);
        expect(s.occupancy).toBe(1);
      }
      expect(m.elastic.shearModulus_GPa).toBeGreaterThan(0);
      for (const key of ['lattice', 'debyeWaller', 'elastic']) {
        expect(m.sources[key], `${m.name} sources.${key}`).toMatch(/\w{3}/);
        // honesty: every number was recalled, not re-read
        expect(m.sources[key], `${m.name} sources.${key}`).toMatch(/from memory|estimate/);
      }
      if (m.stackingFaultEnergy_mJ_per_m2 !== undefined) {
        expect(m.stackingFaultEnergy_mJ_per_m2).toBeGreaterThan(0);
        expect(m.sources.stackingFault).toMatch(/from memory/);
      }
    }
  });
  it('site counts follow the structures (fcc 4, bcc 2, diamond 8, zincblende 8, hcp 2, B2 2, L1_2 4, rocksalt 8)', () => {
    const n: Record<string, number> = { fcc: 4, bcc: 2, diamond: 8, zincblende: 8, hcp: 2, B2: 2, L1_2: 4, rocksalt: 8 };
    for (const m of all) expect(m.sites.length, m.name).toBe(n[m.structure]);
    expect(getMaterial('Ni3Al').sites.filter((s) => s.element === 'Ni')).toHaveLength(3);
    expect(getMaterial('GaAs').sites.find((s) => s.element === 'Ga')?.position).toEqual([0, 0, 0]);
  });
  it('lattice parameters quoted in the brief (from memory, +-0.0005 nm)', () => {
    expect(Math.abs(getMaterial('Al').lattice.a_nm - 0.40495)).toBeLessThan(5e-4);
    expect(Math.abs(getMaterial('Cu').lattice.a_nm - 0.36149)).toBeLessThan(5e-4);
    expect(Math.abs(getMaterial('Ni').lattice.a_nm - 0.35238)).toBeLessThan(5e-4);
    expect(Math.abs(getMaterial('Si').lattice.a_nm - 0.5431)).toBeLessThan(5e-4);
  });
  it('Al elastic constants quoted in the brief (C11 108, C12 62, C44 28.3 GPa; from memory, +-2 %) and B about 0.8 A^2', () => {
    const c = getMaterial('Al').elastic.cij_GPa;
    expect(Math.abs(c.C11 / 108 - 1)).toBeLessThan(0.02);
    expect(Math.abs(c.C12 / 62 - 1)).toBeLessThan(0.02);
    expect(Math.abs(c.C44 / 28.3 - 1)).toBeLessThan(0.02);
    expect(Math.abs(getMaterial('Al').sites[0].debyeWaller_A2 - 0.8)).toBeLessThan(0.1);
  });
  it('hexagonal entries have c/a of the handbook (Mg 1.624, Ti 1.587, Zn 1.856, Zr 1.593, Co 1.623; from memory, +-0.005)', () => {
    const ca: Record<string, number> = { Mg: 1.624, Ti: 1.587, Zn: 1.856, Zr: 1.593, Co: 1.623 };
    for (const [n, r] of Object.entries(ca)) {
      const l = getMaterial(n).lattice;
      expect(l.system).toBe('hexagonal');
      expect(Math.abs(l.c_nm / l.a_nm - r)).toBeLessThan(0.005);
      expect(getMaterial(n).elastic.cij_GPa.C33).toBeGreaterThan(0);
    }
  });
  it('the gamma-Fe entry says it is approximate', () => {
    expect(getMaterial('gamma-Fe').description).toMatch(/approximate/);
  });

  // X-ray density rho = (sum of atomic weights in the cell) / (N_A V) against handbook densities
  // (CRC Handbook, room temperature; from memory, +-1.5 %: recalled values and the difference between
  // bulk and X-ray density). N_A from CODATA 2018 (exact).
  const density: Record<string, number> = {
    Al: 2.70, Cu: 8.96, Ni: 8.91, Ag: 10.49, Au: 19.3, Pt: 21.45, Pd: 12.02, Pb: 11.34,
    'alpha-Fe': 7.87, Mo: 10.22, W: 19.25, Nb: 8.57, Ta: 16.65, Cr: 7.19, V: 6.11,
    Si: 2.33, Ge: 5.32, GaAs: 5.32, Mg: 1.74, Ti: 4.51, Zn: 7.14, Zr: 6.52, Co: 8.90,
    NiAl: 5.9, Ni3Al: 7.4, MgO: 3.58,
  }; // prettier-ignore
  const elements = [...new Set(all.flatMap((m) => m.sites.map((s) => s.element)))];
  const py = needPython('gemmi');
  const weights = lazyPythonJson<Record<string, number>>(
    `
import json, sys, gemmi
print(json.dumps({e: gemmi.Element(e).weight for e in json.load(sys.stdin)}))
`,
    elements,
  );
  it('X-ray densities agree with handbook densities (+-1.5 %)', (ctx) => {
    py.require(ctx);
    const w = weights();
    const NA = 6.02214076e23;
    for (const [name, rho] of Object.entries(density)) {
      const m = getMaterial(name);
      const mass_g = m.sites.reduce((s, site) => s + site.occupancy * w[site.element], 0) / NA;
      const rhoX = mass_g / (cellVolume_nm3(m.lattice) * 1e-21);
      expect(Math.abs(rhoX / rho - 1), `${name}: ${rhoX.toFixed(3)} g/cm^3`).toBeLessThan(0.015);
    }
  });
});

describe('getMaterial', () => {
  it('is case-insensitive and returns the cached object', () => {
    expect(getMaterial('cu')).toBe(getMaterial('Cu'));
    expect(getMaterial(' NI3AL ').name).toBe('Ni3Al');
    expect(getMaterial('ALPHA-fe').name).toBe('alpha-Fe');
  });
  it('an unknown name gives an InputError naming it and pointing to `thinfoil materials`', () => {
    expect(() => getMaterial('unobtainium')).toThrow(InputError);
    expect(() => getMaterial('unobtainium')).toThrow(/"unobtainium".*thinfoil materials/);
    expect(() => getMaterial('Fe')).toThrow(/alpha-Fe/); // suggests similar names
    expect(() => getMaterial('Brass', 'scenario.material')).toThrow(/^scenario\.material: /);
  });
  it('listMaterials returns a copy', () => {
    const a = listMaterials();
    a.pop();
    expect(listMaterials().length).toBe(a.length + 1);
  });
});

describe('parseMaterial', () => {
  const good = () => ({
    name: 'MyAlloy',
    description: 'an invented fcc test alloy',
    structure: 'fcc',
    elements: ['Cu'],
    lattice: { a_nm: 0.362 },
    debyeWaller_A2: { Cu: 0.6 },
    elastic: { cij_GPa: { C11: 170, C12: 120, C44: 75 } },
    stackingFaultEnergy_mJ_per_m2: 40,
  });
  const errorOf = (obj: unknown, opts = {}) => {
    try {
      parseMaterial(obj, 'material', opts);
    } catch (e) {
      expect(e).toBeInstanceOf(InputError);
      return (e as Error).message;
    }
    throw new Error('expected an InputError');
  };
  const edit = (f: (o: Record<string, any>) => void) => {
    const o: Record<string, any> = good();
    f(o);
    return o;
  };

  it('accepts a valid inline material and computes the averages', () => {
    const m = parseMaterial(good(), 'material');
    expect(m.sites).toHaveLength(4);
    expect(m.lattice.system).toBe('cubic');
    expect(m.elastic.average).toBe('Voigt-Reuss-Hill');
    expect(m.elastic.shearModulus_GPa).toBeGreaterThan(0);
    expect(m.stackingFaultEnergy_mJ_per_m2).toBe(40);
    expect(m.sources).toEqual({});
  });
  it('a single number for debyeWaller_A2 applies to every element', () => {
    const m = parseMaterial(edit((o) => (o.debyeWaller_A2 = 0.7)), 'material');
    expect(m.sites.every((s) => s.debyeWaller_A2 === 0.7)).toBe(true);
  });
  it('names the JSON path of the bad field', () => {
    expect(errorOf(edit((o) => (o.lattice.a_nm = -1)))).toMatch(/^material\.lattice\.a_nm: must be a positive number \(nm\)/);
    expect(errorOf(edit((o) => (o.lattice.a_nm = 3.62)))).toMatch(/^material\.lattice\.a_nm: .*Angstrom/);
    expect(errorOf(edit((o) => (o.lattice.a_nm = '0.36')))).toMatch(/^material\.lattice\.a_nm: /);
    expect(errorOf(edit((o) => (o.lattice.c_nm = 0.5)))).toMatch(/^material\.lattice\.c_nm: is not a known field/);
    expect(errorOf(edit((o) => (o.structure = 'bct')))).toMatch(/^material\.structure: must be one of fcc, bcc/);
    expect(errorOf(edit((o) => (o.elements = ['Cu', 'Ni'])))).toMatch(/^material\.elements: must list 1 element/);
    expect(errorOf(edit((o) => (o.elements = ['copper'])))).toMatch(/^material\.elements\[0\]: must be an element symbol/);
    expect(errorOf(edit((o) => (o.debyeWaller_A2 = { Ni: 0.5 })))).toMatch(/^material\.debyeWaller_A2\.Ni: no site holds/);
    expect(errorOf(edit((o) => (o.debyeWaller_A2 = {})))).toMatch(/^material\.debyeWaller_A2\.Cu: is missing/);
    expect(errorOf(edit((o) => (o.debyeWaller_A2 = { Cu: -0.1 })))).toMatch(/^material\.debyeWaller_A2\.Cu: must be a number >= 0/);
    expect(errorOf(edit((o) => delete o.elastic.cij_GPa.C44))).toMatch(/^material\.elastic\.cij_GPa\.C44: must be a number in GPa/);
    expect(errorOf(edit((o) => (o.elastic.cij_GPa.C33 = 100)))).toMatch(/^material\.elastic\.cij_GPa\.C33: is not a known field/);
    expect(errorOf(edit((o) => (o.elastic.cij_GPa.C12 = 200)))).toMatch(/^material\.elastic\.cij_GPa: .*not mechanically stable/);
    expect(errorOf(edit((o) => (o.elastic.shearModulus_GPa = 40)))).toMatch(/^material\.elastic\.shearModulus_GPa: is not a known field/);
    expect(errorOf(edit((o) => (o.stackingFaultEnergy_mJ_per_m2 = -5)))).toMatch(/^material\.stackingFaultEnergy_mJ_per_m2: /);
    expect(errorOf(edit((o) => (o.colour = 'red')))).toMatch(/^material\.colour: is not a known field/);
    expect(errorOf(edit((o) => delete o.name))).toMatch(/^material\.name: must be a non-empty string/);
    expect(errorOf(null)).toMatch(/^material: must be an object/);
    expect(errorOf(edit((o) => (o.sources = { lattice: 'x' })), { requireSources: true })).toMatch(/^material\.sources\.debyeWaller: is missing/);
  });
  it('hexagonal materials need c_nm and C13, C33', () => {
    const hex = {
      name: 'MyHcp',
      structure: 'hcp',
      elements: ['Mg'],
      lattice: { a_nm: 0.32, c_nm: 0.52 },
      debyeWaller_A2: 1.5,
      elastic: { cij_GPa: { C11: 59, C12: 26, C13: 21, C33: 62, C44: 16 } },
    };
    expect(parseMaterial(hex, 'material').lattice.gamma_deg).toBe(120);
    expect(errorOf({ ...hex, lattice: { a_nm: 0.32 } })).toMatch(/^material\.lattice\.c_nm: must be a positive number/);
    expect(errorOf({ ...hex, elastic: { cij_GPa: { C11: 59, C12: 26, C44: 16 } } })).toMatch(/^material\.elastic\.cij_GPa\.C13: /);
    expect(errorOf({ ...hex, lattice: { a_nm: 0.32, c_nm: 0.52, system: 'cubic' } })).toMatch(/^material\.lattice\.system: must be hexagonal/);
  });
  it('a custom structure with explicit sites reproduces the fcc template', () => {
    const fcc = structureSites('fcc', ['Cu'], { Cu: 0.6 });
    const custom = parseMaterial(
      {
        name: 'MyCustom',
        structure: 'custom',
        lattice: { system: 'cubic', a_nm: 0.362 },
        sites: fcc.map((s) => ({ element: 'Cu', position: [...s.position] })),
        debyeWaller_A2: { Cu: 0.6 },
        elastic: { cij_GPa: { C11: 170, C12: 120, C44: 75 } },
      },
      'scenario.material',
    );
    expect(custom.sites).toEqual(fcc);
    expect(
      errorOf({
        name: 'X',
        structure: 'custom',
        lattice: { system: 'cubic', a_nm: 0.3 },
        sites: [{ element: 'Cu', position: [0, 0, 1.5] }],
        debyeWaller_A2: 0.5,
        elastic: { cij_GPa: { C11: 170, C12: 120, C44: 75 } },
      }),
    ).toMatch(/^material\.sites\[0\]\.position: /);
    expect(
      errorOf({
        name: 'X',
        structure: 'custom',
        lattice: { system: 'cubic', a_nm: 0.3 },
        sites: [{ element: 'Cu', position: [0, 0, 0] }],
        elastic: { cij_GPa: { C11: 170, C12: 120, C44: 75 } },
      }),
    ).toMatch(/^material\.debyeWaller_A2: /);
  });
  it('every library entry survives a JSON round trip through parseMaterial with sources required', () => {
    for (const m of listMaterials()) {
      const entry = {
        name: m.name,
        description: m.description,
        structure: m.structure,
        elements: [...new Set(m.sites.map((s) => s.element))], // templates list sublattice 0 first
        lattice: m.lattice.system === 'hexagonal' ? { a_nm: m.lattice.a_nm, c_nm: m.lattice.c_nm } : { a_nm: m.lattice.a_nm },
        debyeWaller_A2: Object.fromEntries(m.sites.map((s) => [s.element, s.debyeWaller_A2])),
        elastic: { cij_GPa: m.elastic.cij_GPa },
        sources: m.sources,
      };
      const again = parseMaterial(JSON.parse(JSON.stringify(entry)), `materials.${m.name}`, { requireSources: true });
      expect(again.sites).toEqual(m.sites);
      expect(again.elastic).toEqual(m.elastic);
    }
  });
});
