/**
 * Scenario validation: raw JSON -> Scenario. Every error names the JSON path
 * of the offending field and how to fix it.
 */
import type { Vec3 } from '../math/vec3.js';
import { angle, dot, norm, scale, unit } from '../math/vec3.js';
import type { Material } from '../crystal/material.js';
import { getMaterial, parseMaterial } from '../crystal/materials.js';
import { parseIndices, parseVectorWithFraction } from '../crystal/indices.js';
import { directionFromFour, planeFromFour } from '../crystal/millerBravais.js';
import { directionToCartesian, planeNormalToCartesian, usesFourIndices } from '../crystal/lattice.js';
import { reflectionParameters } from '../scattering/reflection.js';
import { type AbsorptionSetting, DEFAULT_ABSORPTION, THERMAL_DIFFUSE } from '../scattering/absorption.js';
import { parseFamily } from '../crystal/symmetry.js';
import { InputError } from '../errors.js';
import type { DefectEntry } from '../defects/defectType.js';
import { defectTypeNamed, defectTypeNames, defectTypeOf } from '../defects/registry.js';
import { array, fail, isObject, joinPath, number, object, onlyKeys, required, string, suggestKey } from './check.js';
import type { BeamSet, CandidateSpec, Condition, DefectSpec, Deviation, Elasticity, ImageSpec, Scenario, Surfaces } from './types.js';
import { beamCount, MAX_PIXELS, MAX_SIDE_PX } from './types.js';
import { formatDirectionIn } from '../crystal/formatIndices.js';

/** Longest scenario name, condition id and defect or candidate label (characters). */
export const MAX_NAME_CHARS = 200;
export const MAX_ID_CHARS = 64;
export const MAX_LABEL_CHARS = 80;
/** Most conditions and defects in one scenario (render and identify time grow with both). */
export const MAX_CONDITIONS = 24;
export const MAX_DEFECTS = 100;
/** Largest beams x foil thickness (beam-nm) for many-beam conditions: 31 beams through 1 um. */
export const MAX_BEAM_NM = 31 * 1000;
/** Smallest pixel accepted (nm): far below atomic spacings, within TIFF's resolution field. */
export const MIN_PIXEL_NM = 0.01;

/** A non-empty string of at most `max` characters. */
function shortString(v: unknown, path: string, max: number): string {
  const s = string(v, path);
  if (s.length > max) fail(path, `is ${s.length} characters long; give at most ${max}`);
  return s;
}

/** Tolerance on g being perpendicular to its beam (degrees). */
export const PERPENDICULAR_TOLERANCE_DEG = 5;

const TOP_KEYS = [
  // where editors find the JSON Schema (schema/scenario.schema.json); not used by the program
  '$schema',
  'name', 'material', 'kV', 'foil', 'beam', 'imageX', 'image', 'absorption', 'elasticity', 'surfaces', 'conditions', 'defects', 'candidates', 'description',
  // settings of micrographs, read by `thinfoil identify` (src/analysis/identifySettings.ts)
  'micrographs',
  // ranges of the parameters identification fits (src/analysis/fitSettings.ts)
  'fit',
] as const;

