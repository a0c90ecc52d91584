export function planeToFour(hkl) {
    return [hkl[0], hkl[1], -(hkl[0] + hkl[1]), hkl[2]];
}
/** Throws RangeError when i != -(h+k). */
export function planeFromFour(hkil) {
    if (Math.abs(hkil[0] + hkil[1] + hkil[2]) > 1e-9)
        throw new RangeError('in (hkil) the third index must equal -(h+k)');
    return [hkil[0], hkil[1], hkil[3]];
}
export function directionToFour(uvw) {
    const u = (2 * uvw[0] - uvw[1]) / 3;
    const v = (2 * uvw[1] - uvw[0]) / 3;
    return [u, v, -(u + v), uvw[2]];
}
/** Throws RangeError when t != -(u+v). */
export function directionFromFour(uvtw) {
    if (Math.abs(uvtw[0] + uvtw[1] + uvtw[2]) > 1e-9)
        throw new RangeError('in [uvtw] the third index must equal -(u+v)');
    return [uvtw[0] - uvtw[2], uvtw[1] - uvtw[2], uvtw[3]];
}
