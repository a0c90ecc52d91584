/**
 * Small validators for JSON input. Each takes the value and its JSON path and
 * either returns a typed value or throws an InputError whose message names
 * the path and says what is expected.
 */
import { InputError } from '../errors.js';

export function fail(path: string, what: string): never {
  throw new InputError(`${path}: ${what}`);
}

export function isObject(v: unknown): v is Record<string, unknown> {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

export function object(v: unknown, path: string): Record<string, unknown> {
  if (!isObject(v)) fail(path, 'must be an object, e.g. { ... }');
  return v;
}

export function required(o: Record<string, unknown>, key: string, path: string, example: string): unknown {
  const v = o[key];
  if (v === undefined || v === null) fail(joinPath(path, key), `is missing; add it, e.g. "${key}": ${example}`);
  return v;
}

export function joinPath(path: string, key: string | number): string {
  if (typeof key === 'number') return `${path}[${key}]`;
  return path === '' ? key : `${path}.${key}`;
}

export interface NumberRule {
  min?: number;
  max?: number;
  /** Strictly greater than this. */
  above?: number;
  integer?: boolean;
  unit?: string;
}

export function number(v: unknown, path: string, rule: NumberRule = {}): number {
  const unit = rule.unit ? ` (${rule.unit})` : '';
  if (typeof v !== 'number' || !Number.isFinite(v)) fail(path, `must be a finite number${unit}`);
  if (rule.integer && !Number.isInteger(v)) fail(path, `must be a whole number, got ${v}`);
  if (rule.above !== undefined && !(v > rule.above)) fail(path, `must be greater than ${rule.above}${unit}, got ${v}`);
  if (rule.min !== undefined && v < rule.min) fail(path, `must be at least ${rule.min}${unit}, got ${v}`);
  if (rule.max !== undefined && v > rule.max) fail(path, `must be at most ${rule.max}${unit}, got ${v}`);
  return v;
}

export function string(v: unknown, path: string): string {
  if (typeof v !== 'string' || v.trim() === '') fail(path, 'must be a non-empty string');
  return v;
}

export function array(v: unknown, path: string, minLength = 0): unknown[] {
  if (!Array.isArray(v)) fail(path, 'must be a list [ ... ]');
  if (v.length < minLength) fail(path, `must hold at least ${minLength} entr${minLength === 1 ? 'y' : 'ies'}`);
  return v;
}

/**
 * Edit distance with adjacent transpositions (Damerau-Levenshtein, optimal
 * string alignment): "feild" -> "field" is 1.
 */
export function editDistance(a: string, b: string): number {
  const m = a.length;
  const n = b.length;
  let prev2 = new Array<number>(n + 1).fill(0);
  let prev = Array.from({ length: n + 1 }, (_, j) => j);
  let cur = new Array<number>(n + 1).fill(0);
  for (let i = 1; i <= m; i++) {
    cur[0] = i;
    for (let j = 1; j <= n; j++) {
      const cost = a[i - 1] === b[j - 1] ? 0 : 1;
      let d = Math.min(prev[j] + 1, cur[j - 1] + 1, prev[j - 1] + cost);
      if (i > 1 && j > 1 && a[i - 1] === b[j - 2] && a[i - 2] === b[j - 1]) d = Math.min(d, prev2[j - 2] + 1);
      cur[j] = d;
    }
    [prev2, prev, cur] = [prev, cur, prev2];
  }
  return prev[n];
}

/** A key without its unit suffix: "thickness_nm" -> "thickness". */
function stem(key: string): string {
  const i = key.lastIndexOf('_');
  return i > 0 ? key.slice(0, i) : key;
}

/**
 * The allowed key the user most likely meant, or undefined: first the same
 * key in another case ("weakbeam" -> "weakBeam"), then the same key without
 * or with another unit suffix ("thickness" -> "thickness_nm"), then the
 * nearest key by edit distance (case-insensitive) when the distance is at
 * most 1 for keys of 3 or 4 letters, 2 up to 8 letters, 3 beyond (none for 1 or 2 letters).
 */
export function suggestKey(key: string, allowed: readonly string[]): string | undefined {
  const k = key.toLowerCase();
  const exact = allowed.find((a) => a.toLowerCase() === k);
  if (exact !== undefined) return exact;
  const bare = allowed.find((a) => stem(a.toLowerCase()) === stem(k) || stem(a.toLowerCase()) === k);
  if (bare !== undefined) return bare;
  const limit = k.length <= 2 ? 0 : k.length <= 4 ? 1 : k.length <= 8 ? 2 : 3;
  let best: string | undefined;
  let bestD = Infinity;
  for (const a of allowed) {
    const al = a.toLowerCase();
    const d = Math.min(editDistance(k, al), editDistance(k, stem(al)));
    if (d < bestD) {
      bestD = d;
      best = a;
    }
  }
  return bestD <= limit ? best : undefined;
}

/** Rejects keys that are not in the allowed list (catches typos such as "thicknes_nm"). */
export function onlyKeys(o: Record<string, unknown>, allowed: readonly string[], path: string): void {
  for (const k of Object.keys(o)) {
    if (!allowed.includes(k)) {
      const near = suggestKey(k, allowed);
      const hint = near ? `; did you mean "${near}"?` : `; allowed fields: ${allowed.join(', ')}`;
      fail(joinPath(path, k), `is not a known field${hint}`);
    }
  }
}