export function parseScenario(raw: unknown): Scenario {
  const o = object(raw, '(scenario)');
  onlyKeys(o, TOP_KEYS, '');
  const name = o.name === undefined ? 'scenario' : shortString(o.name, 'name', MAX_NAME_CHARS);
  const material = readMaterial(required(o, 'material', '', '"Ni"'));
  const kV = number(required(o, 'kV', '', '200'), 'kV', { min: 10, max: 3000, unit: 'kV' });

  const foil = object(required(o, 'foil', '', '{ "thickness_nm": 100, "normal": [0, 0, 1] }'), 'foil');
  onlyKeys(foil, ['thickness_nm', 'normal'], 'foil');
  const thickness_nm = number(required(foil, 'thickness_nm', 'foil', '100'), 'foil.thickness_nm', { above: 0, max: 10000, unit: 'nm' });

  const beam = readDirection(required(o, 'beam', '', '[0, 0, 1]'), 'beam', material);
  const foilNormal = foil.normal === undefined ? beam : readDirection(foil.normal, 'foil.normal', material);
  const cb = cosCart(material, beam, foilNormal);
  if (Math.abs(cb) < Math.cos((80 * Math.PI) / 180)) {
    fail('foil.normal', `is ${deg(Math.acos(Math.abs(cb)))} degrees from the beam; the foil must be tilted by less than 80 degrees`);
  }

  const image = readImage(o.image);
  const absorption = readAbsorption(o.absorption);

  const elasticity = readElasticity(o.elasticity);
  const surfaces = readSurfaces(o.surfaces);

  const condList = array(required(o, 'conditions', '', '[{ "id": "g200", "g": [2, 0, 0], "s_per_nm": 0 }]'), 'conditions', 1);
  if (condList.length > MAX_CONDITIONS) fail('conditions', `holds ${condList.length} conditions; give at most ${MAX_CONDITIONS} per scenario`);
  if (Array.isArray(o.defects) && o.defects.length > MAX_DEFECTS) fail('defects', `holds ${o.defects.length} defects; give at most ${MAX_DEFECTS} per scenario`);
  const conditions = condList.map((c, i) => readCondition(c, joinPath('conditions', i), material, beam, foilNormal, kV, absorption));
  conditions.forEach((c, i) => {
    const n = beamCount(c.beams);
    if (n > 2 && n * thickness_nm > MAX_BEAM_NM) {
      fail(joinPath(joinPath('conditions', i), 'beams'), `${n} beams through ${thickness_nm} nm exceed the limit of ${MAX_BEAM_NM} beam-nm (31 beams through 1 um); use fewer beams or a thinner foil`);
    }
  });
  const ids = new Set<string>();
  conditions.forEach((c, i) => {
    if (ids.has(c.id)) fail(joinPath(joinPath('conditions', i), 'id'), `"${c.id}" is used twice; give every condition its own id`);
    ids.add(c.id);
  });

  // default: the first condition's g points along +x
  const imageX_cart = unit(
    o.imageX === undefined
      ? planeNormalToCartesian(material.lattice, conditions[0].g)
      : cart(material, readDirection(o.imageX, 'imageX', material)),
  );
  if (Math.sin(angle(imageX_cart, cart(material, beam))) < 0.05) {
    fail('imageX', 'is (nearly) parallel to the beam; choose a crystal direction perpendicular to the beam');
  }
  conditions.forEach((c, i) => {
    if (Math.sin(angle(imageX_cart, cart(material, c.beam))) < 0.05) {
      fail('imageX', `is (nearly) parallel to the beam of conditions[${i}]; ${o.imageX === undefined ? 'give "imageX", ' : ''}a crystal direction perpendicular to every beam`);
    }
  });

  const defects = o.defects === undefined ? [] : array(o.defects, 'defects').map((d, i) => readDefect(d, joinPath('defects', i), material, thickness_nm, beam));
  defects.forEach((d, i) => refuseOutsideFoil(d, joinPath('defects', i), material, thickness_nm, foilNormal));
  const candidates = o.candidates === undefined ? [] : array(o.candidates, 'candidates').flatMap((c, i) => readCandidates(c, joinPath('candidates', i), material));

  return { name, material, kV, thickness_nm, foilNormal, beam, imageX_cart, image, absorption, elasticity, surfaces, conditions, defects, candidates };
}

/** "elasticity": "anisotropic" (default: every material carries its Cij) or "isotropic". */
/** '; did you mean "relaxed"?' when v is a string near one of the words (another case, a typo), as for keys. */
function wordHint(v: unknown, words: readonly string[]): string {
  const near = typeof v === 'string' ? suggestKey(v, words) : undefined;
  return near === undefined ? '' : `; did you mean "${near}"?`;
}

