import { add, dot, scale } from '../math/vec3.js';
import { directionToCartesian } from '../crystal/lattice.js';
import { crystalToImagePoint, imageFrame, imagePointToCrystal } from '../geometry/frames.js';
import { planeNormalToCartesian } from '../crystal/lattice.js';
const DEG = Math.PI / 180;
function conditionFrame(sc, cond, imageX_cart) {
    const l = sc.material.lattice;
    return imageFrame(directionToCartesian(l, cond.beam), imageX_cart, directionToCartesian(l, sc.foilNormal), sc.thickness_nm);
}
function referenceFrameOf(sc, imageX_cart) {
    const l = sc.material.lattice;
    return imageFrame(directionToCartesian(l, sc.beam), imageX_cart, directionToCartesian(l, sc.foilNormal), sc.thickness_nm);
}
/** Screen angle of g (degrees, counter-clockwise from +x, +y down in the image) in the scenario's own simulated image. */
export function simulatedGAngle_deg(sc, cond) {
    const f = conditionFrame(sc, cond, sc.imageX_cart);
    const g = planeNormalToCartesian(sc.material.lattice, cond.g);
    return Math.atan2(-dot(g, f.ey), dot(g, f.ex)) / DEG;
}
/** Move every position of a defect by f (positions are image-frame x, y, depth). */
export function moveDefect(d, f) {
    if ('centre_nm' in d)
        return { ...d, centre_nm: f(d.centre_nm) };
    if ('point_nm' in d)
        return { ...d, point_nm: f(d.point_nm) };
    return d;
}
/**
 * The scenario reduced to one condition, rendered on a width x height grid
 * of pixel_nm, with the image axes turned so that g points at angle_deg on
 * the screen (counter-clockwise from +x).
 */
export function conditionView(sc, cond, angle_deg, width, height, pixel_nm) {
    const f = conditionFrame(sc, cond, sc.imageX_cart);
    const g = planeNormalToCartesian(sc.material.lattice, cond.g);
    const psi = Math.atan2(dot(g, f.ey), dot(g, f.ex));
    const phi = psi + angle_deg * DEG;
    const imageX_cart = add(scale(f.ex, Math.cos(phi)), scale(f.ey, Math.sin(phi)));
    const oldRef = referenceFrameOf(sc, sc.imageX_cart);
    const newRef = referenceFrameOf(sc, imageX_cart);
    const move = (p) => crystalToImagePoint(newRef, imagePointToCrystal(oldRef, p));
    return {
        ...sc,
        imageX_cart,
        conditions: [cond],
        image: { width_px: width, height_px: height, pixel_nm },
        defects: sc.defects.map((d) => moveDefect(d, move)),
    };
}
