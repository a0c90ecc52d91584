/** `thinfoil demo`: renders the built-in invented scenario and prints what it found. */
import { join } from 'node:path';
import { DEMO_SCENARIO } from '../scenario/demo.js';
import { parseScenario } from '../scenario/parse.js';
import { visibilityTable } from '../analysis/visibilityTable.js';
import { writeFileAtomic } from '../output/atomicWrite.js';
import { renderAndWrite } from './renderCommand.js';
import { formatVisibility } from './visibilityCommand.js';
import { sig, table } from './run.js';
import { faultReport, formatFaults, formatInclusions } from './faultCommand.js';
import { dissociationWidth_nm } from '../imaging/fieldSpecs.js';
export async function demoCommand(opts) {
    const dir = opts.out ?? join('out', 'demo');
    const sc = parseScenario(DEMO_SCENARIO);
    process.stdout.write(`thinfoil demo: ${sc.name}\n`);
    process.stdout.write('All data in this demo are invented; the images are simulations (a model), not measurements.\n\n');
    writeFileAtomic(join(dir, 'scenario.json'), `${JSON.stringify(DEMO_SCENARIO, null, 2)}\n`);
    const { images, entries, seconds } = await renderAndWrite(sc, dir, true);
    process.stdout.write(`material ${sc.material.name}, ${sc.kV} kV, foil ${sc.thickness_nm} nm, ${sc.image.width_px} x ${sc.image.height_px} px at ${sc.image.pixel_nm} nm; ` +
        `${images.length} conditions rendered in ${sig(seconds, 3)} s\n\n`);
    process.stdout.write(table(['condition', 'g', 'xi_g (nm)', "xi'_g (nm)", 's (1/nm)', 'w', 'BF background', 'BF min..max', 'DF background', 'DF min..max'], images.map((ci) => {
        const bf = entries.find((e) => e.condition === ci.condition.id && e.field === 'bf');
        const df = entries.find((e) => e.condition === ci.condition.id && e.field === 'df');
        const c = ci.condition;
        return [c.id, `(${c.g.join(' ')})`, sig(c.xi_nm, 4), sig(c.xiAbs_nm, 4), sig(c.s_per_nm, 3), sig(c.w, 3), sig(bf.background, 3), `${sig(bf.min, 3)}..${sig(bf.max, 3)}`, sig(df.background, 3), `${sig(df.min, 3)}..${sig(df.max, 3)}`];
    })));
    const vis = visibilityTable(sc);
    const visText = formatVisibility(sc, vis);
    writeFileAtomic(join(dir, 'visibility.txt'), visText);
    writeFileAtomic(join(dir, 'visibility.json'), `${JSON.stringify({ scenario: sc.name, rows: vis }, null, 2)}\n`);
    process.stdout.write(`\nvisibility (g.b rule of thumb):\n${visText}`);
    for (const d of sc.defects) {
        if (d.type === 'dissociated') {
            process.stdout.write(`\n${d.label}: partial separation ${sig(dissociationWidth_nm(sc.material, d), 3)} nm (isotropic equilibrium width for ${sc.material.stackingFaultEnergy_mJ_per_m2} mJ/m^2)\n`);
        }
    }
    const fr = faultReport(sc);
    const frText = formatFaults(fr.faults) + formatInclusions(fr.inclusions);
    if (frText) {
        writeFileAtomic(join(dir, 'faults-and-inclusions.txt'), frText);
        process.stdout.write(`\nfault nature and misfit sign read-outs (simulated):\n${frText}`);
    }
    process.stdout.write(`\nwritten to ${dir}: <condition>-bf.png / -df.png (viewing), .tif (float intensities), render.json, visibility.txt\n`);
}
