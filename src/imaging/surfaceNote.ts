/**
 * What the foil surfaces do to a scenario's dislocation and inclusion fields, in words and as
 * plain data, for render.json, reports and figure captions (beside the
 * elasticity note, src/elasticity/elasticityNote.ts).
 */
import type { Scenario } from '../scenario/types.js';
import { correctableGeometry, type SurfaceCorrectionKind } from '../elasticity/surfaceRelaxation.js';
import { directionToCartesian } from '../crystal/lattice.js';
import { defectModel } from './fieldSpecs.js';

export interface SurfacesDescription {
  readonly setting: 'relaxed' | 'infinite';
  /** One sentence for captions and reports. */
  readonly text: string;
  /** Straight lines (dislocations and partials) in the scenario, and how many of them carry a surface correction. */
  readonly lines: number;
  readonly correctedLines: number;
  /** Inclusions in the scenario, and how many of them carry the half-space corrections (spheres wholly inside the foil). */
  readonly inclusions: number;
  readonly correctedInclusions: number;
  /** Lines per geometry: parallel to the surfaces, normal to them, inclined. */
  readonly geometry: { readonly parallel: number; readonly normal: number; readonly inclined: number };
  /** What is exact and what is approximated or left out. */
  readonly approximations: readonly string[];
}

/** What each correction does, in words. */
const KIND_TEXT: Readonly<Record<SurfaceCorrectionKind, string>> = {
  'parallel-screw-images':
    'lines parallel to the surfaces: the screw component gets its infinite series of image screws (closed form; exact for a screw in an isotropic plate); chosen for pure screws, so nothing else is left to correct',
  'parallel-edge-plate':
    "lines parallel to the surfaces: the screw component gets its infinite series of image screws (exact for a screw in an isotropic plate), the edge component the exact isotropic plate correction (half-space image of each surface, Head 1953, plus the Fourier solution of the strip for what each image leaves on the other surface; both surfaces traction-free to about 1e-6 of the unrelaxed traction at any distance; the far halves of the foil turn by -+ half the kink -6 (b.m) d (t - d)/t^3 about u, m = n x u across the line, d its depth, none at the line)",
  'parallel-stroh-plate':
    'lines parallel to the surfaces: the exact anisotropic plate correction (Stroh formalism, every Burgers vector: the anisotropic half-space image of each surface plus the Fourier solution of the anisotropic strip for what each image leaves on the other surface; both surfaces traction-free to about 1e-6 of the unrelaxed traction at any distance; the far halves of the foil turn by -+ half the kink -6 (b.m + lambda b.u) d (t - d)/t^3 of anisotropic pure bending about u, m = n x u across the line, d its depth, none at the line)',
  'normal-screw-twist':
    'lines normal to the surfaces: the Eshelby & Stroh (1951) plate twist (exact for a screw in an isotropic plate); chosen for pure screws, so nothing else is left to correct',
  'normal-edge-half-space':
    'lines normal to the surfaces with an edge component: the screw component gets the Eshelby & Stroh (1951) plate twist (exact for a screw in an isotropic plate), the edge component the isotropic half-space correction of each surface (2D Fourier solution of the surface tractions, as for inclined lines; each surface is freed on its own, the correction of one leaves a traction on the other)',
  'inclined-half-space':
    'lines inclined to the surfaces: the isotropic half-space correction of each surface where the line meets it (2D Fourier solution of the surface tractions, every Burgers vector; each surface is freed on its own, the correction of one leaves a traction on the other; tabulated over directions from the emergence point and interpolated)',
};

/** What the inclusion correction does, in words. */
const INCLUSION_TEXT =
  'inclusions wholly inside the foil: the half-space correction of a centre of dilatation (Mindlin & Cheng 1950) for each surface, isotropic; each surface is freed exactly on its own, the correction of one leaves a traction on the other (no repeated reflections: about 1 % of the unrelaxed traction for a sphere 6 nm below a surface of a 50 nm foil, 19 % at mid-foil)';

