#!/usr/bin/env node
/** The thinfoil command line. */
import { Command, CommanderError } from 'commander';
import { action, EXIT_USER, reportAndExit } from './run.js';
import { parseAbsorption, parseKv } from './options.js';
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
  .option('--absorption <r>', "absorption ratio xi_g/xi'_g", userOption(parseAbsorption), 0.1)
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
  .option('--json', 'one JSON object on stdout listing the images')
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
  .option('--absorption <r>', "absorption ratio xi_g/xi'_g", userOption(parseAbsorption), 0.1)
  .option('--s <s>', 'deviation parameter s of g in nm^-1 (default 0)')
  .option('--w <w>', 'deviation as w = s xi_g (instead of --s)')
  .option('--beams <N>', '2 (two-beam) or an odd number 3..41 (systematic row -m g .. m g)', '2')
  .option('--thickness <nm>', 'range of the thickness profile and thickness of the rocking curve, nm (default 3 xi_g)')
  .option('--out <dir>', 'output folder (default out/bloch-<material>-<hkl>)')
  .option('--json', 'one JSON object on stdout')
  .action(run(() => import('./blochCommand.js'), 'blochCommand'));

program
  .command('fault')
  .description('fault nature (intrinsic / extrinsic outer fringes) and inclusion misfit sign, by simulation')
  .argument('<scenario>', 'scenario file (JSON)')
  .option('--json', 'JSON on stdout')
  .action(run(() => import('./faultCommand.js'), 'faultCommand'));

const collect = (v: string, prev: string[]) => [...prev, v];
program
  .command('identify')
  .description('rank candidate defects against micrographs: simulate, register, score, verdict; writes a comparison figure and an HTML report')
  .argument('<scenario>', 'scenario file (JSON); per-micrograph settings under "micrographs"')
  .option('--micrograph <conditionId=file>', 'a micrograph (PNG or TIFF) taken under one condition; repeat for each', collect, [])
  .option('--out <dir>', 'output folder (default out/<scenario name>-identify)')
  .option('--json', 'one JSON object on stdout: ranking and verdict')
  .option('--defect <index>', 'which defect to identify (default 0)')
  .option('--top <n>', 'leading candidates fully registered, resampled and shown (default 4)')
  .option('--bootstrap <n>', 'bootstrap copies for the noise of the scores (default 50)')
  .option('--seed <n>', 'seed of the bootstrap (default 1)')
  .action(run(() => import('./identifyCommand.js'), 'identifyCommand'));

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
