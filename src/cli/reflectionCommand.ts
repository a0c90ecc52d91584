/** `thinfoil reflection <material> <hkl>`: the two-beam parameters of one reflection. */
import { getMaterial } from '../crystal/materials.js';
import { readPlane } from '../scenario/parse.js';
import { reflectionParameters } from '../scattering/reflection.js';
import { type AbsorptionSetting, DEFAULT_ABSORPTION, describeAbsorption } from '../scattering/absorption.js';
import { printJson, sig, table } from './run.js';

export interface ReflectionOptions {
  kv: number;
  /** "thermal-diffuse" (default) or a constant ratio xi_g/xi'_g */
  absorption?: AbsorptionSetting;
  json?: boolean;
}

/** The reflection as the user wrote it: four indices for a hexagonal input, else three. */
function indexText(indices: string, hkl: readonly number[]): string {
  const four = indices.trim().replace(/[()[\]]/g, '').split(/[\s,]+/).filter((x) => x !== '');
  return four.length === 4 ? `(${hkl[0]} ${hkl[1]} ${-(hkl[0] + hkl[1])} ${hkl[2]}), three-index (${hkl.join(' ')})` : `(${hkl.join(' ')})`;
}

export function reflectionCommand(materialName: string, indices: string, opts: ReflectionOptions): void {
  const m = getMaterial(materialName);
  const hkl = readPlane(indices, 'reflection indices', m);
  const absorption = opts.absorption ?? DEFAULT_ABSORPTION;
  const r = reflectionParameters(m, hkl, opts.kv, { absorption });
  const result = {
    material: m.name,
    structure: m.structure,
    hkl,
    kV: opts.kv,
    absorption,
    absorptionModel: describeAbsorption(absorption),
    lambda_pm: r.lambda_nm * 1000,
    d_nm: r.d_nm,
    g_per_nm: r.g_per_nm,
    braggAngle_mrad: r.braggAngle_rad * 1000,
    absF_A: r.absF_A,
    F_A: r.F_A,
    U_per_nm2: r.U_per_nm2,
    xi_nm: r.xi_nm,
    // absorption lengths ("none" without absorption, as printJson writes every non-finite number), U'_g and U'_0 in nm^-2
    xiAbs_nm: r.xiAbs_nm,
    xiAbs0_nm: r.xiAbs0_nm,
    absorptionRatio: r.absorptionRatio,
    Uabs_per_nm2: r.Uabs_per_nm2,
    Uabs0_per_nm2: r.Uabs0_per_nm2,
  };
  const source = typeof absorption === 'number' ? `constant ratio ${absorption}` : 'thermal diffuse scattering';
  if (opts.json) {
    printJson(result);
    return;
  }
  const rows: string[][] = [
    ['material', `${m.name} (${m.structure})`],
    ['reflection g', indexText(indices, hkl)],
    ['voltage', `${opts.kv} kV, lambda = ${sig(result.lambda_pm, 5)} pm`],
    ['d-spacing', `${sig(r.d_nm, 5)} nm`],
    ['|g|', `${sig(r.g_per_nm, 5)} nm^-1`],
    ['Bragg angle', `${sig(result.braggAngle_mrad, 4)} mrad`],
    ['|F_g| (electron)', `${sig(r.absF_A, 4)} A`],
    ['xi_g', `${sig(r.xi_nm, 4)} nm`],
    ["xi'_g", Number.isFinite(r.xiAbs_nm) ? `${sig(r.xiAbs_nm, 4)} nm (xi_g/xi'_g = ${sig(r.absorptionRatio, 3)}, ${source})` : 'none (no absorption)'],
    ["xi'_0 (normal absorption)", Number.isFinite(r.xiAbs0_nm) ? `${sig(r.xiAbs0_nm, 4)} nm (${typeof absorption === 'number' ? "= xi'_g, common approximation" : source})` : 'none (no absorption)'],
  ];
  process.stdout.write(table(['quantity', 'value'], rows));
}
