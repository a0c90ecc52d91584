/**
 * Crystal point-group operations and families of symmetry-equivalent
 * directions and planes.
 *
 * The operations of the holohedries m-3m (cubic, 48) and 6/mmm (hexagonal,
 * 24) are built as orthogonal matrices in the Cartesian frame of lattice.ts
 * (a1 along x, a2 in the x-y plane, c along z for hexagonal) and converted to
 * lattice coordinates: for directions W = M^-1 R M with M the matrix whose
 * columns are a1, a2, a3; for plane indices W* = N^-1 R N with N the matrix
 * whose columns are b1, b2, b3 (International Tables Vol. A, ch. 1.5).
 * In lattice coordinates all these operations are integer matrices.
 */
import { InputError } from '../errors.js';
import { det, inverse, mulMM, mulMV, transpose } from '../math/vec3.js';
import { directBasis, reciprocalBasis } from './lattice.js';
import { parseVectorWithFraction } from './indices.js';
import { directionFromFour, planeFromFour } from './millerBravais.js';
const TOL = 1e-9;
function permutations3() {
    return [
        [0, 1, 2],
        [0, 2, 1],
        [1, 0, 2],
        [1, 2, 0],
        [2, 0, 1],
        [2, 1, 0],
    ];
}
function cubicOperations() {
    const ops = [];
    for (const p of permutations3()) {
        for (let signs = 0; signs < 8; signs++) {
            const s = [signs & 1 ? -1 : 1, signs & 2 ? -1 : 1, signs & 4 ? -1 : 1];
            const row = (i) => [p[i] === 0 ? s[i] : 0, p[i] === 1 ? s[i] : 0, p[i] === 2 ? s[i] : 0];
            ops.push([row(0), row(1), row(2)]);
        }
    }
    return ops;
}
function hexagonalOperations() {
    const proper = [];
    for (let k = 0; k < 6; k++) {
        // rotation by k*60 degrees about z
        const c = snap(Math.cos((k * Math.PI) / 3));
        const s = snap(Math.sin((k * Math.PI) / 3));
        proper.push([
            [c, -s, 0],
            [s, c, 0],
            [0, 0, 1],
        ]);
    }
    for (let k = 0; k < 6; k++) {
        // two-fold rotation about the in-plane axis at angle phi = k*30 degrees
        const c = snap(Math.cos((k * Math.PI) / 3));
        const s = snap(Math.sin((k * Math.PI) / 3));
        proper.push([
            [c, s, 0],
            [s, -c, 0],
            [0, 0, -1],
        ]);
    }
    return [...proper, ...proper.map(negate)];
}
function negate(m) {
    return [
        [-m[0][0], -m[0][1], -m[0][2]],
        [-m[1][0], -m[1][1], -m[1][2]],
        [-m[2][0], -m[2][1], -m[2][2]],
    ];
}
function snap(x) {
    const r = Math.round(x * 2) / 2;
    return Math.abs(x - r) < TOL ? r + 0 : x;
}
function identityFirst(ops) {
    const isId = (m) => m.every((row, i) => row.every((v, j) => v === (i === j ? 1 : 0)));
    const i = ops.findIndex(isId);
    return [ops[i], ...ops.slice(0, i), ...ops.slice(i + 1)];
}
const CARTESIAN = {
    cubic: identityFirst(cubicOperations()),
    hexagonal: identityFirst(hexagonalOperations()),
};
/** Point-group operations (orthogonal matrices, identity first) in the Cartesian frame: 48 for m-3m, 24 for 6/mmm. */
export function pointGroupCartesian(system) {
    return CARTESIAN[system];
}
/** Proper rotations only (det = +1): 24 for cubic, 12 for hexagonal. */
export function properRotationsCartesian(system) {
    return CARTESIAN[system].filter((m) => det(m) > 0);
}
/** The point-group family the lattice belongs to; InputError for other crystal systems. */
export function pointGroupSystem(lattice) {
    if (lattice.system === 'cubic' || lattice.system === 'hexagonal')
        return lattice.system;
    throw new InputError(`material.lattice: symmetry families are available for cubic and hexagonal crystals only, not ${lattice.system}.`);
}
/**
 * Point-group operations acting on the lattice components of a direction
 * [uvw] (kind 'direction') or on plane indices (hkl) (kind 'plane'), as
 * integer matrices, identity first.
 */
