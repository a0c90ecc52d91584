/** A perfect fcc dislocation split into two Shockley partials with an intrinsic fault ribbon between them. */
import type { Vec3 } from '../math/vec3.js';
import { dot } from '../math/vec3.js';
import { directionToCartesian } from '../crystal/lattice.js';
import type { Material } from '../crystal/material.js';
import { InputError } from '../errors.js';
import { fail, number, onlyKeys, required } from '../scenario/check.js';
import { readDirection, readPlane } from '../scenario/parse.js';
import type { Elasticity } from '../scenario/types.js';
import { imagePointToCrystal } from '../geometry/frames.js';
import { anisotropicRibbonWidth_nm, ribbonPartialPoints, ribbonWidth_nm, shockleySplit, type ShockleyPair } from '../elasticity/dissociation.js';
import { materialStiffness } from '../elasticity/stiffness.js';
import type { DislocationFieldSpec } from '../imaging/fieldSpecs.js';
import { modelOf, only } from '../analysis/visibilityTable.js';
import type { DefectType } from './defectType.js';
import { burgersCandidates, burgersNote, dislocationWithCut, lineWarnings, refuseLineOutsideFoil } from './lineDefect.js';

/** A perfect fcc dislocation split into two Shockley partials with an intrinsic fault ribbon between them. */
export interface DissociatedSpec {
  readonly type: 'dissociated';
  readonly label: string;
  /** Perfect Burgers vector (a/2<110>). */
  readonly b: Vec3;
  /** Glide plane {111}. */
  readonly plane: Vec3;
  readonly line: Vec3;
  /** Midpoint between the partials (image frame). */
  readonly point_nm: Vec3;
  /** Partial separation; omitted: the isotropic equilibrium width from the stacking-fault energy. */
  readonly separation_nm?: number;
  readonly core_nm?: number;
}

/** The two Shockley partials (in the order that makes the fault between them intrinsic) of a dissociated defect. */
export function dissociationPair(m: Material, d: DissociatedSpec): ShockleyPair {
  const l = m.lattice;
  try {
    return shockleySplit({ lattice: l, b: d.b, planeNormal: d.plane, lineCartesian: directionToCartesian(l, d.line) });
  } catch (e) {
    if (e instanceof InputError) throw new InputError(`${d.label}: ${e.message}`);
    throw e;
  }
}

/**
 * Width of the ribbon a dissociated defect gets (nm): as given, or the
 * equilibrium width from the stacking-fault energy, with the anisotropic
 * energy factors (Hirth & Lothe ch. 13) or the isotropic formula (ch. 10).
 */
export function dissociationWidth_nm(m: Material, d: DissociatedSpec, pair: ShockleyPair = dissociationPair(m, d), elasticity: Elasticity = 'anisotropic'): number {
  if (d.separation_nm !== undefined) return d.separation_nm;
  const gamma = m.stackingFaultEnergy_mJ_per_m2 as number;
  return elasticity === 'anisotropic'
    ? anisotropicRibbonWidth_nm(pair.b1_nm, pair.b2_nm, pair.line, materialStiffness(m), gamma)
    : ribbonWidth_nm(pair.b1_nm, pair.b2_nm, pair.line, m.elastic.shearModulus_GPa, m.elastic.poissonRatio, gamma);
}

export const dissociated: DefectType<DissociatedSpec> = {
  type: 'dissociated',
  positionKey: 'point_nm',
  position: (d) => d.point_nm,
  read(e) {
    const { o, path, material: m } = e;
    const at = e.at;
    onlyKeys(o, ['type', 'label', 'b', 'line', 'plane', 'point_nm', 'separation_nm', 'core_nm'], path);
    if (m.lattice.system !== 'cubic') fail(at('type'), 'dissociation into Shockley partials is available for fcc (cubic) materials only');
    const b = e.burgers('1/2[1 -1 0]');
    const plane = readPlane(required(o, 'plane', path, '[1, 1, 1]'), at('plane'), m);
    const line = readDirection(required(o, 'line', path, '[1, -1, 0]'), at('line'), m);
    const sep = o.separation_nm === undefined ? {} : { separation_nm: number(o.separation_nm, at('separation_nm'), { above: 0, max: 1000, unit: 'nm' }) };
    if (o.separation_nm === undefined && m.stackingFaultEnergy_mJ_per_m2 === undefined) {
      fail(at('separation_nm'), `is needed because material "${m.name}" has no stacking-fault energy; give the partial separation in nm`);
    }
    if (o.separation_nm === undefined && !((m.stackingFaultEnergy_mJ_per_m2 ?? 0) >= 1)) {
      fail(at('separation_nm'), `is needed because the stacking-fault energy of "${m.name}" is ${m.stackingFaultEnergy_mJ_per_m2} mJ/m^2 (below 1), so the partials would part without bound; give the partial separation in nm or a positive energy`);
    }
    return { type: 'dissociated', label: e.label('dissociated dislocation'), b, plane, line, point_nm: e.point('point_nm'), ...sep, ...e.core() };
  },
  refuseOutsideFoil: refuseLineOutsideFoil,
  /** The two Shockley partials, each with its cut along the ribbon (intrinsic fault between them). */
  model(d, ctx, out) {
    const m = ctx.sc.material;
    const pair = dissociationPair(m, d);
    const width = dissociationWidth_nm(m, d, pair, ctx.sc.elasticity);
    const centre = imagePointToCrystal(ctx.ref, d.point_nm);
    const [p1, p2] = ribbonPartialPoints(pair, centre, width);
    for (const [b, p] of [[pair.b1_nm, p1], [pair.b2_nm, p2]] as const) {
      const x = dislocationWithCut(b, pair.line, p, ctx.poissonRatio, ctx.stiffness_GPa, pair.ribbonDirection, d.core_nm);
      out.fields.push(x.field);
      out.surfaces.push(x.surface);
    }
  },
  warnings: lineWarnings,
  line: (d) => d.line,
  visibilityRows(sc, d, row) {
    const m = modelOf(sc, d);
    const pair = dissociationPair(sc.material, d);
    return [
      // the whole ribbon, measured across its first partial (the strip crosses both)
      row(`${d.label} (perfect b)`, d.b, d.line, () => ({ model: m, line: m.fields[0] as DislocationFieldSpec })),
      row(`${d.label}, partial 1`, pair.b1, d.line, () => only(m, 0)),
      row(`${d.label}, partial 2`, pair.b2, d.line, () => only(m, 1)),
    ];
  },
  // only the b lying in the glide plane
  candidates: (sc, d, i) => burgersCandidates(sc, i, (b) => Math.abs(dot(d.plane, b)) < 1e-9),
  visibilityNote: burgersNote,
};
