/**
 * Shards for cluster runs (`--shard k/n` and `thinfoil merge`), run as a user
 * runs them: every shard and the merge are separate processes of the
 * compiled CLI. The reference is one run of the same command without
 * --shard: the merged output must be the same JSON apart from timings and
 * the output folder's name, and the same image bytes. The micrographs are
 * made by the project's own renderer (src/analysis/synthetic.ts): this
 * checks the plumbing of sharding, not the physics.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawn, spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parseScenario } from '../../src/scenario/parse.js';
import { renderScenario } from '../../src/imaging/renderScenario.js';
import { createRenderPool } from '../../src/imaging/workerPool.js';
import { identificationCandidates } from '../../src/analysis/candidates.js';
import { syntheticMicrographs, syntheticFileName } from '../../src/analysis/synthetic.js';
import { encodeFloatTiff } from '../../src/output/tiff.js';

const ROOT = join(import.meta.dirname, '..', '..');
const CLI = join(ROOT, 'dist', 'cli', 'main.js');

const RAW = {
  name: 'shard test',
  material: 'Cu',
  kV: 200,
  foil: { thickness_nm: 60, normal: [0, 0, 1] },
  beam: [0, 0, 1],
  image: { width_px: 40, height_px: 36, pixel_nm: 1 },
  surfaces: 'infinite', // sharding, not the field: relaxed inclined lines render 3-14x slower (README, Foil surfaces)
  conditions: [
    { id: 'g200', g: [2, 0, 0], w: 0.5 },
    { id: 'g020', g: [0, 2, 0], w: 0.5 },
    { id: 'g11m1', g: [1, 1, -1], w: 0.5, beam: [0, 1, 1] },
    { id: 'g2m20', g: [2, -2, 0], w: 0.8 },
  ],
  defects: [{ type: 'dislocation', b: '1/2[1 0 1]', line: [3, 1, 1], point_nm: [0, 0, 30] }],
  candidates: [{ b: '1/2[1 1 0]' }, { b: '1/2[1 0 1]' }, { b: '1/2[0 1 1]' }],
};

let dir: string;
let idArgs: string[];

/** One CLI process in `cwd` (default the test folder); resolves with its exit code and output. */
function cli(args: readonly string[], cwd = dir): Promise<{ code: number | null; out: string; err: string }> {
  return new Promise((res) => {
    const p = spawn(process.execPath, [CLI, ...args], { cwd });
    let out = '';
    let err = '';
    p.stdout.on('data', (d) => (out += d));
    p.stderr.on('data', (d) => (err += d));
    p.on('close', (code) => res({ code, out, err }));
  });
}
const cliSync = (args: readonly string[], cwd = dir) => {
  const r = spawnSync(process.execPath, [CLI, ...args], { cwd, encoding: 'utf8' });
  return { code: r.status, out: r.stdout, err: r.stderr };
};

/** A JSON file without its timings and with the output folder's name replaced. */
function comparable(file: string, outDir: string): unknown {
  const text = readFileSync(file, 'utf8').split(`${outDir}/`).join('<out>/');
  const strip = (v: unknown): unknown => {
    if (Array.isArray(v)) return v.map(strip);
    if (v !== null && typeof v === 'object') return Object.fromEntries(Object.entries(v).filter(([k]) => k !== 'seconds').map(([k, x]) => [k, strip(x)]));
    return v;
  };
  return strip(JSON.parse(text));
}

beforeAll(async () => {
  if (!existsSync(CLI)) throw new Error('dist/cli/main.js is missing: run `npm run build` (npm test does it)');
  dir = mkdtempSync(join(tmpdir(), 'thinfoil-shards-'));
  const sc = parseScenario(RAW);
  const truth = identificationCandidates(sc).find((c) => c.label === 'b = 1/2[1 0 1]')!;
  const pool = createRenderPool(1);
  const views = [
    { conditionId: 'g200', field: 'bf' as const, gAngle_deg: 20 },
    { conditionId: 'g020', field: 'bf' as const, gAngle_deg: 110 },
  ];
  const syn = await syntheticMicrographs(sc, truth, views, { width: 40, height: 36, pixel_nm: 1, snr: 6, blur_nm: 0.6, maxShift_nm: 2, maxRotation_deg: 1, oversample: 1, seed: 3 }, (s) =>
    renderScenario(s, pool),
  );
  await pool.close();
  idArgs = [];
  views.forEach((v, i) => {
    const f = syntheticFileName(v.conditionId, 'bf');
    writeFileSync(join(dir, f), encodeFloatTiff(syn[i].data, syn[i].width, syn[i].height, { pixel_nm: 1 }));
    idArgs.push('--micrograph', `${v.conditionId}=${f}`);
  });
  const micrographs = {
    g200: { field: 'bf', gAngle_deg: 20, pixel_nm: 1, blur_nm: 0.6, maxShift_nm: 5 },
    g020: { field: 'bf', gAngle_deg: 110, pixel_nm: 1, blur_nm: 0.6, maxShift_nm: 5 },
  };
  writeFileSync(join(dir, 'scenario.json'), JSON.stringify({ ...RAW, micrographs }));
  // the same foil with another thickness: shards of it must not merge with the others
  writeFileSync(join(dir, 'other.json'), JSON.stringify({ ...RAW, foil: { ...RAW.foil, thickness_nm: 61 }, micrographs }));
});

