/**
 * A dissociated fcc dislocation: two straight Shockley partials (shockleySplit)
 * a ribbon width apart, with the intrinsic stacking fault between them carried
 * by the branch cuts. Both partials get their cut along the ribbon direction
 * u x n: between the partials R jumps by the fault vector b1 (crystal on the
 * +n side relative to the -n side), beyond partial 2 by b1 + b2 = b (a lattice
 * translation, invisible), and nowhere else. No separate fault phase is needed.
 */
import { add, scale } from '../math/vec3.js';
import { superpose } from './field.js';
import { straightDislocation } from './straightDislocation.js';
import { ribbonWidth_nm, shockleySplit } from './dissociation.js';
import { finiteVec3, positive } from './checks.js';
export function shockleyRibbon(opts) {
    const pair = shockleySplit(opts);
    const centre = finiteVec3(opts.centre_nm, 'ribbon centre_nm');
    const width = opts.width_nm === undefined
        ? ribbonWidth_nm(pair.b1_nm, pair.b2_nm, pair.line, opts.shearModulus_GPa, opts.poissonRatio, opts.sfe_mJ_per_m2)
        : positive(opts.width_nm, 'ribbon width_nm', 'give the partial separation in nm or omit it for the equilibrium width');
    const p1 = add(centre, scale(pair.ribbonDirection, -width / 2));
    const p2 = add(centre, scale(pair.ribbonDirection, width / 2));
    const common = {
        line: pair.line,
        poissonRatio: opts.poissonRatio,
        cutDirection: pair.ribbonDirection,
        ...(opts.coreRadius_nm === undefined ? {} : { coreRadius_nm: opts.coreRadius_nm }),
    };
    const field = superpose([
        straightDislocation({ ...common, b_nm: pair.b1_nm, point_nm: p1 }),
        straightDislocation({ ...common, b_nm: pair.b2_nm, point_nm: p2 }),
    ]);
    return { field, pair, width_nm: width, partial1_nm: p1, partial2_nm: p2 };
}