function readElasticity(v: unknown): Elasticity {
  if (v === undefined) return 'anisotropic';
  if (v === 'anisotropic' || v === 'isotropic') return v;
  return fail('elasticity', `must be "anisotropic" (Stroh solution from the material's Cij, the default) or "isotropic" (Hirth & Lothe closed form), got ${JSON.stringify(v)}${wordHint(v, ['anisotropic', 'isotropic'])}`);
}

/**
 * "surfaces": "relaxed" (default: free-surface corrections of straight lines and inclusions,
 * src/elasticity/surfaceRelaxation.ts) or "infinite" (infinite-medium fields). The corrections of inclined
 * lines break the shared-column method: such renders are about 2.7x slower than the infinite medium column by
 * column and about 14x slower than with shared columns (bench/surfaces.mjs; README, Foil surfaces), which
 * is what "infinite" is still for (fast previews, fits of many candidates, generators without surfaces).
 */
function readSurfaces(v: unknown): Surfaces {
  if (v === undefined) return 'relaxed';
  if (v === 'relaxed' || v === 'infinite') return v;
  return fail('surfaces', `must be "relaxed" (free-surface corrections of straight dislocations and inclusions, the default) or "infinite" (infinite-medium fields), got ${JSON.stringify(v)}${wordHint(v, ['relaxed', 'infinite'])}`);
}

function readMaterial(v: unknown): Material {
  if (typeof v === 'string') return getMaterial(v);
  if (isObject(v)) return parseMaterial(v, 'material');
  fail('material', 'must be a library name such as "Ni" (see `thinfoil materials`) or an inline material object');
}

function readImage(v: unknown): ImageSpec {
  if (v === undefined) return { width_px: 256, height_px: 256, pixel_nm: 0.5 };
  const o = object(v, 'image');
  onlyKeys(o, ['width_px', 'height_px', 'pixel_nm'], 'image');
  const width_px = number(required(o, 'width_px', 'image', '256'), 'image.width_px', { integer: true, min: 1, max: MAX_SIDE_PX, unit: 'pixels' });
  const height_px = number(required(o, 'height_px', 'image', '256'), 'image.height_px', { integer: true, min: 1, max: MAX_SIDE_PX, unit: 'pixels' });
  const pixel_nm = number(required(o, 'pixel_nm', 'image', '0.5'), 'image.pixel_nm', { min: MIN_PIXEL_NM, max: 1000, unit: 'nm' });
  if (width_px * height_px > MAX_PIXELS) {
    fail('image', `${width_px} x ${height_px} pixels exceeds the limit of ${MAX_PIXELS} pixels (2048 x 2048); use fewer, larger pixels`);
  }
  return { width_px, height_px, pixel_nm };
}

function readBeamSet(v: unknown, path: string, m: Material, g: Vec3): BeamSet | 'automatic row' {
  if (v === undefined || v === 2) return { kind: 'two' };
  if (isObject(v) && v.set !== undefined) {
    onlyKeys(v, ['set'], path);
    const list = array(v.set, joinPath(path, 'set'), 1).map((b, i) => readPlane(b, joinPath(joinPath(path, 'set'), i), m));
    const key = (h: Vec3) => h.join(',');
    const seen = new Set<string>(['0,0,0', key(g)]);
    const beams: Vec3[] = [g];
    list.forEach((h, i) => {
      if (!h.every((x) => Number.isInteger(x))) fail(joinPath(joinPath(path, 'set'), i), `(${h.join(' ')}) must have whole-number indices`);
      if (!seen.has(key(h))) {
        seen.add(key(h));
        beams.push(h);
      }
    });
    if (beams.length + 1 > 31) fail(joinPath(path, 'set'), `holds ${beams.length + 1} beams with 000; give at most 31`);
    return { kind: 'set', beams };
  }
  // "row": the program picks the systematic row (automaticRow, after the deviation is known)
  if (v === 'row') return 'automatic row';
  if (isObject(v)) {
    onlyKeys(v, ['row'], path);
    const at = joinPath(path, 'row');
    const r = required(v, 'row', path, '7');
    if (Array.isArray(r)) {
      // [nMin, nMax]: any systematic row that holds 000 and g, e.g. [-3, 5] for a weak beam g(3g)
      if (r.length !== 2) fail(at, 'must be a beam count N or two orders [nMin, nMax], e.g. [-3, 5]');
      const nMin = number(r[0], joinPath(at, 0), { integer: true, min: -30, max: 0, unit: 'order of the first beam' });
      const nMax = number(r[1], joinPath(at, 1), { integer: true, min: 1, max: 30, unit: 'order of the last beam' });
      if (nMax - nMin + 1 > 31) fail(at, `holds ${nMax - nMin + 1} beams; give at most 31`);
      return { kind: 'row', nMin, nMax };
    }
    const count = number(r, at, { integer: true, min: 3, max: 31, unit: 'beams' });
    if (count % 2 === 0) fail(at, `must be odd (beams -m g .. +m g), got ${count}; give [nMin, nMax] for a row that is not symmetric`);
    return { kind: 'row', nMin: -(count - 1) / 2, nMax: (count - 1) / 2 };
  }
  fail(path, 'must be 2 (two-beam), "row" (a systematic row chosen by the program), { "row": N } for a systematic row of N beams (N odd, 3..31), { "row": [nMin, nMax] }, or { "set": [[h, k, l], ...] } for any set of beams');
}