afterAll(() => {
  if (dir) rmSync(dir, { recursive: true, force: true });
});

describe('identify --shard k/n and merge', () => {
  it('3 shards in separate processes, merged, give the JSON of one run (apart from timings) and the verdict from all candidates', async () => {
    const common = ['identify', 'scenario.json', ...idArgs, '--bootstrap', '16', '--json'];
    const one = await cli([...common, '--out', 'single-run']);
    expect(one.code, one.err).toBe(0);
    // the shards run at the same time, as the tasks of a job array would
    const shards = await Promise.all([1, 2, 3].map((k) => cli([...common, '--shard', `${k}/3`, '--out', `shard-${k}`])));
    for (const s of shards) expect(s.code, s.err).toBe(0);
    const told = shards.map((s) => JSON.parse(s.out) as { candidates: string[]; of: number });
    // 3 candidates with both signs = 6; candidate j goes to shard (j mod 3) + 1: two each, none twice
    expect(told.map((t) => t.candidates.length)).toEqual([2, 2, 2]);
    expect(new Set(told.flatMap((t) => t.candidates)).size).toBe(6);
    expect(told[0].of).toBe(6);
    // merged from another folder than the shards ran in (the manifests say where the inputs are)
    const merged = await cli(['merge', join(dir, 'shard-3'), join(dir, 'shard-1'), join(dir, 'shard-2'), '--out', join(dir, 'merged'), '--json'], ROOT);
    expect(merged.code, merged.err).toBe(0);
    const a = comparable(join(dir, 'single-run', 'identify.json'), 'single-run');
    const b = comparable(join(dir, 'merged', 'identify.json'), join(dir, 'merged'));
    expect(b).toEqual(a);
    const ja = JSON.parse(one.out.split('single-run/').join('<out>/'));
    const jb = JSON.parse(merged.out.split(`${join(dir, 'merged')}/`).join('<out>/'));
    expect(jb).toEqual(ja);
    expect((a as { ranking: unknown[] }).ranking.length).toBe(6);
    expect(['identified', 'cannot tell', 'no candidate explains']).toContain(jb.verdict.decision);
    // the figure is drawn from the same numbers: same bytes
    expect(readFileSync(join(dir, 'merged', 'identify-figure.png')).equals(readFileSync(join(dir, 'single-run', 'identify-figure.png')))).toBe(true);
  });

  it('refuses k > n, k = 0 and a malformed --shard with one sentence and exit code 2', () => {
    for (const bad of ['4/3', '0/3', 'two/3', '1/0']) {
      const r = cliSync(['identify', 'scenario.json', ...idArgs, '--shard', bad, '--out', 'never']);
      expect(r.code, bad).toBe(2);
      expect(r.err.trim().split('\n')).toHaveLength(1);
      expect(r.err).toMatch(/--shard/);
      expect(existsSync(join(dir, 'never'))).toBe(false);
    }
  });

  it('refuses a missing shard, a shard given twice, shards of other inputs and inputs changed since (exit code 2, one sentence)', async () => {
    const base = ['identify', 'scenario.json', ...idArgs, '--bootstrap', '16', '--json'];
    if (!existsSync(join(dir, 'shard-1'))) for (const k of [1, 2, 3]) expect((await cli([...base, '--shard', `${k}/3`, '--out', `shard-${k}`])).code).toBe(0);
    const missing = cliSync(['merge', 'shard-1', 'shard-3', '--out', 'm1']);
    expect(missing.code).toBe(2);
    expect(missing.err).toMatch(/shard 2 of 3 is missing/);
    const twice = cliSync(['merge', 'shard-1', 'shard-2', 'shard-2', 'shard-3', '--out', 'm2']);
    expect(twice.code).toBe(2);
    expect(twice.err).toMatch(/given twice/);
    // shard 2 of another scenario (thickness 61 nm instead of 60)
    expect((await cli(['identify', 'other.json', ...idArgs, '--bootstrap', '16', '--shard', '2/3', '--out', 'other-2'])).code).toBe(0);
    const other = cliSync(['merge', 'shard-1', 'other-2', 'shard-3', '--out', 'm3']);
    expect(other.code).toBe(2);
    expect(other.err).toMatch(/other inputs or options/);
    // the same scenario with other options (--seed) is another run too
    expect((await cli([...base, '--seed', '7', '--shard', '2/3', '--out', 'seed-2'])).code).toBe(0);
    expect(cliSync(['merge', 'shard-1', 'seed-2', 'shard-3', '--out', 'm4']).err).toMatch(/other inputs or options/);
    // a render shard is not an identify shard
    expect((await cli(['render', 'scenario.json', '--shard', '2/3', '--out', 'render-2'])).code).toBe(0);
    const kinds = cliSync(['merge', 'shard-1', 'render-2', 'shard-3', '--out', 'm5']);
    expect(kinds.code).toBe(2);
    expect(kinds.err).toMatch(/comes from render/);
    // a folder that is no shard
    const none = cliSync(['merge', 'single-run', '--out', 'm6']);
    expect(none.code).toBe(2);
    expect(none.err).toMatch(/shard\.json/);
    // a micrograph changed after the shards ran
    const f = syntheticFileName('g020', 'bf');
    const keep = readFileSync(join(dir, f));
    const changed = Buffer.from(keep);
    changed[changed.length - 1] ^= 1;
    writeFileSync(join(dir, f), changed);
    try {
      const r = cliSync(['merge', 'shard-1', 'shard-2', 'shard-3', '--out', 'm7']);
      expect(r.code).toBe(2);
      expect(r.err).toMatch(/has changed since the shards were made/);
    } finally {
      writeFileSync(join(dir, f), keep);
    }
    for (const r of [missing, twice, other, kinds, none]) expect(r.err.trim().split('\n')).toHaveLength(1);
    for (const m of ['m1', 'm2', 'm3', 'm4', 'm5', 'm6', 'm7']) expect(existsSync(join(dir, m))).toBe(false);
  });
});

