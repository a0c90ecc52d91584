/**
 * Small validators for JSON input. Each takes the value and its JSON path and
 * either returns a typed value or throws an InputError whose message names
 * the path and says what is expected.
 */
import { InputError } from '../errors.js';
export function fail(path, what) {
    throw new InputError(`${path}: ${what}`);
}
export function isObject(v) {
    return typeof v === 'object' && v !== null && !Array.isArray(v);
}
export function object(v, path) {
    if (!isObject(v))
        fail(path, 'must be an object, e.g. { ... }');
    return v;
}
export function required(o, key, path, example) {
    const v = o[key];
    if (v === undefined || v === null)
        fail(joinPath(path, key), `is missing; add it, e.g. "${key}": ${example}`);
    return v;
}
export function joinPath(path, key) {
    if (typeof key === 'number')
        return `${path}[${key}]`;
    return path === '' ? key : `${path}.${key}`;
}
export function number(v, path, rule = {}) {
    const unit = rule.unit ? ` (${rule.unit})` : '';
    if (typeof v !== 'number' || !Number.isFinite(v))
        fail(path, `must be a finite number${unit}`);
    if (rule.integer && !Number.isInteger(v))
        fail(path, `must be a whole number, got ${v}`);
    if (rule.above !== undefined && !(v > rule.above))
        fail(path, `must be greater than ${rule.above}${unit}, got ${v}`);
    if (rule.min !== undefined && v < rule.min)
        fail(path, `must be at least ${rule.min}${unit}, got ${v}`);
    if (rule.max !== undefined && v > rule.max)
        fail(path, `must be at most ${rule.max}${unit}, got ${v}`);
    return v;
}
export function string(v, path) {
    if (typeof v !== 'string' || v.trim() === '')
        fail(path, 'must be a non-empty string');
    return v;
}
export function array(v, path, minLength = 0) {
    if (!Array.isArray(v))
        fail(path, 'must be a list [ ... ]');
    if (v.length < minLength)
        fail(path, `must hold at least ${minLength} entr${minLength === 1 ? 'y' : 'ies'}`);
    return v;
}
/** Rejects keys that are not in the allowed list (catches typos such as "thicknes_nm"). */
export function onlyKeys(o, allowed, path) {
    for (const k of Object.keys(o)) {
        if (!allowed.includes(k)) {
            const near = allowed.find((a) => a.toLowerCase() === k.toLowerCase() || a.startsWith(k) || k.startsWith(a));
            const hint = near ? `; did you mean "${near}"?` : `; allowed fields: ${allowed.join(', ')}`;
            fail(joinPath(path, k), `is not a known field${hint}`);
        }
    }
}