export function describeSurfaces(sc: Scenario): SurfacesDescription {
  const model = defectModel(sc).fields;
  const fields = model.flatMap((f) => (f.kind === 'dislocation' ? [f] : []));
  const spheres = model.flatMap((f) => (f.kind === 'inclusion' ? [f] : []));
  const correctedInclusions = spheres.filter((f) => f.surfaceCorrection !== undefined).length;
  const n = fields.length;
  const geometry = { parallel: 0, normal: 0, inclined: 0 };
  const normal = directionToCartesian(sc.material.lattice, sc.foilNormal);
  const kinds = new Set<SurfaceCorrectionKind>();
  let corrected = 0;
  for (const f of fields) {
    geometry[correctableGeometry(f.line, normal)]++;
    if (f.surfaceCorrection !== undefined) {
      corrected++;
      kinds.add(f.surfaceCorrection.kind);
    }
  }
  if (sc.surfaces === 'infinite') {
    return {
      setting: 'infinite',
      text: 'infinite-medium dislocation fields (no free-surface relaxation; "surfaces": "infinite")',
      lines: n,
      correctedLines: 0,
      inclusions: spheres.length,
      correctedInclusions: 0,
      geometry,
      approximations: ['the foil surfaces are not traction-free: the infinite-medium field is used throughout'],
    };
  }
  const approximations: string[] = [...kinds].map((k) => KIND_TEXT[k]);
  if (sc.elasticity === 'anisotropic' && (kinds.has('parallel-screw-images') || kinds.has('parallel-edge-plate') || kinds.has('normal-screw-twist') || kinds.has('normal-edge-half-space') || kinds.has('inclined-half-space'))) {
    approximations.push('the screw image series, the plate correction of the edge of parallel lines, the plate twist and the half-space correction of inclined lines are isotropic (for inclined lines: the anisotropic field\'s own surface tractions, an isotropic response with the Voigt-average shear modulus), added to the anisotropic (Stroh) infinite field: the surface tractions are reduced, not exactly cancelled');
  }
  if (correctedInclusions > 0) approximations.push(INCLUSION_TEXT);
  if (correctedInclusions < spheres.length) approximations.push('an inclusion that a foil surface cuts is not relaxed at the surfaces (infinite-medium field)');
  if (sc.defects.some((d) => d.type === 'loop')) approximations.push('dislocation loops are not relaxed at the surfaces (isotropic infinite-medium field; a loop that a surface cuts is refused)');
  const lineCount = n === 0 ? 'no straight lines in this scenario' : `${corrected} of ${n} straight line${n === 1 ? '' : 's'} corrected`;
  const count = spheres.length === 0 ? lineCount : `${lineCount}, ${correctedInclusions} of ${spheres.length} inclusion${spheres.length === 1 ? '' : 's'} corrected`;
  const SHORT: Readonly<Record<SurfaceCorrectionKind, string>> = {
    'parallel-stroh-plate': ' (exact anisotropic plate correction)',
    'parallel-screw-images': ' (screw image series)',
    'parallel-edge-plate': ' (screw image series and exact plate correction of the edge component)',
    'normal-screw-twist': ' (screw plate twist)',
    'normal-edge-half-space': ' (screw plate twist and half-space corrections of the edge component)',
    'inclined-half-space': ' (isotropic half-space correction of each surface)',
  };
  const used = [...kinds].map((k) => KIND_TEXT[k].split(':')[0] + SHORT[k]);
  if (correctedInclusions > 0) used.push('inclusions (half-space correction of a centre of dilatation for each surface)');
  return {
    setting: 'relaxed',
    text: `relaxed foil surfaces (${count}${used.length ? `: ${used.join('; ')}` : ''})`,
    lines: n,
    correctedLines: corrected,
    inclusions: spheres.length,
    correctedInclusions,
    geometry,
    approximations,
  };
}
