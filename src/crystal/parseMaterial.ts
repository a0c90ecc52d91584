/**
 * Validation of a material given as a plain object (a library entry in
 * data/materials.json or a material written inline in a scenario). Every
 * error is an InputError whose message starts with the JSON path of the bad
 * field, e.g. "material.lattice.a_nm: must be a positive number (nm) ...".
 *
 * Fields: name, description?, structure (a template label or "custom"),
 * elements (templates: one per sublattice), sites (custom only), lattice
 * {a_nm, c_nm (hexagonal), system (custom only)}, debyeWaller_A2 (number or
 * {element: B}), elastic {cij_GPa {C11, C12, C44 | C11, C12, C13, C33, C44}},
 * stackingFaultEnergy_mJ_per_m2?, sources?.
 * The isotropic shear modulus and Poisson ratio are computed here from the
 * Cij by the Voigt-Reuss-Hill average; they are not read from the input.
 */
import { InputError } from '../errors.js';
import { fail, isObject, suggestKey } from '../scenario/check.js';
import type { Vec3 } from '../math/vec3.js';
import { type Lattice, makeLattice } from './lattice.js';
import type { ElasticConstants, Elasticity, Material, Site } from './material.js';
import { type ElasticSymmetry, voigtReussHill } from './elasticAverage.js';
import { STRUCTURE_LABELS, type StructureLabel, isStructureLabel, structureSites, structureTemplate } from './structures.js';

export interface ParseMaterialOptions {
  /** Library entries must name sources for lattice, debyeWaller and elastic. */
  readonly requireSources?: boolean;
}

type Obj = Record<string, unknown>;

const TOP_KEYS = [
  'name',
  'description',
  'structure',
  'elements',
  'sites',
  'lattice',
  'debyeWaller_A2',
  'elastic',
  'stackingFaultEnergy_mJ_per_m2',
  'sources',
];
const CIJ_KEYS: Readonly<Record<ElasticSymmetry, readonly string[]>> = {
  cubic: ['C11', 'C12', 'C44'],
  hexagonal: ['C11', 'C12', 'C13', 'C33', 'C44'],
};
const ELEMENT = /^[A-Z][a-z]{0,2}$/;
const ELEMENT_EXAMPLES: Readonly<Record<StructureLabel, readonly string[]>> = {
  fcc: ['Cu'],
  bcc: ['Fe'],
  diamond: ['Si'],
  zincblende: ['Ga', 'As'],
  hcp: ['Mg'],
  B2: ['Ni', 'Al'],
  L1_2: ['Ni', 'Al'],
  rocksalt: ['Mg', 'O'],
};


function object(v: unknown, path: string, what: string): Obj {
  return isObject(v) ? v : fail(path, `must be an object (${what}).`);
}

function onlyKeys(o: Obj, path: string, allowed: readonly string[]): void {
  for (const k of Object.keys(o)) {
    if (!allowed.includes(k)) {
      const near = suggestKey(k, allowed);
      fail(`${path}.${k}`, `is not a known field here; ${near ? `did you mean "${near}"?` : `allowed fields: ${allowed.join(', ')}.`}`);
    }
  }
}

function text(v: unknown, path: string, example: string): string {
  return typeof v === 'string' && v.trim() !== '' ? v.trim() : fail(path, `must be a non-empty string, e.g. ${example}.`);
}

interface NumberRule {
  readonly min: number;
  readonly minOpen?: boolean;
  readonly max: number;
  readonly unit: string;
  readonly example: string;
  readonly hint?: string;
}

function num(v: unknown, path: string, rule: NumberRule): number {
  const ok = typeof v === 'number' && Number.isFinite(v) && (rule.minOpen ? v > rule.min : v >= rule.min) && v <= rule.max;
  if (ok) return v as number;
  const kind = rule.minOpen && rule.min === 0 ? 'a positive number' : `a number >= ${rule.min}`;
  return fail(path, `must be ${kind} (${rule.unit}) no larger than ${rule.max}${rule.hint ?? ''}, e.g. ${rule.example}.`);
}

function element(v: unknown, path: string): string {
  return typeof v === 'string' && ELEMENT.test(v) ? v : fail(path, 'must be an element symbol such as "Cu" or "Ga".');
}

function parseStructure(v: unknown, path: string): StructureLabel | 'custom' {
  if (typeof v === 'string' && (isStructureLabel(v) || v === 'custom')) return v;
  return fail(path, `must be one of ${[...STRUCTURE_LABELS, 'custom'].join(', ')}.`);
}

const ANGSTROM_HINT = ' (divide Angstrom by 10)';

