#!/usr/bin/env node
/** The thinfoil command line. */
import { Command, CommanderError } from 'commander';
import { action, EXIT_USER, reportAndExit } from './run.js';
import { parseAbsorption, parseBlurNm, parseContrast, parseDemoSize, parseKv } from './options.js';
import { InputError } from '../errors.js';

// a closed pipe (`thinfoil ... | head`) ends the program quietly
process.stdout.on('error', (e: NodeJS.ErrnoException) => {
  if (e.code === 'EPIPE') process.exit(0);
  throw e;
});

const program = new Command();
program
  .name('thinfoil')
  .description('Simulate diffraction-contrast images of crystal defects in a thin foil and identify the defects.')
  .version('0.1.0')
  .exitOverride()
  .showHelpAfterError('(thinfoil <command> --help lists the arguments and options of a command)')
  .configureOutput({ writeErr: (s) => process.stderr.write(s) });

/** An option parser whose InputError ends the program like any user error. */
const userOption = <T>(parse: (s: string) => T) => (s: string) => {
  try {
    return parse(s);
  } catch (e) {
    if (e instanceof InputError) reportAndExit(e);
    throw e;
  }
};

/**
 * The action of a command whose module is loaded only when that command runs,
 * so that `materials` or `--help` do not load the renderer, the graphics or
 * the image readers.
 */
type Loaded = Record<string, (...args: any[]) => Promise<void> | void>;
const run = (load: () => Promise<unknown>, name: string) =>
  action(async (...args: unknown[]) => {
    const m = (await load()) as Loaded;
    await m[name](...args);
  });

program
  .command('reflection')
  .description('two-beam parameters of one reflection: d, |g|, Bragg angle, |F_g|, xi_g, xi\'_g')
  .argument('<material>', 'material name from `thinfoil materials`')
  .argument('<indices>', 'reflection, e.g. 1,1,1 or "2 0 0"; four indices for hexagonal crystals')
  .option('--kv <kV>', 'accelerating voltage in kV', userOption(parseKv), 200)
  .option('--absorption <model|r>', "absorption: thermal-diffuse (per beam, from the Debye-Waller factors) or a constant ratio xi_g/xi'_g", userOption(parseAbsorption), 'thermal-diffuse')
  .option('--json', 'one JSON object on stdout')
  .action(run(() => import('./reflectionCommand.js'), 'reflectionCommand'));

program
  .command('materials')
  .description('list the material library')
  .option('--json', 'JSON on stdout')
  .action(run(() => import('./materialsCommand.js'), 'materialsCommand'));

program
  .command('render')
  .description('bright- and dark-field images of every condition of a scenario')
  .argument('<scenario>', 'scenario file (JSON)')
  .option('--out <dir>', 'output folder (default out/<scenario name>)')
  .option('--contrast <mode>', 'grey scale of the figures: "shared" (one scale for all conditions) or "each"', userOption(parseContrast), 'shared')
  .option('--blur-nm <sigma>', 'Gaussian point spread (standard deviation, nm) applied to the simulated images', userOption(parseBlurNm), 0)
  .option('--json', 'one JSON object on stdout listing the images')
  .option('--progress-json', 'progress as JSON lines {"progress", "stage"} on stderr (a bar is drawn on a terminal otherwise)')
  .option('--each-column', 'integrate every column on its own, also where straight defects let columns share one long column (slower; for checking)')
  .option('--shard <k/n>', 'render only conditions k, k+n, k+2n, ... (the k-th of n shares, k from 1) into shard files for `thinfoil merge`')
  .action(run(() => import('./renderCommand.js'), 'renderCommand'));

program
  .command('visibility')
  .description('g.b and g.(b x u) of every defect and candidate under every condition, with verdicts')
  .argument('<scenario>', 'scenario file (JSON)')
  .option('--json', 'JSON on stdout')
  .action(run(() => import('./visibilityCommand.js'), 'visibilityCommand'));