/**
 * The systematic row chosen for `"beams": "row"`. For a weak beam g(ng): -n g .. (n+2) g, which holds the
 * beam at the Bragg condition (ng) and its neighbours; for other deviations -3g .. 3g. Both were checked
 * against wide rows (-8 .. n+8) by numpy eigen-solutions for Cu 111, 200, 220 at 200 kV, t = 30 .. 150 nm
 * (scripts/ref_weakbeam_rows.py --study): dark-field intensities within about 1 % (2.4 % for 111 at s = 0),
 * except where the intensity itself is below 1e-4 of the incident beam.
 */
export function automaticRow(deviation: Deviation): { nMin: number; nMax: number } {
  return deviation.kind === 'weakBeam' ? { nMin: -deviation.n, nMax: deviation.n + 2 } : { nMin: -3, nMax: 3 };
}

/** Orders of the multiples of g in a set of beams (plane indices). */
function multiplesOfG(beams: readonly Vec3[], g: Vec3): Set<number> {
  const out = new Set<number>();
  const gg = dot(g, g);
  for (const h of beams) {
    const n = dot(h, g) / gg;
    if (Number.isInteger(n) && h.every((x, i) => x === n * g[i])) out.add(n);
  }
  return out;
}

/** A weak beam g(ng) computed with many beams needs the beams ng (at the Bragg condition) and (n+1)g (physics.md section 4). */
function checkWeakBeamBeams(beams: BeamSet, n: number, g: Vec3, path: string): void {
  if (beams.kind === 'two') return; // the two-beam model of a weak beam: the user's explicit choice
  const have = beams.kind === 'row' ? (k: number) => k >= beams.nMin && k <= beams.nMax : (k: number) => multiplesOfG(beams.beams, g).has(k);
  const missing = [n, n + 1].filter((k) => !have(k));
  if (missing.length === 0) return;
  const names = missing.map((k) => `${k}g`).join(' and ');
  const what = beams.kind === 'row' ? `the row ${beams.nMin}g .. ${beams.nMax}g` : 'the set';
  const fix = beams.kind === 'row' ? `{ "row": [${-n}, ${n + 2}] } or "row"` : `[${missing.map((k) => g.map((x) => k * x).join(', ')).map((s) => `[${s}]`).join(', ')}] in "set"`;
  fail(path, `${what} leaves out ${names}, which the weak beam g(${n}g) needs (${n}g is at the Bragg condition); give ${fix}`);
}

/** "absorption": "thermal-diffuse" (default) or a constant ratio xi_g / xi'_g in 0..1. */
function readAbsorption(v: unknown): AbsorptionSetting {
  if (v === undefined) return DEFAULT_ABSORPTION;
  if (v === THERMAL_DIFFUSE) return THERMAL_DIFFUSE;
  if (typeof v === 'string') {
    fail('absorption', `"${v}" is not a known model; give "${THERMAL_DIFFUSE}" (absorption per beam from thermal diffuse scattering, the default) or a constant ratio xi_g/xi'_g such as 0.1`);
  }
  return number(v, 'absorption', { min: 0, max: 1, unit: `xi_g / xi'_g (or "${THERMAL_DIFFUSE}")` });
}

