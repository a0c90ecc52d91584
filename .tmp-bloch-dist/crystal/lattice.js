/**
 * Crystal lattices: cell parameters, metric tensors and the Cartesian frame.
 *
 * Cartesian frame convention (standard crystallographic setting, e.g.
 * International Tables Vol. B, ch. 1.1): a1 along x, a2 in the x-y plane,
 * a3 completing a right-handed set. Lengths in nm. Reciprocal vectors carry
 * no 2*pi: a_i . b_j = delta_ij, so |g| = 1/d in nm^-1.
 */
import { inverse, transpose, mulMV, norm, dot, angle } from '../math/vec3.js';
const DEG = Math.PI / 180;
/** Build a lattice from the parameters a system needs (others follow by symmetry). */
export function makeLattice(system, p) {
    const a = p.a;
    switch (system) {
        case 'cubic':
            return { system, a_nm: a, b_nm: a, c_nm: a, alpha_deg: 90, beta_deg: 90, gamma_deg: 90 };
        case 'tetragonal':
            return { system, a_nm: a, b_nm: a, c_nm: req(p.c, 'c'), alpha_deg: 90, beta_deg: 90, gamma_deg: 90 };
        case 'orthorhombic':
            return { system, a_nm: a, b_nm: req(p.b, 'b'), c_nm: req(p.c, 'c'), alpha_deg: 90, beta_deg: 90, gamma_deg: 90 };
        case 'hexagonal':
            return { system, a_nm: a, b_nm: a, c_nm: req(p.c, 'c'), alpha_deg: 90, beta_deg: 90, gamma_deg: 120 };
        case 'trigonal': {
            // hexagonal setting when c is given, rhombohedral setting when alpha is given
            if (p.c !== undefined)
                return { system, a_nm: a, b_nm: a, c_nm: p.c, alpha_deg: 90, beta_deg: 90, gamma_deg: 120 };
            const al = req(p.alpha, 'alpha');
            return { system, a_nm: a, b_nm: a, c_nm: a, alpha_deg: al, beta_deg: al, gamma_deg: al };
        }
    }
}
function req(v, name) {
    if (v === undefined)
        throw new RangeError(`lattice parameter ${name} is required for this crystal system`);
    return v;
}
/** Rows are the Cartesian components (nm) of a1, a2, a3. */
export function directBasis(l) {
    const ca = Math.cos(l.alpha_deg * DEG);
    const cb = Math.cos(l.beta_deg * DEG);
    const cg = Math.cos(l.gamma_deg * DEG);
    const sg = Math.sin(l.gamma_deg * DEG);
    const v = Math.sqrt(1 - ca * ca - cb * cb - cg * cg + 2 * ca * cb * cg);
    const a1 = [l.a_nm, 0, 0];
    const a2 = [l.b_nm * cg, l.b_nm * sg, 0];
    const a3 = [l.c_nm * cb, (l.c_nm * (ca - cb * cg)) / sg, (l.c_nm * v) / sg];
    return [clean(a1), clean(a2), clean(a3)];
}
function clean(v) {
    return [Math.abs(v[0]) < 1e-15 ? 0 : v[0], Math.abs(v[1]) < 1e-15 ? 0 : v[1], Math.abs(v[2]) < 1e-15 ? 0 : v[2]];
}
/** Rows are the Cartesian components (nm^-1) of b1, b2, b3 with a_i . b_j = delta_ij. */
export function reciprocalBasis(l) {
    return transpose(inverse(directBasis(l)));
}
/** Direct metric tensor G_ij = a_i . a_j (nm^2). */
export function directMetric(l) {
    const A = directBasis(l);
    return [
        [dot(A[0], A[0]), dot(A[0], A[1]), dot(A[0], A[2])],
        [dot(A[1], A[0]), dot(A[1], A[1]), dot(A[1], A[2])],
        [dot(A[2], A[0]), dot(A[2], A[1]), dot(A[2], A[2])],
    ];
}
/** Reciprocal metric tensor G*_ij = b_i . b_j (nm^-2), the inverse of the direct metric. */
export function reciprocalMetric(l) {
    return inverse(directMetric(l));
}
export function cellVolume_nm3(l) {
    const A = directBasis(l);
    return Math.abs(dot(A[0], [A[1][1] * A[2][2] - A[1][2] * A[2][1], A[1][2] * A[2][0] - A[1][0] * A[2][2], A[1][0] * A[2][1] - A[1][1] * A[2][0]]));
}
/** Cartesian vector (nm) of a direction [uvw] in lattice units. */
export function directionToCartesian(l, uvw) {
    return mulMV(transpose(directBasis(l)), uvw);
}
/** Cartesian vector (nm^-1) of a reciprocal-lattice vector g = (hkl). */
export function planeNormalToCartesian(l, hkl) {
    return mulMV(transpose(reciprocalBasis(l)), hkl);
}
/** Lattice components [uvw] of a Cartesian vector (nm). */
export function cartesianToDirection(l, r) {
    return mulMV(inverse(transpose(directBasis(l))), r);
}
/** Interplanar spacing d_hkl in nm. */
export function dSpacing_nm(l, hkl) {
    return 1 / gLength_per_nm(l, hkl);
}
/** |g| in nm^-1. */
export function gLength_per_nm(l, hkl) {
    return norm(planeNormalToCartesian(l, hkl));
}
/** Angle (radians) between two directions. */
export function angleBetweenDirections(l, u, v) {
    return angle(directionToCartesian(l, u), directionToCartesian(l, v));
}
/** Angle (radians) between two plane normals. */
export function angleBetweenPlanes(l, g, h) {
    return angle(planeNormalToCartesian(l, g), planeNormalToCartesian(l, h));
}
/** Angle (radians) between a direction and a plane normal. */
export function angleDirectionPlane(l, u, g) {
    return angle(directionToCartesian(l, u), planeNormalToCartesian(l, g));
}
/** True when the lattice is described with Miller-Bravais (4-index) notation. */
export function usesFourIndices(l) {
    return l.gamma_deg === 120 && l.alpha_deg === 90 && l.beta_deg === 90;
}
