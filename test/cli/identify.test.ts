/**
 * `thinfoil identify` in process (identifyCommand is wired into main.ts by
 * the lead): synthetic micrograph files at several bit depths (float TIFF by
 * our writer; 16-bit and 8-bit PNG by Debian's python3-pil, an independent
 * writer), the JSON on stdout, the figure, the report, and bad input turned
 * into exit code 2 with one sentence.
 */
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { createHash } from 'node:crypto';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import pngjs from 'pngjs';
import { parseScenario } from '../../src/scenario/parse.js';
import { renderScenario } from '../../src/imaging/renderScenario.js';
import { createRenderPool } from '../../src/imaging/workerPool.js';
import { identificationCandidates } from '../../src/analysis/candidates.js';
import { syntheticMicrographs, syntheticFileName, type SyntheticMicrograph } from '../../src/analysis/synthetic.js';
import { encodeFloatTiff } from '../../src/output/tiff.js';
import { identifyCommand } from '../../src/cli/identifyCommand.js';
import { action } from '../../src/cli/run.js';
import { needPython, runPython } from '../python.js';

const pil = needPython('PIL', 'numpy');

const RAW = {
  name: 'cli identify test',
  material: 'Cu',
  kV: 200,
  foil: { thickness_nm: 60, normal: [0, 0, 1] },
  beam: [0, 0, 1],
  surfaces: 'infinite', // the command, not the field: relaxed inclined lines render 3-14x slower (README, Foil surfaces)
  conditions: [
    { id: 'g200', g: [2, 0, 0], w: 0.5 },
    { id: 'g020', g: [0, 2, 0], w: 0.5 },
    { id: 'g11m1', g: [1, 1, -1], w: 0.5, beam: [0, 1, 1] },
  ],
  defects: [{ type: 'dislocation', b: '1/2[1 0 1]', line: [3, 1, 1], point_nm: [0, 0, 30] }],
  candidates: [{ b: '1/2[1 1 0]' }, { b: '1/2[1 0 1]' }],
};

let dir: string;
let scenarioFile: string;
let args: string[];
let syn: SyntheticMicrograph[];
const hashes = new Map<string, string>();
const sha = (p: string) => createHash('sha256').update(readFileSync(p)).digest('hex');

/** 16-bit or 8-bit PNG through PIL from linear values scaled to the range. */
function pilPng(path: string, m: SyntheticMicrograph, bits: 8 | 16, gamma = 1): void {
  const script = [
    'import json, sys, numpy as np',
    'from PIL import Image',
    'd = json.load(sys.stdin)',
    'a = np.array(d["data"], dtype=np.float64).reshape(d["h"], d["w"])',
    'a = (a / a.max()) ** d["gamma"]',
    'if d["bits"] == 16:',
    '    Image.fromarray(np.round(a * 65535).astype(np.uint16), "I;16").save(d["path"])',
    'else:',
    '    Image.fromarray(np.round(a * 255).astype(np.uint8), "L").save(d["path"])',
  ].join('\n');
  runPython(['-c', script], { data: Array.from(m.data), w: m.width, h: m.height, bits, gamma, path });
}

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'thinfoil-identify-'));
  const sc = parseScenario(RAW);
  const truth = identificationCandidates(sc).find((c) => c.label === 'b = 1/2[1 0 1]')!;
  const pool = createRenderPool(1);
  syn = await syntheticMicrographs(
    sc,
    truth,
    [
      { conditionId: 'g200', field: 'bf', gAngle_deg: 20 },
      { conditionId: 'g020', field: 'bf', gAngle_deg: 110 },
      { conditionId: 'g11m1', field: 'df', gAngle_deg: -30 },
    ],
    { width: 52, height: 48, pixel_nm: 1, snr: 6, blur_nm: 0.6, maxShift_nm: 3, maxRotation_deg: 2, oversample: 1, seed: 5 },
    (s) => renderScenario(s, pool),
  );
  await pool.close();
  // float TIFF by our own writer here; PNG micrographs written by python3-pil have their own test below
  const files = [join(dir, syntheticFileName('g200', 'bf')), join(dir, syntheticFileName('g020', 'bf')), join(dir, syntheticFileName('g11m1', 'df'))];
  files.forEach((f, i) => writeFileSync(f, encodeFloatTiff(syn[i].data, syn[i].width, syn[i].height, { pixel_nm: 1 })));
  args = [`g200=${files[0]}`, `g020=${files[1]}`, `g11m1=${files[2]}`];
  scenarioFile = join(dir, 'scenario.json');
  writeFileSync(
    scenarioFile,
    JSON.stringify({
      ...RAW,
      micrographs: {
        // g200: pixel size from the TIFF resolution tags
        g200: { field: 'bf', gAngle_deg: 20, blur_nm: 0.6, maxShift_nm: 8 },
        g020: { field: 'bf', gAngle_deg: 110, pixel_nm: 1, blur_nm: 0.6, maxShift_nm: 8 },
        g11m1: { field: 'df', gAngle_deg: -30, pixel_nm: 1, blur_nm: 0.6, maxShift_nm: 8 },
      },
    }),
  );
  for (const f of [scenarioFile, ...files]) hashes.set(f, sha(f));
});