function readCondition(v: unknown, path: string, m: Material, refBeam: Vec3, foilNormal: Vec3, kV: number, absorption: AbsorptionSetting): Condition {
  const o = object(v, path);
  onlyKeys(o, ['id', 'g', 's_per_nm', 'w', 'beam', 'beams', 'weakBeam'], path);
  const id = shortString(required(o, 'id', path, '"g200"'), joinPath(path, 'id'), MAX_ID_CHARS);
  if (!/^[A-Za-z0-9_.-]+$/.test(id)) fail(joinPath(path, 'id'), `"${id}" is used in file names; use only letters, digits, "-", "_" and "."`);
  const g = readPlane(required(o, 'g', path, '[2, 0, 0]'), joinPath(path, 'g'), m);
  if (norm(g) === 0) fail(joinPath(path, 'g'), 'must not be 000; give the reflection used for imaging, e.g. [2, 0, 0]');
  if (!g.every((h) => Number.isInteger(h))) fail(joinPath(path, 'g'), `(${g.join(' ')}) must have whole-number indices, e.g. [2, 0, 0]`);
  try {
    // refuses forbidden reflections and reflections beyond the scattering-factor tables
    reflectionParameters(m, g, kV, { absorption });
  } catch (e) {
    if (e instanceof InputError) throw new InputError(`${joinPath(path, 'g')}: ${e.message}`);
    throw e;
  }
  const beam = o.beam === undefined ? refBeam : readDirection(o.beam, joinPath(path, 'beam'), m);
  if (o.beam !== undefined) {
    // the condition's beam must enter the same foil surface as the reference beam, within 80 degrees of the normal
    const ref = cart(m, refBeam);
    let n = unit(cart(m, foilNormal));
    if (dot(n, ref) < 0) n = scale(n, -1);
    const c = dot(unit(cart(m, beam)), n);
    if (c <= 0) {
      fail(joinPath(path, 'beam'), `points against the electron path of "beam"; give it in the same sense (e.g. [${beam.map((x) => -x).join(', ')}] instead of [${beam.join(', ')}])`);
    }
    if (c < Math.cos((80 * Math.PI) / 180)) {
      fail(joinPath(path, 'beam'), `is ${deg(Math.acos(c)).toFixed(1)} degrees from the foil normal; the foil may be tilted by less than 80 degrees`);
    }
  }
  const off = Math.abs(90 - deg(angle(planeNormalToCartesian(m.lattice, g), cart(m, beam))));
  if (off > PERPENDICULAR_TOLERANCE_DEG) {
    fail(joinPath(path, 'g'), `makes ${(90 - off).toFixed(1)} degrees with the beam; g must be within ${PERPENDICULAR_TOLERANCE_DEG} degrees of perpendicular to the beam (give this condition its own "beam")`);
  }
  const beamsRead = readBeamSet(o.beams, joinPath(path, 'beams'), m, g);
  const given = ['s_per_nm', 'w', 'weakBeam'].filter((k) => o[k] !== undefined);
  if (given.length !== 1) {
    fail(path, `must give exactly one of "s_per_nm", "w" and "weakBeam"${given.length ? ` (found ${given.join(' and ')})` : ''}`);
  }
  let deviation: Deviation;
  if (given[0] === 's_per_nm') {
    deviation = { kind: 's', s_per_nm: number(o.s_per_nm, joinPath(path, 's_per_nm'), { min: -10, max: 10, unit: 'nm^-1' }) };
  } else if (given[0] === 'w') {
    deviation = { kind: 'w', w: number(o.w, joinPath(path, 'w'), { min: -1000, max: 1000 }) };
  } else {
    deviation = { kind: 'weakBeam', n: number(o.weakBeam, joinPath(path, 'weakBeam'), { integer: true, min: 2, max: 10, unit: 'n of g(ng)' }) };
  }
  const beams: BeamSet = beamsRead === 'automatic row' ? { kind: 'row', ...automaticRow(deviation) } : beamsRead;
  if (deviation.kind === 'weakBeam') checkWeakBeamBeams(beams, deviation.n, g, joinPath(path, 'beams'));
  return { id, g, deviation, beam, beams };
}