function parseLattice(v: unknown, path: string, structure: StructureLabel | 'custom'): Lattice {
  const o = object(v, path, 'lattice parameters in nm, e.g. {"a_nm": 0.40495}');
  const template = structure === 'custom' ? null : structureTemplate(structure);
  const system = template ? template.system : parseSystem(o.system, `${path}.system`);
  if (template && o.system !== undefined && o.system !== system) {
    fail(`${path}.system`, `must be ${system} for structure ${structure} (or be left out).`);
  }
  onlyKeys(o, path, system === 'hexagonal' ? ['system', 'a_nm', 'c_nm'] : ['system', 'a_nm']);
  // a template cell is a few tenths of a nm; a larger value usually means Angstrom were given
  const maxA = template ? 1.5 : 5;
  const a = num(o.a_nm, `${path}.a_nm`, { min: 0, minOpen: true, max: maxA, unit: 'nm', example: '0.40495 for Al', hint: ANGSTROM_HINT });
  if (system === 'cubic') return makeLattice('cubic', { a });
  const c = num(o.c_nm, `${path}.c_nm`, { min: 0, minOpen: true, max: 2 * maxA, unit: 'nm', example: '0.52108 for Mg', hint: ANGSTROM_HINT });
  return makeLattice('hexagonal', { a, c });
}

function parseSystem(v: unknown, path: string): 'cubic' | 'hexagonal' {
  return v === 'cubic' || v === 'hexagonal' ? v : fail(path, 'must be "cubic" or "hexagonal" for a custom structure.');
}

const B_RULE = { min: 0, max: 20, unit: 'Angstrom^2', example: '0.55 for Cu at room temperature' };

/** B per element; `allowed` are the elements on sites, `required` those that need a value from here. */
function parseDebyeWaller(v: unknown, path: string, allowed: readonly string[], required: readonly string[]): Record<string, number> {
  const out: Record<string, number> = {};
  if (typeof v === 'number') {
    const B = num(v, path, B_RULE);
    for (const e of allowed) out[e] = B;
    return out;
  }
  const o = object(v, path, 'Debye-Waller factor B in Angstrom^2 per element, e.g. {"Cu": 0.55}');
  for (const k of Object.keys(o)) {
    if (!allowed.includes(k)) fail(`${path}.${k}`, `no site holds element ${k}; give B for ${allowed.join(', ')} only.`);
    out[k] = num(o[k], `${path}.${k}`, B_RULE);
  }
  for (const e of required) if (out[e] === undefined) fail(`${path}.${e}`, `is missing; give the Debye-Waller factor B of ${e} in Angstrom^2.`);
  return out;
}

function parseTemplateSites(o: Obj, path: string, structure: StructureLabel): Site[] {
  const t = structureTemplate(structure);
  const example = JSON.stringify(ELEMENT_EXAMPLES[structure]);
  const ev = o.elements;
  if (!Array.isArray(ev) || ev.length !== t.roles.length) {
    fail(`${path}.elements`, `must list ${t.roles.length} element(s) for ${structure} (${t.roles.join(', ')}), e.g. ${example}.`);
  }
  const elements = (ev as unknown[]).map((e, i) => element(e, `${path}.elements[${i}]`));
  if (o.sites !== undefined) fail(`${path}.sites`, `is only used with structure "custom"; ${structure} builds its sites from elements.`);
  const unique = [...new Set(elements)];
  const B = parseDebyeWaller(o.debyeWaller_A2, `${path}.debyeWaller_A2`, unique, unique);
  return structureSites(structure, elements, B);
}

function parseCustomSites(o: Obj, path: string): Site[] {
  if (o.elements !== undefined) fail(`${path}.elements`, 'is not used with structure "custom"; give each site its element in sites.');
  const sv = o.sites;
  if (!Array.isArray(sv) || sv.length === 0) {
    fail(`${path}.sites`, 'must be a non-empty list of {"element", "position": [x, y, z], "occupancy"?, "debyeWaller_A2"?}.');
  }
  const raw = (sv as unknown[]).map((s, i) => {
    const p = `${path}.sites[${i}]`;
    const so = object(s, p, 'one atom site');
    onlyKeys(so, p, ['element', 'position', 'occupancy', 'debyeWaller_A2']);
    const pos = so.position;
    if (!Array.isArray(pos) || pos.length !== 3 || !pos.every((x) => typeof x === 'number' && Number.isFinite(x) && x >= 0 && x < 1)) {
      fail(`${p}.position`, 'must be three fractional coordinates in [0, 1), e.g. [0.5, 0.5, 0].');
    }
    const occupancy =
      so.occupancy === undefined ? 1 : num(so.occupancy, `${p}.occupancy`, { min: 0, minOpen: true, max: 1, unit: 'fraction', example: '1' });
    const B = so.debyeWaller_A2 === undefined ? undefined : num(so.debyeWaller_A2, `${p}.debyeWaller_A2`, B_RULE);
    return { element: element(so.element, `${p}.element`), position: [...pos] as unknown as Vec3, occupancy, B };
  });
  const needMap = [...new Set(raw.filter((s) => s.B === undefined).map((s) => s.element))];
  const map =
    o.debyeWaller_A2 === undefined && needMap.length === 0
      ? {}
      : parseDebyeWaller(o.debyeWaller_A2, `${path}.debyeWaller_A2`, [...new Set(raw.map((s) => s.element))], needMap);
  return raw.map((s) => ({ element: s.element, position: s.position, occupancy: s.occupancy, debyeWaller_A2: s.B ?? map[s.element] }));
}

