/**
 * What the foil surfaces do to a scenario's dislocation fields, in words and as
 * plain data, for render.json, reports and figure captions (beside the
 * elasticity note, src/elasticity/elasticityNote.ts).
 */
import type { Scenario } from '../scenario/types.js';
import { correctableGeometry } from '../elasticity/surfaceRelaxation.js';
import { directionToCartesian } from '../crystal/lattice.js';
import { defectModel } from './fieldSpecs.js';

export interface SurfacesDescription {
  readonly setting: 'relaxed' | 'infinite';
  /** One sentence for captions and reports. */
  readonly text: string;
  /** Straight lines (dislocations and partials) in the scenario, and how many of them carry a surface correction. */
  readonly lines: number;
  readonly correctedLines: number;
  /** Lines per geometry: parallel to the surfaces, normal to them, inclined. */
  readonly geometry: { readonly parallel: number; readonly normal: number; readonly inclined: number };
  /** What is exact and what is approximated or left out. */
  readonly approximations: readonly string[];
}

const METHOD =
  'the screw component of a line parallel to the surfaces gets its infinite series of image screws (closed form; exact for a screw in an isotropic plate), ' +
  'that of a line normal to the surfaces the Eshelby & Stroh (1951) plate twist (image series of half-space twists; exact for a screw in an isotropic plate)';

export function describeSurfaces(sc: Scenario): SurfacesDescription {
  const fields = defectModel(sc).fields.flatMap((f) => (f.kind === 'dislocation' ? [f] : []));
  const n = fields.length;
  const geometry = { parallel: 0, normal: 0, inclined: 0 };
  const normal = directionToCartesian(sc.material.lattice, sc.foilNormal);
  let corrected = 0;
  for (const f of fields) {
    geometry[correctableGeometry(f.line, normal)]++;
    if (f.surfaceCorrection !== undefined) corrected++;
  }
  if (sc.surfaces === 'infinite') {
    return {
      setting: 'infinite',
      text: 'infinite-medium dislocation fields (no free-surface relaxation; "surfaces": "infinite")',
      lines: n,
      correctedLines: 0,
      geometry,
      approximations: ['the foil surfaces are not traction-free: the infinite-medium field is used throughout'],
    };
  }
  const approximations = [
    'edge components of lines parallel or normal to the surfaces are not corrected (their in-plane or normal tractions on the surfaces remain)',
    'lines inclined to the surfaces keep the infinite-medium field (the Yoffe 1961 / Shaibani & Hazzledine 1981 correction is not implemented)',
    'inclusions are not relaxed at the surfaces',
  ];
  if (sc.elasticity === 'anisotropic') {
    approximations.unshift('the correction is the isotropic one, added to the anisotropic (Stroh) infinite field: in an anisotropic crystal the surface tractions are reduced, not exactly cancelled');
  }
  const count = n === 0 ? 'no straight lines in this scenario' : `${corrected} of ${n} straight line${n === 1 ? '' : 's'} corrected`;
  return {
    setting: 'relaxed',
    text: `relaxed foil surfaces (${count}): ${METHOD}; edge components and lines inclined to the surfaces keep the infinite-medium field${sc.elasticity === 'anisotropic' ? '; the correction is isotropic, added to the anisotropic field' : ''}`,
    lines: n,
    correctedLines: corrected,
    geometry,
    approximations,
  };
}
