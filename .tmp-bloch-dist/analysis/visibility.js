import { cross, dot, unit } from '../math/vec3.js';
import { directionToCartesian, planeNormalToCartesian } from '../crystal/lattice.js';
/** Threshold on |g.(b x u)| below which residual contrast is weak: m = g.(b x u)/8 < 0.08 (Hirsch et al. 1965; from memory). */
export const RESIDUAL_THRESHOLD = 0.64;
const EPS = 1e-6;
/** g.b is lattice-invariant: (hkl).[uvw]. */
export function gDotB(g, b) {
    return dot(g, b);
}
/** g.(b x u) in Cartesian form, u normalised; dimensionless. */
export function gDotBCrossU(lattice, g, b, line) {
    const gc = planeNormalToCartesian(lattice, g);
    const bc = directionToCartesian(lattice, b);
    const uc = unit(directionToCartesian(lattice, line));
    return dot(gc, cross(bc, uc));
}
export function judge(lattice, g, b, line) {
    const gb = clean(gDotB(g, b));
    const gbxu = line === undefined ? undefined : clean(gDotBCrossU(lattice, g, b, line));
    const agb = Math.abs(gb);
    if (agb < EPS) {
        if (gbxu === undefined)
            return { gb, verdict: 'invisible', rule: 'g.b = 0 (line unknown: residual contrast from g.(b x u) not assessed)' };
        const r = Math.abs(gbxu);
        if (r < EPS)
            return { gb, gbxu, verdict: 'invisible', rule: 'g.b = 0 and g.(b x u) = 0 (Hirsch et al. 1965)' };
        if (r < RESIDUAL_THRESHOLD)
            return { gb, gbxu, verdict: 'weak residual', rule: `g.b = 0, |g.(b x u)| = ${fmt(r)} < 0.64 (m < 0.08, Hirsch et al. 1965)` };
        return { gb, gbxu, verdict: 'visible', rule: `g.b = 0 but |g.(b x u)| = ${fmt(r)} >= 0.64: residual contrast (Hirsch et al. 1965)` };
    }
    const base = gbxu === undefined ? { gb } : { gb, gbxu };
    if (Math.abs(agb - Math.round(agb)) < EPS)
        return { ...base, verdict: 'visible', rule: `|g.b| = ${Math.round(agb)} (integer, nonzero)` };
    if (Math.abs(agb - 1 / 3) < EPS)
        return { ...base, verdict: 'invisible', rule: 'partial with |g.b| = 1/3: invisible (Howie & Whelan 1962)' };
    if (Math.abs(agb - 2 / 3) < EPS)
        return { ...base, verdict: 'visible', rule: 'partial with |g.b| = 2/3: visible (Howie & Whelan 1962)' };
    return { ...base, verdict: 'visible', rule: `|g.b| = ${fmt(agb)} (non-integer)` };
}
function clean(x) {
    const r = Math.round(x * 1e9) / 1e9;
    return Object.is(r, -0) ? 0 : r;
}
function fmt(x) {
    return (Math.round(x * 1000) / 1000).toString();
}