function parseElastic(v: unknown, path: string, symmetry: ElasticSymmetry): Elasticity {
  const o = object(v, path, 'elastic constants, e.g. {"cij_GPa": {"C11": 108.2, "C12": 61.3, "C44": 28.5}}');
  onlyKeys(o, path, ['cij_GPa']);
  const keys = CIJ_KEYS[symmetry];
  const c = object(o.cij_GPa, `${path}.cij_GPa`, `stiffness constants in GPa: ${keys.join(', ')}`);
  onlyKeys(c, `${path}.cij_GPa`, keys);
  const cij: Record<string, number> = {};
  for (const k of keys) {
    const val = c[k];
    if (typeof val !== 'number' || !Number.isFinite(val) || Math.abs(val) > 5000) {
      fail(`${path}.cij_GPa.${k}`, `must be a number in GPa (a ${symmetry} crystal needs ${keys.join(', ')}).`);
    }
    cij[k] = val as number;
  }
  const constants = cij as unknown as ElasticConstants;
  let avg;
  try {
    avg = voigtReussHill(constants, symmetry);
  } catch {
    return fail(`${path}.cij_GPa`, 'these constants are not mechanically stable (the stiffness matrix must be positive definite); check values and units (GPa).');
  }
  return { cij_GPa: constants, shearModulus_GPa: avg.shearModulus_GPa, poissonRatio: avg.poissonRatio, average: 'Voigt-Reuss-Hill' };
}

function parseSources(v: unknown, path: string, required: boolean): Record<string, string> {
  if (v === undefined && !required) return {};
  const o = object(v, path, 'the source of each group of numbers, e.g. {"lattice": "...", "debyeWaller": "...", "elastic": "..."}');
  const out: Record<string, string> = {};
  for (const k of Object.keys(o)) out[k] = text(o[k], `${path}.${k}`, '"Hirth & Lothe 1982, Table 13-1"');
  if (required) for (const k of ['lattice', 'debyeWaller', 'elastic']) if (out[k] === undefined) fail(`${path}.${k}`, 'is missing; name the source of these numbers.');
  return out;
}

/** Validate a material object; `path` is the JSON path used in error messages, e.g. "material". */
export function parseMaterial(obj: unknown, path: string, options: ParseMaterialOptions = {}): Material {
  const o = object(obj, path, 'a material with name, structure, elements, lattice, debyeWaller_A2, elastic');
  onlyKeys(o, path, TOP_KEYS);
  const name = text(o.name, `${path}.name`, '"Cu"');
  const structure = parseStructure(o.structure, `${path}.structure`);
  const lattice = parseLattice(o.lattice, `${path}.lattice`, structure);
  const sites = structure === 'custom' ? parseCustomSites(o, path) : parseTemplateSites(o, path, structure);
  const elastic = parseElastic(o.elastic, `${path}.elastic`, lattice.system as ElasticSymmetry);
  const description =
    o.description === undefined && !options.requireSources ? `${name}, ${structure}` : text(o.description, `${path}.description`, '"copper, fcc"');
  const sfe =
    o.stackingFaultEnergy_mJ_per_m2 === undefined
      ? undefined
      : num(o.stackingFaultEnergy_mJ_per_m2, `${path}.stackingFaultEnergy_mJ_per_m2`, { min: 0, max: 2000, unit: 'mJ/m^2', example: '45 for Cu' });
  const sources = parseSources(o.sources, `${path}.sources`, options.requireSources ?? false);
  const material: Material = { name, description, structure, lattice, sites, elastic, sources };
  return sfe === undefined ? material : { ...material, stackingFaultEnergy_mJ_per_m2: sfe };
}