describe('render --shard k/n and merge', () => {
  it('3 shards of 4 conditions in separate processes, merged, give the files of one run: same render.json, same image bytes', async () => {
    const one = await cli(['render', 'scenario.json', '--out', 'render-one', '--blur-nm', '0.5', '--json']);
    expect(one.code, one.err).toBe(0);
    // shard 2 names the scenario by its absolute path: the same file, so the same run
    const shards = await Promise.all(
      [1, 2, 3].map((k) => cli(['render', k === 2 ? join(dir, 'scenario.json') : 'scenario.json', '--blur-nm', '0.5', '--shard', `${k}/3`, '--out', `rshard-${k}`, '--json'])),
    );
    for (const s of shards) expect(s.code, s.err).toBe(0);
    // condition j goes to shard (j mod 3) + 1
    expect(shards.map((s) => JSON.parse(s.out).conditions)).toEqual([['g200', 'g2m20'], ['g020'], ['g11m1']]);
    const merged = await cli(['merge', 'rshard-2', 'rshard-3', 'rshard-1', '--out', 'render-merged', '--json']);
    expect(merged.code, merged.err).toBe(0);
    expect(comparable(join(dir, 'render-merged', 'render.json'), 'render-merged')).toEqual(comparable(join(dir, 'render-one', 'render.json'), 'render-one'));
    expect(JSON.parse(merged.out.split('render-merged/').join('<out>/'))).toEqual(JSON.parse(one.out.split('render-one/').join('<out>/')));
    const names = readdirSync(join(dir, 'render-one')).sort();
    expect(readdirSync(join(dir, 'render-merged')).sort()).toEqual(names);
    expect(names.filter((n) => /\.(png|tif|svg)$/.test(n)).length).toBeGreaterThanOrEqual(4 * 7);
    for (const n of names.filter((x) => !x.endsWith('.json'))) expect(readFileSync(join(dir, 'render-merged', n)).equals(readFileSync(join(dir, 'render-one', n))), n).toBe(true);
  });

  it('merge refuses render shards of different --blur-nm (exit code 2)', async () => {
    expect((await cli(['render', 'scenario.json', '--shard', '1/2', '--out', 'b1'])).code).toBe(0);
    expect((await cli(['render', 'scenario.json', '--blur-nm', '1', '--shard', '2/2', '--out', 'b2'])).code).toBe(0);
    const r = cliSync(['merge', 'b1', 'b2', '--out', 'bm']);
    expect(r.code).toBe(2);
    expect(r.err.trim().split('\n')).toHaveLength(1);
    expect(r.err).toMatch(/other inputs or options/);
  });
});