program
  .command('bloch')
  .description('Bloch waves of a perfect crystal (two-beam or systematic row): table, thickness profile, rocking curve and wave intensity across the planes, as CSV and PNG/SVG plots')
  .argument('<material>', 'material name from `thinfoil materials`')
  .argument('<indices>', 'reflection g, e.g. 1,1,1 or "2 0 0"; four indices for hexagonal crystals')
  .option('--kv <kV>', 'accelerating voltage in kV', userOption(parseKv), 200)
  .option('--absorption <model|r>', "absorption: thermal-diffuse (per beam, from the Debye-Waller factors) or a constant ratio xi_g/xi'_g", userOption(parseAbsorption), 'thermal-diffuse')
  .option('--s <s>', 'deviation parameter s of g in nm^-1 (default 0)')
  .option('--w <w>', 'deviation as w = s xi_g (instead of --s)')
  .option('--beams <N>', '2 (two-beam) or an odd number 3..41 (systematic row -m g .. m g)', '2')
  .option('--thickness <nm>', 'range of the thickness profile and thickness of the rocking curve, nm (default 3 xi_g)')
  .option('--out <dir>', 'output folder (default out/bloch-<material>-<hkl>)')
  .option('--json', 'one JSON object on stdout')
  .action(run(() => import('./blochCommand.js'), 'blochCommand'));

program
  .command('nature')
  .alias('fault')
  .description('fault nature (outer fringes), inclusion misfit sign and loop nature (inside-outside, black-white lobes), by simulation')
  .argument('<scenario>', 'scenario file (JSON)')
  .option('--json', 'JSON on stdout')
  .option('--progress-json', 'progress as JSON lines {"progress", "stage"} on stderr (a bar is drawn on a terminal otherwise)')
  .action(run(() => import('./faultCommand.js'), 'faultCommand'));

// repeatable options have no default value, so that commander's help shows no "(default: [])"
const collect = (v: string, prev: string[] | undefined) => [...(prev ?? []), v];
program
  .command('identify')
  .description('rank candidate defects against micrographs: simulate, register, score, verdict; writes a comparison figure and an HTML report')
  .argument('<scenario>', 'scenario file (JSON); per-micrograph settings under "micrographs"')
  .option('--micrograph <conditionId=file>', 'a micrograph (PNG or TIFF) taken under one condition; repeat for each', collect)
  .option('--out <dir>', 'output folder (default out/<scenario name>-identify)')
  .option('--json', 'one JSON object on stdout: ranking and verdict')
  .option('--defect <index>', 'which defect to identify (default 0)')
  .option('--top <n>', 'leading candidates fully registered, resampled and shown (default 4)')
  .option('--bootstrap <n>', 'bootstrap copies for the noise of the scores, 2 to 1000 (default 50)')
  .option('--seed <n>', 'seed of the bootstrap (default 1)')
  .option('--shard <k/n>', 'simulate only candidates k, k+n, k+2n, ... (the k-th of n shares, k from 1) into shard files for `thinfoil merge`')
  .option('--progress-json', 'progress as JSON lines {"progress", "stage"} on stderr (a bar is drawn on a terminal otherwise)')
  .action(run(() => import('./identifyCommand.js'), 'identifyCommand'));

program
  .command('merge')
  .description('combine the output folders of the n shards of one `identify --shard k/n` or `render --shard k/n` run into the output of one run')
  .argument('<dirs...>', 'the output folders of all n shards (any order)')
  .option('--out <dir>', 'output folder (default: as the run without --shard)')
  .option('--json', 'one JSON object on stdout, as the run without --shard prints it')
  .option('--progress-json', 'progress as JSON lines {"progress", "stage"} on stderr (a bar is drawn on a terminal otherwise)')
  .action(run(() => import('./mergeCommand.js'), 'mergeCommand'));

