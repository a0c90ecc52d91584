/**
 * The g.b visibility table: for each Burgers vector (defects and candidates)
 * under each reflection, g.b, g.(b x u) and a verdict with the rule that gave
 * it (physics.md section 6; Hirsch et al. 1965; Howie & Whelan 1962).
 */
import type { Vec3 } from '../math/vec3.js';
import { cross, dot, unit } from '../math/vec3.js';
import type { Lattice } from '../crystal/lattice.js';
import { directionToCartesian, planeNormalToCartesian } from '../crystal/lattice.js';

export type Verdict = 'visible' | 'invisible' | 'weak residual';

export interface VisibilityEntry {
  readonly gb: number;
  /** g.(b x u) with u the unit line direction; undefined when the line is unknown. */
  readonly gbxu?: number;
  readonly verdict: Verdict;
  readonly rule: string;
}

/** Threshold on |g.(b x u)| below which residual contrast is weak: m = g.(b x u)/8 < 0.08 (Hirsch et al. 1965; from memory). */
export const RESIDUAL_THRESHOLD = 0.64;
const EPS = 1e-6;

/** g.b is lattice-invariant: (hkl).[uvw]. */
export function gDotB(g: Vec3, b: Vec3): number {
  return dot(g, b);
}

/** g.(b x u) in Cartesian form, u normalised; dimensionless. */
export function gDotBCrossU(lattice: Lattice, g: Vec3, b: Vec3, line: Vec3): number {
  const gc = planeNormalToCartesian(lattice, g);
  const bc = directionToCartesian(lattice, b);
  const uc = unit(directionToCartesian(lattice, line));
  return dot(gc, cross(bc, uc));
}

/** g.b_edge with b_edge = b - (b.u) u, the edge component of b. */
export function gDotEdge(lattice: Lattice, g: Vec3, b: Vec3, line: Vec3): number {
  const gc = planeNormalToCartesian(lattice, g);
  const bc = directionToCartesian(lattice, b);
  const uc = unit(directionToCartesian(lattice, line));
  const bu = dot(bc, uc);
  return dot(gc, [bc[0] - bu * uc[0], bc[1] - bu * uc[1], bc[2] - bu * uc[2]]);
}

export function judge(lattice: Lattice, g: Vec3, b: Vec3, line?: Vec3): VisibilityEntry {
  const gb = clean(gDotB(g, b));
  const gbxu = line === undefined ? undefined : clean(gDotBCrossU(lattice, g, b, line));
  const agb = Math.abs(gb);
  if (agb < EPS) {
    if (gbxu === undefined) return { gb, verdict: 'invisible', rule: 'g.b = 0 (line unknown: residual contrast from g.(b x u) not assessed)' };
    const r = Math.abs(gbxu);
    if (r < EPS) {
      // g.b = 0 and g.(b x u) = 0 leave the x y / rho^2 term of the edge component unless g.b_edge = 0 too
      // (isotropic field, Hirth & Lothe 1982 ch. 3): a mixed dislocation with g.u != 0 keeps some contrast.
      const ge = Math.abs(clean(gDotEdge(lattice, g, b, line as Vec3)));
      if (ge < EPS) return { gb, gbxu, verdict: 'invisible', rule: 'g.b = 0 and g.(b x u) = 0 (Hirsch et al. 1965)' };
      return { gb, gbxu, verdict: 'weak residual', rule: `g.b = 0 and g.(b x u) = 0, but g.b_edge = ${fmt(ge)}: the edge component's x y term remains (Hirth & Lothe 1982)` };
    }
    if (r < RESIDUAL_THRESHOLD) return { gb, gbxu, verdict: 'weak residual', rule: `g.b = 0, |g.(b x u)| = ${fmt(r)} < 0.64 (m < 0.08, Hirsch et al. 1965)` };
    return { gb, gbxu, verdict: 'visible', rule: `g.b = 0 but |g.(b x u)| = ${fmt(r)} >= 0.64: residual contrast (Hirsch et al. 1965)` };
  }
  const base = gbxu === undefined ? { gb } : { gb, gbxu };
  if (Math.abs(agb - Math.round(agb)) < EPS) return { ...base, verdict: 'visible', rule: `|g.b| = ${Math.round(agb)} (integer, nonzero)` };
  if (Math.abs(agb - 1 / 3) < EPS) return { ...base, verdict: 'invisible', rule: 'partial with |g.b| = 1/3: invisible (Howie & Whelan 1962)' };
  if (Math.abs(agb - 2 / 3) < EPS) return { ...base, verdict: 'visible', rule: 'partial with |g.b| = 2/3: visible (Howie & Whelan 1962)' };
  return { ...base, verdict: 'visible', rule: `|g.b| = ${fmt(agb)} (non-integer)` };
}

function clean(x: number): number {
  const r = Math.round(x * 1e9) / 1e9;
  return Object.is(r, -0) ? 0 : r;
}

function fmt(x: number): string {
  return (Math.round(x * 1000) / 1000).toString();
}
