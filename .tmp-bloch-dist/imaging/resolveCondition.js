import { norm } from '../math/vec3.js';
import { directionToCartesian, planeNormalToCartesian } from '../crystal/lattice.js';
import { reflectionParameters } from '../scattering/reflection.js';
import { imageFrame } from '../geometry/frames.js';
export function resolveCondition(sc, c) {
    const m = sc.material;
    const r = reflectionParameters(m, c.g, sc.kV, { absorptionRatio: sc.absorption });
    let s;
    let src;
    switch (c.deviation.kind) {
        case 's':
            s = c.deviation.s_per_nm;
            src = 's';
            break;
        case 'w':
            s = c.deviation.w / r.xi_nm;
            src = 'w';
            break;
        case 'weakBeam':
            // Ewald sphere through n g (physics.md section 4; Cockayne, Ray & Whelan 1969)
            s = ((c.deviation.n - 1) * r.lambda_nm * r.g_per_nm * r.g_per_nm) / 2;
            src = `g(${c.deviation.n}g)`;
            break;
    }
    const frame = imageFrame(directionToCartesian(m.lattice, c.beam), sc.imageX_cart, directionToCartesian(m.lattice, sc.foilNormal), sc.thickness_nm);
    const g_cart = planeNormalToCartesian(m.lattice, c.g);
    return {
        id: c.id,
        g: c.g,
        g_cart,
        g_per_nm: norm(g_cart),
        d_nm: r.d_nm,
        lambda_nm: r.lambda_nm,
        braggAngle_rad: r.braggAngle_rad,
        xi_nm: r.xi_nm,
        xiAbs_nm: r.xiAbs_nm,
        xiAbs0_nm: r.xiAbs0_nm,
        s_per_nm: s,
        w: s * r.xi_nm,
        deviationSource: src,
        frame,
        beams: c.beams,
        beamDirection: c.beam,
    };
}