function readDefect(v: unknown, path: string, m: Material, thickness_nm: number, refBeam: Vec3): DefectSpec {
  const o = object(v, path);
  const type = string(required(o, 'type', path, '"dislocation"'), joinPath(path, 'type'));
  const module = defectTypeNamed(type);
  if (module === undefined) {
    const names = defectTypeNames().map((n) => `"${n}"`);
    fail(joinPath(path, 'type'), `"${type}" is not a defect type thinfoil knows; use ${names.slice(0, -1).join(', ')} or ${names[names.length - 1]}`);
  }
  const at = (k: string) => joinPath(path, k);
  const entry: DefectEntry = {
    o,
    path,
    material: m,
    thickness_nm,
    beam: refBeam,
    at,
    label: (kind) => (o.label === undefined ? `${kind} ${path}` : shortString(o.label, at('label'), MAX_LABEL_CHARS)),
    core: () => (o.core_nm === undefined ? {} : { core_nm: number(o.core_nm, at('core_nm'), { above: 0, max: 10, unit: 'nm' }) }),
    burgers: (example) => {
      const b = readVector(required(o, 'b', path, `"${example}"`), at('b'), m);
      if (norm(b) === 0) fail(at('b'), `is zero; a dislocation needs a nonzero Burgers vector such as "${example}"`);
      return b;
    },
    point: (key) => readPoint(o[key], at(key), thickness_nm),
    requiredPoint: (key, example) => readPoint(required(o, key, path, example), at(key), thickness_nm),
  };
  return module.read(entry);
}

/**
 * A defect that lies wholly outside the crystal cannot exist: an inclusion
 * whose sphere misses the slab, a line or a fault plane parallel to the
 * surfaces at a depth outside the foil. (A line that crosses the foil
 * somewhere is accepted; scenarioWarnings says where it crosses.)
 */
function refuseOutsideFoil(d: DefectSpec, path: string, m: Material, t: number, foilNormal: Vec3): void {
  defectTypeOf(d).refuseOutsideFoil(d, path, m, t, foilNormal);
}

function readPoint(v: unknown, path: string, thickness_nm: number): Vec3 {
  if (v === undefined) return [0, 0, thickness_nm / 2];
  const a = array(v, path);
  if (a.length !== 3) fail(path, 'must be [x, y, z] in nm (x, y from the image centre, z the depth below the entrance surface)');
  const p = a.map((x, i) => number(x, joinPath(path, i), { min: -1e5, max: 1e5, unit: 'nm' }));
  return [p[0], p[1], p[2]];
}

function readCandidates(v: unknown, path: string, m: Material): CandidateSpec[] {
  // a string is a family ("1/2<110>") or one explicit vector ("1/2[1 1 0]", "-1/6[1 1 -2]")
  if (typeof v === 'string') {
    if (/[<>{}]/.test(v)) return familyCandidates(v, path, m);
    const b = readVector(v, path, m);
    if (norm(b) === 0) fail(path, 'is zero; give a nonzero Burgers vector');
    return [{ label: `b = ${candidateText(m, b)}`, b }];
  }
  const o = object(v, path);
  onlyKeys(o, ['b', 'line', 'family', 'label'], path);
  if (o.family !== undefined) return familyCandidates(string(o.family, joinPath(path, 'family')), joinPath(path, 'family'), m);
  const b = readVector(required(o, 'b', path, '"1/2[1 1 0]"'), joinPath(path, 'b'), m);
  if (norm(b) === 0) fail(joinPath(path, 'b'), 'is zero; give a nonzero Burgers vector');
  const line = o.line === undefined ? undefined : readDirection(o.line, joinPath(path, 'line'), m);
  const label = o.label === undefined ? `b = ${candidateText(m, b)}` : shortString(o.label, joinPath(path, 'label'), MAX_LABEL_CHARS);
  return [line === undefined ? { label, b } : { label, b, line }];
}

