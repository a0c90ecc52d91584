/**
 * The material library: data/materials.json, read once relative to this
 * module (the same relative path works from src/crystal under vitest and
 * from dist/crystal after compilation), validated with parseMaterial and
 * cached. Names are matched case-insensitively.
 */
import { readFileSync } from 'node:fs';
import { InputError } from '../errors.js';
import { parseMaterial } from './parseMaterial.js';
export { parseMaterial } from './parseMaterial.js';
const LIBRARY_URL = new URL('../../data/materials.json', import.meta.url);
let cache = null;
function load() {
    if (cache)
        return cache;
    const doc = JSON.parse(readFileSync(LIBRARY_URL, 'utf8'));
    const entries = doc.materials;
    if (!Array.isArray(entries))
        throw new Error(`${LIBRARY_URL.pathname}: expected a "materials" list`);
    const list = entries.map((e, i) => Object.freeze(parseMaterial(e, `materials.json: materials[${i}]`, { requireSources: true })));
    const byName = new Map();
    for (const m of list) {
        const key = m.name.toLowerCase();
        if (byName.has(key))
            throw new Error(`materials.json: material name ${m.name} appears twice`);
        byName.set(key, m);
    }
    cache = { list, byName };
    return cache;
}
/** All library materials, in file order. */
export function listMaterials() {
    return [...load().list];
}
/** A library material by name (case-insensitive); InputError naming the material when unknown. */
export function getMaterial(name, field = 'material') {
    const lib = load();
    const key = String(name).trim().toLowerCase();
    const found = lib.byName.get(key);
    if (found)
        return found;
    const similar = key === '' ? [] : lib.list.filter((m) => m.name.toLowerCase().includes(key) || key.includes(m.name.toLowerCase()));
    const hint = similar.length > 0 ? ` (similar: ${similar.map((m) => m.name).join(', ')})` : '';
    throw new InputError(`${field}: unknown material "${name}"${hint}; run \`thinfoil materials\` to list the library, or define the material inline.`);
}
