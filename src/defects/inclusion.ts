/** A coherent spherical inclusion (Ashby & Brown 1963): centre, radius and constrained strain (or misfit). */
import type { Vec3 } from '../math/vec3.js';
import { fail, joinPath, number, onlyKeys, required } from '../scenario/check.js';
import { constrainedStrain } from '../elasticity/inclusion.js';
import { imagePointToCrystal } from '../geometry/frames.js';
import { sig } from '../format.js';
import type { DefectType } from './defectType.js';

/** A coherent spherical inclusion (Ashby & Brown 1963). */
export interface InclusionSpec {
  readonly type: 'inclusion';
  readonly label: string;
  /** Centre (image frame: x, y, depth). */
  readonly centre_nm: Vec3;
  readonly radius_nm: number;
  /** Constrained strain eps (given directly or from the misfit delta). */
  readonly strain: number;
  /** The misfit delta when given. */
  readonly misfit?: number;
}

function signed(x: number): string {
  return `${x >= 0 ? '+' : '-'}${Number(Math.abs(x).toPrecision(3))}`;
}

export const inclusion: DefectType<InclusionSpec> = {
  type: 'inclusion',
  positionKey: 'centre_nm',
  position: (d) => d.centre_nm,
  read(e) {
    const { o, path, material: m } = e;
    const at = e.at;
    onlyKeys(o, ['type', 'label', 'centre_nm', 'radius_nm', 'misfit', 'strain'], path);
    const centre_nm = e.requiredPoint('centre_nm', '[0, 0, 50]');
    const radius_nm = number(required(o, 'radius_nm', path, '5'), at('radius_nm'), { above: 0, max: 1000, unit: 'nm' });
    if ((o.misfit === undefined) === (o.strain === undefined)) fail(path, 'must give exactly one of "misfit" (delta) and "strain" (constrained strain eps)');
    if (o.misfit !== undefined) {
      const misfit = number(o.misfit, at('misfit'), { min: -0.2, max: 0.2 });
      // eps = delta (1 + nu) / (3 (1 - nu)) (Eshelby; Ashby & Brown 1963)
      return { type: 'inclusion', label: e.label('inclusion'), centre_nm, radius_nm, strain: constrainedStrain(misfit, m.elastic.poissonRatio), misfit };
    }
    return { type: 'inclusion', label: e.label('inclusion'), centre_nm, radius_nm, strain: number(o.strain, at('strain'), { min: -0.2, max: 0.2 }) };
  },
  refuseOutsideFoil(d, path, _m, t) {
    const z = d.centre_nm[2];
    if (z + d.radius_nm < 0 || z - d.radius_nm > t) {
      fail(joinPath(path, 'centre_nm'), `the inclusion (depth ${z} nm, radius ${d.radius_nm} nm) lies wholly outside the ${t} nm foil, where no crystal is; give a depth from 0 to ${t} nm (the foil thickness)`);
    }
  },
  model(d, ctx, out) {
    out.fields.push({ kind: 'inclusion', centre_nm: imagePointToCrystal(ctx.ref, d.centre_nm), radius_nm: d.radius_nm, strain: d.strain, poissonRatio: ctx.poissonRatio });
  },
  warnings(d, ctx) {
    const [x, y] = d.centre_nm;
    const hw = ctx.halfWidth_nm;
    const hh = ctx.halfHeight_nm;
    if (Math.abs(x) - d.radius_nm > hw || Math.abs(y) - d.radius_nm > hh) {
      return [`${ctx.where}: the inclusion (x ${x} nm, y ${y} nm) lies outside the ${sig(2 * hw, 4)} x ${sig(2 * hh, 4)} nm field of view; only the tail of its strain field reaches the image`];
    }
    return [];
  },
  line: () => undefined,
  visibilityRows: () => [],
  /** The given constrained strain and its negative (the sign of the misfit). */
  candidates(_sc, target, defectIndex) {
    const flip = (d: InclusionSpec): InclusionSpec => (d.misfit === undefined ? { ...d, strain: -d.strain } : { ...d, strain: -d.strain, misfit: -d.misfit });
    const name = (d: InclusionSpec) => (d.misfit === undefined ? `strain ${signed(d.strain)}` : `misfit ${signed(d.misfit)}`);
    const positive = target.strain >= 0 ? target : flip(target);
    const negative = flip(positive);
    return [positive, negative].map((d) => ({ label: name(d), kind: 'misfitSign' as const, defectIndex, defect: d, strain: d.strain }));
  },
  visibilityNote: () => ({ quantity: '' }),
};
