/**
 * Directions and planes as text in the notation of their crystal: three
 * indices, or four (Miller-Bravais) for hexagonal crystals, with a common
 * fraction in front where one fits: "1/2[1 1 0]", "1/3[1 1 -2 0]", "(1 0 -1 1)".
 */
import type { Vec3 } from '../math/vec3.js';
import { type Lattice, usesFourIndices } from './lattice.js';
import { directionToFour, planeToFour } from './millerBravais.js';

function clean(x: number): number {
  const r = Math.round(x * 1e6) / 1e6;
  return r === 0 ? 0 : r;
}

/** "[1 1 0]", "1/2[1 1 0]", "1/3[1 1 -2 0]" or decimals when no small denominator fits. */
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
