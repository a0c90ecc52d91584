/**
 * What elasticity a scenario's dislocation fields use, in words and as plain
 * data, for render.json, reports and figure captions.
 */
import type { Scenario } from '../scenario/types.js';

export interface ElasticityDescription {
  readonly model: 'anisotropic' | 'isotropic';
  /** One sentence for captions and reports. */
  readonly text: string;
  /** The constants used (GPa, or the dimensionless Poisson ratio). */
  readonly constants: Readonly<Record<string, number | string>>;
}

export function describeElasticity(sc: Scenario): ElasticityDescription {
  const m = sc.material;
  const d = describeLinesElasticity(sc);
  if (!sc.defects.some((x) => x.type === 'loop') || d.model === 'isotropic') return d;
  return {
    ...d,
    text: `${d.text}; dislocation loops always isotropic (Burgers' formula, infinite medium, ${m.elastic.average} nu = ${m.elastic.poissonRatio.toPrecision(3)})`,
  };
}

function describeLinesElasticity(sc: Scenario): ElasticityDescription {
  const m = sc.material;
  if (sc.elasticity === 'anisotropic') {
    const c = m.elastic.cij_GPa as unknown as Record<string, number>;
    const list = Object.entries(c).map(([k, v]) => `${k} ${v}`).join(', ');
    return {
      model: 'anisotropic',
      text: `anisotropic elasticity (Stroh sextic solution for straight dislocations from the ${m.name} stiffness constants ${list} GPa; dissociation widths from the anisotropic energy factors)`,
      constants: { ...c },
    };
  }
  return {
    model: 'isotropic',
    text: `isotropic elasticity (Hirth & Lothe closed form with the ${m.elastic.average} averages G = ${m.elastic.shearModulus_GPa.toPrecision(4)} GPa, nu = ${m.elastic.poissonRatio.toPrecision(3)})`,
    constants: { shearModulus_GPa: m.elastic.shearModulus_GPa, poissonRatio: m.elastic.poissonRatio, average: m.elastic.average },
  };
}