program
  .command('plan')
  .description('which two-beam conditions to take within the holder\'s tilt ranges to identify a Burgers vector and its sign (judged on simulated images); table, JSON and a stereographic projection')
  .argument('<scenario>', 'scenario file (JSON): material, foil, the dislocation (line, position) or loop and its candidates')
  .option('--holder <type>', 'double (double tilt, default) or rotation (tilt and rotate)')
  .option('--primary <low,high>', 'primary tilt range, degrees (default -30,30)')
  .option('--secondary <low,high>', 'secondary tilt (double) or rotation range, degrees (default -30,30 or -180,180)')
  .option('--axis <uvw>', 'crystal direction along the primary tilt axis at zero tilt, or at the current tilts with --beam-now (default the scenario\'s imageX)')
  .option('--beam-now <uvw>', 'crystal direction along the beam at the current tilts (--tilts), e.g. the zone axis you are on; then the foil normal is not assumed to lie along the beam at zero tilt')
  .option('--tilts <primary,secondary>', 'current tilts, degrees (default 0,0: foil normal along the beam)')
  .option('--g-max <nm^-1>', 'largest |g| considered (default 8)')
  .option('--zone-index <n>', 'largest index of the zone axes considered (default 3)')
  .option('--off-zone <deg>', 'tilt off the zone axis for a two-beam condition (default 5)')
  .option('--w <w>', 'deviation w = s xi_g of the planned conditions (default 1)')
  .option('--min-difference <c>', 'smallest bright-field contrast difference that tells two candidates apart (default 0.1)')
  .option('--defect <index>', 'which defect of the scenario (default 0)')
  .option('--out <dir>', 'output folder for plan.png, plan.svg, plan.json (default out/<scenario name>-plan)')
  .option('--json', 'one JSON object on stdout')
  .action(run(() => import('./planCommand.js'), 'planCommand'));

program
  .command('measure')
  .description('s and w from the Kikuchi line, thickness and xi_g from two-beam convergent-beam fringes, thickness from the projected width of a fault or length of a dislocation')
  .argument('<material>', 'material name from `thinfoil materials`')
  .option('--kv <kV>', 'accelerating voltage in kV', userOption(parseKv), 200)
  .option('--absorption <r>', "\"thermal-diffuse\" or a constant ratio xi_g/xi'_g (default 0.1; xi_g does not depend on it)", userOption(parseAbsorption), 0.1)
  .option('--g <hkl>', 'the reflection of the pattern (Kikuchi line, fringes)')
  .option('--spacing <R>', 'distance from 000 to the g spot (or between the 000 and g disc centres), any unit')
  .option('--kikuchi <x>', 'distance from the g spot to its excess Kikuchi line, same unit; positive outside the spot, negative between 000 and the spot')
  .option('--angle <mrad>', 'tilt of the crystal from the exact Bragg position of g, mrad (positive: g inside the Ewald sphere)')
  .option('--fringes <x1,x2,...>', 'distances of successive dark fringes from the central line of the g disc, same unit')
  .option('--error <d>', 'uncertainty of a distance measured on the pattern or image (same unit)')
  .option('--fault-width <nm>', 'projected width of an inclined planar fault crossing the foil')
  .option('--plane <hkl>', 'the fault plane')
  .option('--line-length <nm>', 'projected length of a straight dislocation crossing the foil')
  .option('--line <uvw>', 'the dislocation line direction')
  .option('--normal <uvw>', 'foil normal (for widths and lengths)')
  .option('--beam <uvw>', 'beam direction (for widths and lengths)')
  .option('--json', 'one JSON object on stdout')
  .action(run(() => import('./measureCommand.js'), 'measureCommand'));

program
  .command('traces')
  .description('line direction u of a straight dislocation from its traces in two or more beam directions: u with its uncertainty, planes containing u, glide planes of candidate b, inclination from a projected length')
  .argument('<material|scenario>', 'material name from `thinfoil materials`, or a scenario file (JSON) for its material, foil, conditions and candidates')
  .option('--view <pairs>', 'one micrograph: "beam=U,V,W g=H,K,L gAngle=DEG lineAngle=DEG [error=DEG] [length=NM [lengthError=NM]]" or, with a scenario, "condition=ID lineAngle=DEG"; angles counter-clockwise from +x, +y down; repeat for each', collect)
  .option('--angle-error <deg>', 'one-sigma error of each measured angle difference (line minus g), degrees (default 1)')
  .option('--b <vector>', 'candidate Burgers vector for the glide planes, e.g. "1/2[1 1 0]" or a family "1/2<110>"; repeat for more (default: the scenario\'s candidates)', collect)
  .option('--thickness <nm>', 'foil thickness for the projected-length check (default: the scenario\'s)')
  .option('--thickness-error <nm>', 'one-sigma error of the thickness (default 0)')
  .option('--normal <uvw>', 'foil normal as a crystal direction (default: the scenario\'s)')
  .option('--json', 'one JSON object on stdout')
  .action(run(() => import('./tracesCommand.js'), 'tracesCommand'));