afterAll(() => {
  if (dir) rmSync(dir, { recursive: true, force: true });
});

function capture() {
  const out: string[] = [];
  const err: string[] = [];
  const so = vi.spyOn(process.stdout, 'write').mockImplementation((s: string | Uint8Array) => (out.push(String(s)), true));
  const se = vi.spyOn(process.stderr, 'write').mockImplementation((s: string | Uint8Array) => (err.push(String(s)), true));
  return { out, err, restore: () => (so.mockRestore(), se.mockRestore()) };
}

describe('thinfoil identify', () => {
  it('--json: ranking with candidate, score and perCondition, and a verdict; the hidden b ranks first', async () => {
    const outDir = join(dir, 'out');
    const cap = capture();
    try {
      await identifyCommand(scenarioFile, { micrograph: args, json: true, out: outDir, bootstrap: '12', threads: 1 });
    } finally {
      cap.restore();
    }
    const j = JSON.parse(cap.out.join(''));
    expect(j.ranking.length).toBe(4);
    for (const r of j.ranking) {
      expect(Object.keys(r).filter((k) => k !== 'fit').sort()).toEqual(['candidate', 'perCondition', 'score']);
      expect(r.perCondition.map((p: { condition: string }) => p.condition)).toEqual(['g200', 'g020', 'g11m1']);
    }
    expect(j.ranking[0].candidate).toBe('b = 1/2[1 0 1]');
    expect(['identified', 'cannot tell', 'no candidate explains']).toContain(j.verdict.decision);
    // fitted parameters of the leaders, each inside the range it was allowed (defaults: the scenario has no "fit")
    const fits = j.ranking.filter((r: { fit?: unknown }) => r.fit).map((r: { fit: unknown }) => r.fit);
    expect(fits.length).toBe(4);
    for (const f of fits) for (const p of f.parameters) expect(p.value >= p.lo - 1e-9 && p.value <= p.hi + 1e-9).toBe(true);
    expect(fits[0].parameters.map((p: { name: string }) => p.name)).toEqual(['thickness', 'depth', 'line tilt a', 'line tilt b', 'w g200', 'w g020', 'w g11m1']);
    expect(j.absolute.perMicrograph.map((p: { condition: string }) => p.condition)).toEqual(['g200', 'g020', 'g11m1']);
    expect(Array.isArray(j.flags)).toBe(true);
    for (const c of j.verdict.comparisons) expect(c.excluded).toBe(c.gap > c.threshold);
    expect(j.synthetic).toEqual(['g200', 'g020', 'g11m1']);
    // g.b beside the scores (g = 200, b = 1/2[1 0 1]: 1)
    expect(j.ranking[0].perCondition[0].visibility).toMatchObject({ quantity: 'g.b', value: 1 });

    // files: figure PNG at publication width, SVG and report label the synthetic micrographs
    for (const f of Object.values(j.files) as string[]) expect(existsSync(f)).toBe(true);
    const png = pngjs.PNG.sync.read(readFileSync(j.files.figurePng));
    expect(png.width).toBe(2000);
    const svg = readFileSync(j.files.figureSvg, 'utf8');
    expect(svg.startsWith('<svg') || svg.startsWith('<?xml')).toBe(true);
    const html = readFileSync(j.files.report, 'utf8');
    expect(html).toMatch(/Simulations are a model, not a measurement/);
    expect(html).toMatch(/Synthetic micrographs:/);
    expect(html).toMatch(/synthetic-g200-bf\.tif/);
    expect(html).toMatch(/<img alt="[^"]*" src="data:image\/png;base64,/);
    expect(html).toMatch(/xi_g \(nm\)/);
    expect(html).not.toMatch(/<script|<link |src="http/); // self-contained
    const full = JSON.parse(readFileSync(j.files.json, 'utf8'));
    expect(full.conditions[0]).toMatchObject({ id: 'g200', pixel_nm: 1, synthetic: true });
    // identify.json carries the same fitted values as --json (one source)
    expect(full.ranking.filter((r: { fit?: unknown }) => r.fit).map((r: { fit: unknown }) => r.fit)).toEqual(fits);
    expect(html).toMatch(/Fitted parameters/);
    // geometry of each condition in crystal terms (plumbing): reflection, beam, nearest zone
    expect(full.conditions[0].geometry).toMatchObject({ reflection: '(2 0 0)' });
    expect(full.conditions[0].geometry.nearestZone.axis).toMatch(/^\[/);
    // inputs are never modified
    for (const [f, h] of hashes) expect(sha(f)).toBe(h);
  });

  it('reads 16-bit PNG and gamma-mapped 8-bit PNG micrographs written by python3-pil (an independent writer)', async (ctx) => {
    pil.require(ctx);
    const png16 = join(dir, syntheticFileName('g020', 'bf', 'png'));
    const png8 = join(dir, syntheticFileName('g11m1', 'df', 'png'));
    pilPng(png16, syn[1], 16);
    pilPng(png8, syn[2], 8, 0.6); // a display mapping (gamma 0.6): not proportional to intensity
    const f = join(dir, 'scenario-png.json');
    writeFileSync(
      f,
      JSON.stringify({
        ...RAW,
        // this test is about reading the files; the fit is exercised by the --json test
        fit: { enabled: false },
        micrographs: {
          g200: { field: 'bf', gAngle_deg: 20, blur_nm: 0.6, maxShift_nm: 8 },
          g020: { field: 'bf', gAngle_deg: 110, pixel_nm: 1, blur_nm: 0.6, maxShift_nm: 8 },
          g11m1: { field: 'df', gAngle_deg: -30, pixel_nm: 1, blur_nm: 0.6, maxShift_nm: 8, intensity: 'display' },
        },
      }),
    );
    const before = [png16, png8].map(sha);
    const cap = capture();
    try {
      await identifyCommand(f, { micrograph: [args[0], `g020=${png16}`, `g11m1=${png8}`], json: true, out: join(dir, 'out-png'), bootstrap: '8', threads: 1 });
    } finally {
      cap.restore();
    }
    const j = JSON.parse(cap.out.join(''));
    expect(j.ranking[0].candidate).toBe('b = 1/2[1 0 1]');
    expect(j.ranking[0].perCondition.map((p: { condition: string }) => p.condition)).toEqual(['g200', 'g020', 'g11m1']);
    expect(readFileSync(j.files.report, 'utf8')).toMatch(/synthetic-g020-bf\.png/);
    expect([png16, png8].map(sha)).toEqual(before);
  });

  it('prints a table and the verdict without --json', async () => {
    const cap = capture();
    try {
      await identifyCommand(scenarioFile, { micrograph: args, out: join(dir, 'out2'), bootstrap: '8', threads: 1 });
    } finally {
      cap.restore();
    }
    const text = cap.out.join('');
    expect(text).toMatch(/SYNTHETIC/);
    expect(text).toMatch(/b = 1\/2\[1 0 1\]/);
    expect(text).toMatch(/IDENTIFIED|CANNOT TELL|NO CANDIDATE EXPLAINS/);
    expect(text).toMatch(/fitted parameters/);
    expect(text).toMatch(/thickness [0-9.]+ nm \(stated 60, range 51 to 69\)/);
    expect(text).toMatch(/noise and residual of the best candidate/);
    expect(text).toMatch(/needed/);
  });
});

describe('thinfoil identify: bad input gives exit code 2 and one sentence', () => {
  async function runAction(file: string, opts: Record<string, unknown>) {
    const cap = capture();
    const exit = vi.spyOn(process, 'exit').mockImplementation(((code?: number) => {
      throw new Error(`exit ${code}`);
    }) as never);
    let thrown = '';
    try {
      await action(identifyCommand)(file, { threads: 1, bootstrap: '2', out: join(dir, 'bad'), ...opts });
    } catch (e) {
      thrown = (e as Error).message;
    } finally {
      exit.mockRestore();
      cap.restore();
    }
    return { thrown, err: cap.err.join('') };
  }

  it.each([
    ['an unreadable micrograph file', () => ({ micrograph: [`g200=${join(dir, 'missing.tif')}`] }), /micrograph file ".*missing\.tif" for g200 cannot be read \(ENOENT\); check the path/],
    ['a file that is not an image', () => ({ micrograph: [`g200=${scenarioFile}`] }), /is not a PNG or TIFF file/],
    ['a condition id that does not exist', () => ({ micrograph: [args[0].replace('g200=', 'g222=')] }), /"g222" is not a condition of the scenario/],
    ['a malformed --micrograph', () => ({ micrograph: ['g200'] }), /--micrograph "g200" must be <conditionId>=<file>/],
    ['no micrograph', () => ({}), /no micrograph given/],
    ['a bad --top', () => ({ micrograph: args, top: 'x' }), /--top "x" must be a whole number/],
    // no bootstrap copies would make the gap's standard deviation 0 and exclude candidates on noise alone
    ['--bootstrap 0', () => ({ micrograph: args, bootstrap: '0' }), /^thinfoil: --bootstrap "0" must be a whole number between 2 and 1000/],
  ])('%s', async (_what, opts, pattern) => {
    const r = await runAction(scenarioFile, opts());
    expect(r.thrown).toBe('exit 2');
    expect(r.err).toMatch(pattern);
    expect(r.err.trim().split('\n').length).toBe(1);
  });

  it.each([
    ['a crop outside the image', { gAngle_deg: 20, crop: [40, 0, 30, 30] }, /micrographs\.g200\.crop \[40, 0, 30, 30\] reaches outside the 52 x 48 pixel image/],
    ['a pixel size of zero', { gAngle_deg: 20, pixel_nm: 0 }, /micrographs\.g200\.pixel_nm: must be greater than 0/],
    ['a missing direction of g', { pixel_nm: 1 }, /micrographs\.g200\.gAngle_deg: is missing/],
  ])('%s in the scenario', async (_what, g200, pattern) => {
    const f = join(dir, `bad-${Object.keys(g200).join('-')}.json`);
    writeFileSync(f, JSON.stringify({ ...RAW, micrographs: { g200 } }));
    const r = await runAction(f, { micrograph: [args[0]] });
    expect(r.thrown).toBe('exit 2');
    expect(r.err).toMatch(pattern);
    expect(r.err.trim().split('\n').length).toBe(1);
  });
  it('warns (before the work) when the measured thickness in "fit" leaves out foil.thickness_nm, and not when it holds it', async () => {
    const f = join(dir, 'fit-thickness.json');
    // 600 +- 10 nm against the stated 60 nm: a thickness in Angstrom
    writeFileSync(f, JSON.stringify({ ...RAW, fit: { thickness_nm: 600, thicknessError_nm: 10 } }));
    const r = await runAction(f, {});
    expect(r.thrown).toBe('exit 2');
    const lines = r.err.trim().split('\n');
    expect(lines).toHaveLength(2);
    expect(lines[0]).toMatch(/^thinfoil: warning: fit\.thickness_nm: the measured foil thickness 600 \+- 10 nm is far from the scenario's foil\.thickness_nm 60 nm \(outside 580-620 nm/);
    expect(lines[1]).toMatch(/no micrograph given/);
    writeFileSync(f, JSON.stringify({ ...RAW, fit: { thickness_nm: 62, thicknessError_nm: 2 } }));
    const ok = await runAction(f, {});
    expect(ok.err.trim().split('\n')).toHaveLength(1);
  });
  it('--help of identify states each default once and never "(default: [])"', () => {
    // the compiled CLI, as a user calls it
    const r = spawnSync(process.execPath, [join(import.meta.dirname, '..', '..', 'dist', 'cli', 'main.js'), 'identify', '--help'], { encoding: 'utf8' });
    const h = { code: r.status, out: r.stdout };
    expect(h.code).toBe(0);
    expect(h.out).not.toMatch(/default: \[\]/);
    expect(h.out.replace(/\s+/g, ' ')).not.toMatch(/\(default[^()]*\) \(default/);
    expect(h.out).toMatch(/--micrograph <conditionId=file>/);
  });
});