export function latticeOperations(lattice, kind) {
    const basis = kind === 'direction' ? directBasis(lattice) : reciprocalBasis(lattice);
    const M = transpose(basis); // columns are the basis vectors
    const Minv = inverse(M);
    return pointGroupCartesian(pointGroupSystem(lattice)).map((R) => {
        const W = mulMM(Minv, mulMM(R, M));
        return W.map((row) => row.map(snapInteger));
    });
}
function snapInteger(x) {
    const r = Math.round(x);
    if (Math.abs(x - r) > 1e-6)
        throw new RangeError('point-group operation is not integral in lattice coordinates');
    return r + 0;
}
const same = (a, b) => Math.abs(a[0] - b[0]) < TOL && Math.abs(a[1] - b[1]) < TOL && Math.abs(a[2] - b[2]) < TOL;
const neg = (a) => [-a[0] + 0, -a[1] + 0, -a[2] + 0];
/** v or -v, whichever has its first non-zero component positive. */
function positiveSense(v) {
    for (const x of v) {
        if (x > TOL)
            return v;
        if (x < -TOL)
            return neg(v);
    }
    return v;
}
/**
 * The distinct symmetry-equivalent vectors of `vector` (lattice components,
 * 3-index), the given vector first. With collapseSign, v and -v count once
 * (the given vector keeps its sign, the others are shown with their first
 * non-zero component positive). Examples: 1/2<110> in a cubic crystal gives
 * 6 vectors collapsed, 12 signed; 1/3<11-20> in a hexagonal one 3 / 6.
 */
export function expandFamily(material, vector, kind, collapseSign) {
    if (!vector.every(Number.isFinite) || vector.every((x) => Math.abs(x) < TOL)) {
        throw new RangeError('expandFamily needs a finite, non-zero vector');
    }
    const out = [];
    for (const W of latticeOperations(material.lattice, kind)) {
        const img = mulMV(W, vector).map((x) => (Math.abs(x) < TOL ? 0 : x));
        const isNew = !out.some((v) => same(v, img) || (collapseSign && same(v, neg(img))));
        if (isNew)
            out.push(out.length === 0 || !collapseSign ? img : positiveSense(img));
    }
    return out;
}
/**
 * Parse a family written with angle brackets (directions) or braces
 * (planes), with an optional fraction: "1/2<110>", "<111>", "{111}",
 * "1/6<1 1 -2>"; hexagonal crystals take 4-index Miller-Bravais notation,
 * "1/3<11-20>", "<0001>", "{10-10}". Signs are kept apart unless
 * `collapseSign` is true (crystallographic convention: <110> has 12 members).
 */
export function parseFamily(text, material, options = {}) {
    const field = options.field ?? 'family';
    const system = pointGroupSystem(material.lattice);
    const n = system === 'hexagonal' ? 4 : 3;
    const example = system === 'hexagonal' ? '"1/3<11-20>" or "{10-10}"' : '"1/2<110>" or "{111}"';
    const t = String(text).trim();
    const kind = t.includes('<') && t.endsWith('>') ? 'direction' : t.includes('{') && t.endsWith('}') ? 'plane' : null;
    if (kind === null) {
        throw new InputError(`${field}: write a family with <...> for directions or {...} for planes, e.g. ${example}, not "${text}".`);
    }
    const values = parseVectorWithFraction(t, field, n);
    const v = n === 4
        ? kind === 'direction'
            ? directionFromFour(values)
            : planeFromFour(values)
        : [values[0], values[1], values[2]];
    const representative = v.map((x) => (Math.abs(x) < TOL ? 0 : x));
    return { kind, representative, members: expandFamily(material, representative, kind, options.collapseSign ?? false) };
}
