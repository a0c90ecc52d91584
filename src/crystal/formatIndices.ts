/**
 * Directions and planes as text in the notation of their crystal: three
 * indices, or four (Miller-Bravais) for hexagonal crystals, with a common
 * fraction in front where one fits: "1/2[1 1 0]", "1/3[1 1 -2 0]", "(1 0 -1 1)";
 * and the list of low-index directions that zone searches walk through.
 */
import type { Vec3 } from '../math/vec3.js';
import { type Lattice, usesFourIndices } from './lattice.js';
import { directionToFour, planeToFour } from './millerBravais.js';

/** x rounded to 6 decimals, without a negative zero. */
export function clean(x: number): number {
  const r = Math.round(x * 1e6) / 1e6;
  return r === 0 ? 0 : r;
}

/**
 * "[1 1 0]", "1/2[1 1 0]", "1/3[1 1 -2 0]" or decimals (6 places) when no small denominator fits: the one
 * writer of lattice vectors (Burgers vectors, fault vectors, line directions) in labels, tables and messages.
 */
export function indicesWithFraction(v: readonly number[], open = '[', close = ']'): string {
  for (const d of [1, 2, 3, 4, 6, 8, 12]) {
    const k = v.map((x) => x * d);
    if (k.every((x) => Math.abs(x - Math.round(x)) < 1e-6)) {
      const body = `${open}${k.map((x) => Math.round(x) + 0).join(' ')}${close}`;
      return d === 1 ? body : `1/${d}${body}`;
    }
  }
  return `${open}${v.map((x) => String(clean(x))).join(' ')}${close}`;
}

/** A direction given in three lattice indices, written as the crystal's users write it. */
export function formatDirectionIn(l: Lattice, v: Vec3): string {
  return indicesWithFraction(usesFourIndices(l) ? directionToFour(v) : v);
}

/** A plane or reflection (h k l), written as (h k l) or, for hexagonal crystals, (h k i l). */
export function formatPlaneIn(l: Lattice, g: Vec3): string {
  const idx = usesFourIndices(l) ? planeToFour(g) : g;
  return `(${idx.map((x) => String(clean(x))).join(' ')})`;
}

/**
 * Every primitive lattice direction [uvw] (gcd 1) with |u|, |v|, |w| <= maxIndex, both signs,
 * u slowest and w fastest from -maxIndex up.
 */
export function primitiveDirections(maxIndex: number): Vec3[] {
  const gcd = (a: number, b: number): number => (b === 0 ? Math.abs(a) : gcd(b, a % b));
  const out: Vec3[] = [];
  for (let u = -maxIndex; u <= maxIndex; u++)
    for (let v = -maxIndex; v <= maxIndex; v++)
      for (let w = -maxIndex; w <= maxIndex; w++) if (gcd(gcd(u, v), w) === 1) out.push([u, v, w]);
  return out;
}
