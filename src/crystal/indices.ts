/**
 * Reading Miller (3-index) and Miller-Bravais (4-index) indices from the
 * command line and from scenario files.
 *
 * Accepted forms: "1,1,1", "1 -1 0", "[1 -1 0]", "(1 1 -2 0)", "<111>",
 * "{1-10}", compact single digits "111" or "[1-10]" (a minus sign binds to the
 * next digit), and arrays of numbers. With a fraction in front:
 * "1/2[1 1 0]", "1/6[1 1 -2]", "0.5[110]", or plain "[0.5 0.5 0]".
 * A 4-index set must satisfy third = -(first + second). An all-zero set is
 * refused (no direction, no plane).
 */
import { InputError } from '../errors.js';

export type IndexCount = 3 | 4 | '3or4';

const OPEN = '[(<{';
const CLOSE = '])>}';
const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)(e[+-]?\d+)?$/i;
const COMPACT = /^([+-]?\d)+$/;

function example(n: IndexCount): string {
  return n === 4 ? '"1 1 -2 0", "[1 1 -2 0]" or "11-20"' : n === 3 ? '"1 -1 0", "[1 -1 0]" or "1,-1,0"' : '"1 -1 0" or "1 1 -2 0"';
}

function countText(n: IndexCount): string {
  return n === '3or4' ? '3 or 4' : String(n);
}

/** Normalise typographic minus signs and surrounding space. */
function clean(text: string): string {
  return text.replace(/[\u2212\u2012\u2013]/g, '-').trim();
}

/** Remove one pair of matching brackets around the text, if present. */
function stripBrackets(text: string, field: string, n: IndexCount): string {
  const o = OPEN.indexOf(text[0] ?? '');
  const c = CLOSE.indexOf(text[text.length - 1] ?? '');
  if (o < 0 && c < 0) return text;
  if (o < 0 || o !== c) throw new InputError(`${field}: brackets in "${text}" do not match; write e.g. ${example(n)}.`);
  return text.slice(1, -1).trim();
}

function tokens(body: string): string[] | null {
  if (body === '') return null;
  if (/[\s,]/.test(body)) {
    const parts = body.includes(',') ? body.split(',').map((p) => p.trim()) : body.split(/\s+/);
    return parts.every((p) => NUMBER.test(p)) ? parts : null;
  }
  if (COMPACT.test(body)) return body.match(/[+-]?\d/g) ?? null;
  return NUMBER.test(body) ? [body] : null;
}

/**
 * Largest index magnitude accepted (reflections, directions and Burgers
 * vectors of real work stay far below), and the smallest non-zero largest
 * component (below it the set is zero in all but rounding).
 */
export const MAX_INDEX = 100;
export const MIN_INDEX = 1e-6;

/** Finite, not absurdly large, not vanishingly small: the same for strings and arrays. */
function checkMagnitude(values: readonly number[], field: string, shown: string): void {
  if (!values.every((v) => Number.isFinite(v))) {
    throw new InputError(`${field}: the indices ${shown} are not all finite numbers; give ordinary numbers such as "1 -1 0".`);
  }
  const big = Math.max(...values.map(Math.abs));
  if (big > MAX_INDEX) throw new InputError(`${field}: the indices ${shown} exceed ${MAX_INDEX} in magnitude; give small indices such as "1 -1 0".`);
  if (big > 0 && big < MIN_INDEX) throw new InputError(`${field}: the indices ${shown} are all below ${MIN_INDEX} (zero but for rounding); give a direction or plane such as "1 -1 0".`);
}

function checkSet(values: number[], field: string, n: IndexCount, shown: string): number[] {
  const okCount = n === '3or4' ? values.length === 3 || values.length === 4 : values.length === n;
  if (!okCount) {
    throw new InputError(`${field}: expected ${countText(n)} indices but found ${values.length} in ${shown}; write e.g. ${example(n)}.`);
  }
  checkMagnitude(values, field, shown);
  if (values.length === 4 && Math.abs(values[0] + values[1] + values[2]) > 1e-9) {
    throw new InputError(`${field}: in the 4-index set ${shown} the third index must equal -(first + second); write e.g. "1 1 -2 0".`);
  }
  if (values.every((v) => v === 0)) throw new InputError(`${field}: the indices ${shown} are all zero; give a direction or plane, e.g. ${example(n)}.`);
  return values;
}

/** Parse a set of 3 or 4 indices (numbers, not necessarily integers). */
export function parseIndices(text: string | readonly number[], field: string, nIndices: IndexCount): number[] {
  if (typeof text !== 'string') {
    if (!Array.isArray(text) || !text.every((v) => typeof v === 'number' && Number.isFinite(v))) {
      throw new InputError(`${field}: indices must be finite numbers; write e.g. [1, -1, 0] or ${example(nIndices)}.`);
    }
    return checkSet([...text], field, nIndices, JSON.stringify(text));
  }
  const t = clean(text);
  if (t.includes('/')) throw new InputError(`${field}: a fraction is not accepted in "${text}"; give plain indices, e.g. ${example(nIndices)}.`);
  const toks = tokens(stripBrackets(t, field, nIndices));
  if (toks === null) throw new InputError(`${field}: cannot read "${text}" as ${countText(nIndices)} indices; write e.g. ${example(nIndices)}.`);
  return checkSet(toks.map(Number), field, nIndices, `"${text}"`);
}

/**
 * Parse a vector with an optional fraction in front, e.g. "1/2[1 1 0]",
 * "1/6[1 1 -2]", "1/3<11-20>", "[0.5 0.5 0]", or an array. Returns the
 * components in lattice units (the fraction applied), 3 or 4 of them.
 */
export function parseVectorWithFraction(text: string | readonly number[], field: string, nIndices: IndexCount = 3): number[] {
  if (typeof text !== 'string') return parseIndices(text, field, nIndices);
  const t = clean(text);
  const open = [...t].findIndex((ch) => OPEN.includes(ch));
  if (open <= 0) return parseIndices(t, field, nIndices);
  const factor = parseFactor(t.slice(0, open).trim(), field, text, nIndices);
  const values = parseIndices(t.slice(open), field, nIndices).map((v) => v * factor);
  checkMagnitude(values, field, `"${text}"`);
  return values;
}

function parseFactor(prefix: string, field: string, original: string, n: IndexCount): number {
  const p = prefix.replace(/\*$/, '').trim();
  const hint = n === 4 ? '"1/3[1 1 -2 0]"' : '"1/2[1 1 0]"';
  if (/^a\s*\//i.test(p) || /^a$/i.test(p)) {
    throw new InputError(`${field}: give the factor in lattice units without "a", e.g. ${hint} instead of "${original}".`);
  }
  const m = /^([+-]?(?:\d+\.?\d*|\.\d+))(?:\s*\/\s*(\d+\.?\d*|\.\d+))?$/.exec(p);
  if (m === null) throw new InputError(`${field}: cannot read the factor "${prefix}" in "${original}"; write e.g. ${hint}.`);
  const num = Number(m[1]);
  const den = m[2] === undefined ? 1 : Number(m[2]);
  if (!(den > 0) || !Number.isFinite(num) || !Number.isFinite(den) || num === 0) {
    throw new InputError(`${field}: the factor "${prefix}" in "${original}" must be a non-zero number or fraction; write e.g. ${hint}.`);
  }
  return num / den;
}
