/** `thinfoil materials`: the material library. */
import { listMaterials } from '../crystal/materials.js';
import { printJson, sig, table } from './run.js';

export function materialsCommand(opts: { json?: boolean }): void {
  const ms = listMaterials();
  if (opts.json) {
    printJson({ materials: ms });
    return;
  }
  const rows = ms.map((m) => [
    m.name,
    m.structure,
    m.lattice.system === 'hexagonal' ? `a=${sig(m.lattice.a_nm, 5)} c=${sig(m.lattice.c_nm, 5)}` : `a=${sig(m.lattice.a_nm, 5)}`,
    sig(m.elastic.shearModulus_GPa, 3),
    sig(m.elastic.poissonRatio, 3),
    m.stackingFaultEnergy_mJ_per_m2 === undefined ? '-' : String(m.stackingFaultEnergy_mJ_per_m2),
    m.description.length > 60 ? `${m.description.slice(0, 57)}...` : m.description,
  ]);
  process.stdout.write(table(['name', 'structure', 'lattice (nm)', 'G (GPa)', 'nu', 'SFE (mJ/m2)', 'description'], rows));
  process.stdout.write('G and nu: Voigt-Reuss-Hill averages of the Cij. Full descriptions and sources: thinfoil materials --json\n');
}
