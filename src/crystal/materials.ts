/**
 * The material library: data/materials.json, read once relative to this
 * module (the same relative path works from src/crystal under vitest and
 * from dist/crystal after compilation), validated with parseMaterial and
 * cached. Names are matched case-insensitively.
 */
import { readFileSync } from 'node:fs';
import { InputError } from '../errors.js';
import type { Material } from './material.js';
import { parseMaterial } from './parseMaterial.js';

export { parseMaterial, type ParseMaterialOptions } from './parseMaterial.js';

const LIBRARY_URL = new URL('../../data/materials.json', import.meta.url);

let cache: { readonly list: readonly Material[]; readonly byName: ReadonlyMap<string, Material> } | null = null;

function load(): NonNullable<typeof cache> {
  if (cache) return cache;
  const doc: unknown = JSON.parse(readFileSync(LIBRARY_URL, 'utf8'));
  const entries = (doc as { materials?: unknown }).materials;
  if (!Array.isArray(entries)) throw new Error(`${LIBRARY_URL.pathname}: expected a "materials" list`);
  const list = entries.map((e, i) => Object.freeze(parseMaterial(e, `materials.json: materials[${i}]`, { requireSources: true })));
  const byName = new Map<string, Material>();
  for (const m of list) {
    const key = m.name.toLowerCase();
    if (byName.has(key)) throw new Error(`materials.json: material name ${m.name} appears twice`);
    byName.set(key, m);
  }
  cache = { list, byName };
  return cache;
}

/** All library materials, in file order. */
export function listMaterials(): Material[] {
  return [...load().list];
}

/** A library material by name (case-insensitive); InputError naming the material when unknown. */
export function getMaterial(name: string, field = 'material'): Material {
  const lib = load();
  const key = String(name).trim().toLowerCase();
  const found = lib.byName.get(key);
  if (found) return found;
  const similar = key === '' ? [] : lib.list.filter((m) => m.name.toLowerCase().includes(key) || key.includes(m.name.toLowerCase()));
  const hint = similar.length > 0 ? ` (similar: ${similar.map((m) => m.name).join(', ')})` : '';
  throw new InputError(`${field}: unknown material "${name}"${hint}; run \`thinfoil materials\` to list the library, or define the material inline.`);
}