program
  .command('ribbon')
  .description('width of a dissociated dislocation from a weak-beam micrograph: peak separation across the line, corrected by simulating ribbons of several widths, and the stacking-fault energy it implies')
  .argument('<scenario>', 'scenario file (JSON) with the "dissociated" defect (b, plane, line, depth) and the weak-beam condition')
  .option('--micrograph <file>', 'the weak-beam micrograph (PNG or TIFF)')
  .option('--condition <id>', 'the condition it was taken under (default: the scenario\'s only weak-beam condition)')
  .option('--defect <index>', 'which defect (default: the first "dissociated" one)')
  .option('--pixel-nm <nm>', 'pixel size (default: "micrographs".<id>.pixel_nm, else the TIFF/PNG resolution)')
  .option('--line-angle <deg>', 'direction of the line on the micrograph, degrees counter-clockwise from +x, +y down')
  .option('--g-angle <deg>', 'direction of g on the micrograph (instead of --line-angle: the line then follows from the scenario; default "micrographs".<id>.gAngle_deg)')
  .option('--centre <x,y>', 'a point on the ribbon, pixels from the top-left corner (default: the image centre)')
  .option('--half-width <nm>', 'the profile runs this far to either side of the line (default 15)')
  .option('--window <nm>', 'only peaks within this distance of the centre count (default: the whole profile)')
  .option('--bin-nm <nm>', 'bin width of the profile (default one pixel; less for an oblique line)')
  .option('--blur-nm <nm>', 'Gaussian point spread (standard deviation) applied to the simulations (default 0)')
  .option('--background-nm <nm>', 'a smooth background (Gaussian of this standard deviation) is removed from measured and simulated profiles before the peaks are picked (default 3; 0: none)')
  .option('--field <df|bf>', 'df: bright peaks (weak-beam dark field, default); bf: dark peaks')
  .option('--json', 'one JSON object on stdout')
  .action(run(() => import('./ribbonCommand.js'), 'ribbonCommand'));

program
  .command('explore')
  .description('a local page (127.0.0.1) where g, s or w, thickness, defect depth, Burgers vector and beams can be changed and the images follow')
  .argument('<scenario>', 'scenario file (JSON)')
  .option('--port <n>', 'port to listen on (default: a free port)')
  .action(run(() => import('./exploreCommand.js'), 'exploreCommand'));

program
  .command('demo')
  .description('render the built-in invented demo scenario into out/demo')
  .option('--out <dir>', 'output folder', 'out/demo')
  .option('--size <px>', 'side of the rendered images in pixels, same field of view (default 128)', userOption(parseDemoSize))
  .action(run(() => import('./demoCommand.js'), 'demoCommand'));

/** Options that take a value (from the declarations above): the token after them is never a positional argument. */
const VALUE_OPTIONS = new Set(program.commands.flatMap((c) => c.options.filter((o) => o.required || o.optional).map((o) => o.long ?? '')));

/**
 * Indices may start with a minus sign ("-1,1,1"); commander would take such a
 * positional argument for an unknown option. Prefix it with a space (the index
 * parsers ignore surrounding white space).
 */
function protectNegativeIndices(argv: readonly string[]): string[] {
  return argv.map((a, i) => (/^-[0-9.]/.test(a) && !VALUE_OPTIONS.has(argv[i - 1] ?? '') ? ` ${a}` : a));
}

try {
  await program.parseAsync(protectNegativeIndices(process.argv));
} catch (e) {
  if (e instanceof CommanderError) {
    process.exit(e.exitCode === 0 ? 0 : EXIT_USER);
  }
  throw e;
}
