export const add = (a, b) => [a[0] + b[0], a[1] + b[1], a[2] + b[2]];
export const sub = (a, b) => [a[0] - b[0], a[1] - b[1], a[2] - b[2]];
export const scale = (a, k) => [a[0] * k, a[1] * k, a[2] * k];
export const dot = (a, b) => a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
export const cross = (a, b) => [
    a[1] * b[2] - a[2] * b[1],
    a[2] * b[0] - a[0] * b[2],
    a[0] * b[1] - a[1] * b[0],
];
export const norm = (a) => Math.hypot(a[0], a[1], a[2]);
export function unit(a) {
    const n = norm(a);
    if (!(n > 0))
        throw new RangeError('cannot normalise a zero vector');
    return [a[0] / n, a[1] / n, a[2] / n];
}
/** Matrix (rows) times column vector. */
export const mulMV = (m, v) => [dot(m[0], v), dot(m[1], v), dot(m[2], v)];
export const transpose = (m) => [
    [m[0][0], m[1][0], m[2][0]],
    [m[0][1], m[1][1], m[2][1]],
    [m[0][2], m[1][2], m[2][2]],
];
export function mulMM(a, b) {
    const bt = transpose(b);
    return [
        [dot(a[0], bt[0]), dot(a[0], bt[1]), dot(a[0], bt[2])],
        [dot(a[1], bt[0]), dot(a[1], bt[1]), dot(a[1], bt[2])],
        [dot(a[2], bt[0]), dot(a[2], bt[1]), dot(a[2], bt[2])],
    ];
}
export const det = (m) => dot(m[0], cross(m[1], m[2]));
export function inverse(m) {
    const d = det(m);
    if (d === 0)
        throw new RangeError('singular matrix');
    const c0 = cross(m[1], m[2]);
    const c1 = cross(m[2], m[0]);
    const c2 = cross(m[0], m[1]);
    // inverse = adj / det; columns of the inverse are the cross products
    return transpose([scale(c0, 1 / d), scale(c1, 1 / d), scale(c2, 1 / d)]);
}
/** Angle between two vectors in radians, clamped for round-off. */
export function angle(a, b) {
    const c = dot(a, b) / (norm(a) * norm(b));
    return Math.acos(Math.max(-1, Math.min(1, c)));
}