function familyCandidates(text: string, path: string, m: Material): CandidateSpec[] {
  const vs = parseFamily(text, m, { collapseSign: true, field: path }).members;
  return vs.map((b) => ({ label: `b = ${candidateText(m, b)}`, b }));
}

/**
 * Refuses a family ("1/2<110>", "{111}") where one vector is meant: the
 * index parser would otherwise read it as one member and say nothing.
 */
function refuseFamily(v: unknown, path: string, kind: 'vector' | 'plane'): void {
  if (typeof v !== 'string' || !/[<>{}]/.test(v)) return;
  const member = v.trim().replace(/</g, '[').replace(/>/g, ']').replace(/\{/g, kind === 'plane' ? '(' : '[').replace(/\}/g, kind === 'plane' ? ')' : ']');
  fail(
    path,
    `"${v}" is a family (angle brackets or braces), but one ${kind === 'plane' ? 'plane' : 'vector'} is meant here; write one member, e.g. "${member}"${kind === 'vector' ? ' (families of Burgers vectors belong in "candidates")' : ''}`,
  );
}

/** A candidate Burgers vector as text: four indices for hexagonal crystals (1/3[1 1 -2 0]), else 1/2[1 1 0]. */
function candidateText(m: Material, b: Vec3): string {
  return formatDirectionIn(m.lattice, b);
}

/** A direction, 3 or 4 (hexagonal) indices, returned in 3-index lattice units. */
export function readDirection(v: unknown, path: string, m: Material): Vec3 {
  refuseFamily(v, path, 'vector');
  const idx = parseIndices(v as string | number[], path, usesFourIndices(m.lattice) ? '3or4' : 3);
  const d = idx.length === 4 ? dirFour(idx, path) : ([idx[0], idx[1], idx[2]] as Vec3);
  if (norm(d) === 0) fail(path, 'must not be [0 0 0]');
  return d;
}

/** A plane / reflection, 3 or 4 (hexagonal) indices, returned in 3-index form. */
export function readPlane(v: unknown, path: string, m: Material): Vec3 {
  refuseFamily(v, path, 'plane');
  const idx = parseIndices(v as string | number[], path, usesFourIndices(m.lattice) ? '3or4' : 3);
  if (idx.length === 4) {
    try {
      return planeFromFour([idx[0], idx[1], idx[2], idx[3]]);
    } catch (e) {
      throw new InputError(`${path}: ${(e as Error).message}`);
    }
  }
  return [idx[0], idx[1], idx[2]];
}

/** A vector with an optional fraction prefix ("1/2[1 1 0]"), in lattice units. */
export function readVector(v: unknown, path: string, m: Material): Vec3 {
  refuseFamily(v, path, 'vector');
  const idx = parseVectorWithFraction(v as string | number[], path, usesFourIndices(m.lattice) ? '3or4' : 3);
  if (idx.length === 4) {
    if (!usesFourIndices(m.lattice)) fail(path, 'has four indices, but the material is not hexagonal; use three');
    return dirFour(idx, path);
  }
  return [idx[0], idx[1], idx[2]];
}

function dirFour(idx: readonly number[], path: string): Vec3 {
  try {
    return directionFromFour([idx[0], idx[1], idx[2], idx[3]]);
  } catch (e) {
    throw new InputError(`${path}: ${(e as Error).message}`);
  }
}

function cart(m: Material, d: Vec3): Vec3 {
  return directionToCartesian(m.lattice, d);
}

function cosCart(m: Material, a: Vec3, b: Vec3): number {
  return Math.cos(angle(cart(m, a), cart(m, b)));
}

function deg(rad: number): number {
  return (rad * 180) / Math.PI;
}
