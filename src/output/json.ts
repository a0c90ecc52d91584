/**
 * JSON text for thinfoil's outputs (stdout with --json, render.json,
 * identify.json, visibility.json). JSON has no Infinity or NaN, and
 * JSON.stringify would write them as null, which reads as "missing". A
 * quantity that does not exist or is unbounded (xi'_g without absorption,
 * the absorption length of a wave that is not absorbed) is written as the
 * string "none" instead, so every number in the output is a real number.
 */
export const NONE = 'none';

function finiteOrNone(_key: string, value: unknown): unknown {
  return typeof value === 'number' && !Number.isFinite(value) ? NONE : value;
}

export function jsonText(value: unknown, indent?: number): string {
  return JSON.stringify(value, finiteOrNone, indent);
}
