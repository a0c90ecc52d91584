/**
 * Seeded fuzz test of scenario handling, as a careless user would write
 * scenarios: a small valid scenario is mutated (a field replaced by an odd
 * value, removed, or an unknown field added), with a fixed seed so every run
 * sees the same cases.
 *
 * In-process (MUTATIONS_IN_PROCESS cases): parseScenario either returns or
 * throws an InputError whose message is one line of bounded length; any other
 * exception is an internal error and fails the test.
 *
 * Through the compiled CLI (a smaller sample, spawning is slow on 2 cores):
 * render, visibility and fault end with exit code 0 or 2; on 2, stderr is one
 * line and nothing was written; on 0, the JSON on stdout and render.json hold
 * no null, NaN or Infinity.
 */
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';
import { InputError } from '../../src/errors.js';
import { parseScenario } from '../../src/scenario/parse.js';
import { seededRandom } from '../../src/analysis/identifyRandom.js';

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const CLI = path.join(ROOT, 'dist', 'cli', 'main.js');
const MUTATIONS_IN_PROCESS = 400;
const MUTATIONS_CLI = 12;
const CLI_TIMEOUT_MS = 60_000;

const BASE = {
  name: 'fuzz base (invented)',
  material: 'Cu',
  kV: 200,
  foil: { thickness_nm: 60, normal: [0, 0, 1] },
  beam: [0, 0, 1],
  imageX: [1, 0, 0],
  image: { width_px: 12, height_px: 12, pixel_nm: 2 },
  absorption: 0.1,
  conditions: [
    { id: 'g200', g: [2, 0, 0], w: 0.5 },
    { id: 'g020', g: [0, 2, 0], s_per_nm: 0.01 },
  ],
  defects: [
    { type: 'dislocation', label: 'P', b: '1/2[1 0 1]', line: [1, 1, 2], point_nm: [0, 0, 30] },
    { type: 'fault', plane: [1, 1, 1], nature: 'intrinsic', point_nm: [0, 0, 30] },
    { type: 'inclusion', centre_nm: [5, 5, 30], radius_nm: 3, misfit: 0.02 },
    { type: 'loop', b: '1/3[1 1 1]', normal: [1, 1, 1], centre_nm: [-5, 5, 30], radius_nm: 4, fault: 'intrinsic' },
  ],
  candidates: ['1/2<110>'],
};

/** Odd values a careless or unlucky user might type. */
const ODD: unknown[] = [
  0, -1, 1e308, -1e308, 1e-320, 3.7, 1e6, -0, 2 ** 53, null, true, [], {}, '', ' ', 'NaN', 'Infinity',
  '1e400', '[1e400 0 0]', '0.5[1e308 0 0]', [1e-320, 0, 0], '[1000000 0 0]', [1e308, 1e308, 0], '1/0[1 0 0]',
  'x'.repeat(300), 'kupfer-versetzung-ä', '銅の転位', '\n\t', [0, 0, 0], [1, 2], [1, 2, 3, 4], '1/2<110>', { row: 31 },
  { set: [[2, 0, 0]] }, 'intrinsic', [[1, 0, 0]], -1e-9, 0.001, 1e5,
];

type Json = unknown;

function paths(v: Json, at: (string | number)[] = [], out: (string | number)[][] = []): (string | number)[][] {
  out.push(at);
  if (Array.isArray(v)) v.forEach((x, i) => paths(x, [...at, i], out));
  else if (v !== null && typeof v === 'object') for (const k of Object.keys(v)) paths((v as Record<string, Json>)[k], [...at, k], out);
  return out;
}

function mutate(seed: number): Json {
  const rnd = seededRandom(seed);
  const pick = <T,>(a: readonly T[]): T => a[Math.floor(rnd.uniform() * a.length)];
  const s = JSON.parse(JSON.stringify(BASE)) as Record<string, Json>;
  const nChanges = rnd.uniform() < 0.7 ? 1 : 2;
  for (let c = 0; c < nChanges; c++) {
    const all = paths(s).filter((p) => p.length > 0);
    const p = pick(all);
    let parent: any = s;
    for (const k of p.slice(0, -1)) parent = parent[k];
    const key = p[p.length - 1];
    const kind = rnd.uniform();
    if (kind < 0.4 && typeof parent[key] === 'number') parent[key] *= pick([0.5, 2, -1, 10, 0.1, 1.5, 3]);
    else if (kind < 0.8) parent[key] = JSON.parse(JSON.stringify(pick(ODD)));
    else if (kind < 0.9) {
      if (Array.isArray(parent)) parent.splice(key as number, 1);
      else delete parent[key];
    } else if (!Array.isArray(parent)) parent[`${String(key)}_extra`] = pick(ODD);
  }
  return s;
}

/** Valid JSON (so no bare NaN or Infinity) holding no null anywhere (non-finite numbers become null in JSON.stringify). */
function numbersOk(text: string): boolean {
  let ok = true;
  const walk = (v: unknown): void => {
    if (v === null) ok = false;
    else if (Array.isArray(v)) v.forEach(walk);
    else if (typeof v === 'object') Object.values(v as object).forEach(walk);
  };
  if (text.trim() === '') return true;
  try {
    walk(JSON.parse(text)); // one document (render.json) ...
  } catch {
    try {
      for (const line of text.split('\n').filter((l) => l.trim() !== '')) walk(JSON.parse(line)); // ... or JSON lines
    } catch {
      return false;
    }
  }
  return ok;
}

function listTree(dir: string): string[] {
  const out: string[] = [];
  const walk = (d: string) => {
    for (const e of fs.readdirSync(d, { withFileTypes: true })) {
      const p = path.join(d, e.name);
      out.push(path.relative(dir, p));
      if (e.isDirectory()) walk(p);
    }
  };
  walk(dir);
  return out.sort();
}

describe('fuzz: mutated scenarios through the parser (in-process)', () => {
  it(`${MUTATIONS_IN_PROCESS} seeded mutations: accepted, or refused with one short line naming a field`, () => {
    let accepted = 0;
    let refused = 0;
    for (let seed = 1; seed <= MUTATIONS_IN_PROCESS; seed++) {
      const sc = mutate(seed);
      try {
        parseScenario(sc);
        accepted++;
      } catch (e) {
        if (!(e instanceof InputError)) throw new Error(`seed ${seed}: internal error ${(e as Error).stack}`);
        expect(e.message, `seed ${seed}`).not.toMatch(/\n/);
        expect(e.message.length, `seed ${seed}: ${e.message}`).toBeLessThan(400);
        refused++;
      }
    }
    console.log(`fuzz in-process: ${accepted} accepted, ${refused} refused, 0 internal errors`);
    expect(accepted + refused).toBe(MUTATIONS_IN_PROCESS);
    expect(refused).toBeGreaterThan(MUTATIONS_IN_PROCESS / 4);
    expect(accepted).toBeGreaterThan(10);
  });
});

const HAVE_DIST = fs.existsSync(CLI);

describe.skipIf(!HAVE_DIST)('fuzz: mutated scenarios through the compiled CLI', () => {
  const work = fs.mkdtempSync(path.join(os.tmpdir(), 'thinfoil-fuzz-'));
  afterAll(() => fs.rmSync(work, { recursive: true, force: true }));

  it(`${MUTATIONS_CLI} mutations x render/visibility/fault: exit 0 or 2, one line on exit 2 and nothing written, no non-numbers on exit 0`, () => {
    const counts = { run: 0, exit0: 0, exit2: 0 };
    for (let i = 0; i < MUTATIONS_CLI; i++) {
      const seed = 10_000 + i;
      const file = path.join(work, `s${seed}.json`);
      fs.writeFileSync(file, JSON.stringify(mutate(seed)));
      const cmd = (['render', 'visibility', 'fault'] as const)[i % 3];
      const out = path.join(work, `o${seed}`);
      const before = listTree(work);
      const args = cmd === 'render' ? [CLI, cmd, file, '--json', '--out', out] : [CLI, cmd, file, '--json'];
      const r = spawnSync(process.execPath, args, { cwd: work, encoding: 'utf8', timeout: CLI_TIMEOUT_MS });
      counts.run++;
      const what = `seed ${seed} ${cmd}: status ${r.status} signal ${r.signal} stderr ${r.stderr.slice(0, 300)}`;
      expect(r.signal, what).toBeNull();
      expect([0, 2], what).toContain(r.status);
      const errLines = r.stderr.split('\n').filter((l) => l !== '' && !l.startsWith('thinfoil: warning:'));
      if (r.status === 2) {
        counts.exit2++;
        expect(errLines.length, what).toBe(1);
        expect(errLines[0].length, what).toBeLessThan(420);
        expect(listTree(work), `${what}: wrote files`).toEqual(before);
      } else {
        counts.exit0++;
        expect(errLines, what).toEqual([]);
        expect(numbersOk(r.stdout), `${what}: ${r.stdout.slice(0, 300)}`).toBe(true);
        if (cmd === 'render') expect(numbersOk(fs.readFileSync(path.join(out, 'render.json'), 'utf8')), what).toBe(true);
      }
    }
    console.log(`fuzz CLI: ${counts.run} runs, ${counts.exit0} exit 0, ${counts.exit2} exit 2, 0 other`);
    expect(counts.exit0 + counts.exit2).toBe(MUTATIONS_CLI);
  });

  it('absorption 0: the outputs write xi\'_g as "none", never null or Infinity', () => {
    const file = path.join(work, 'absorption0.json');
    fs.writeFileSync(file, JSON.stringify({ ...BASE, absorption: 0, defects: [BASE.defects[0]] }));
    const out = path.join(work, 'abs0');
    const r = spawnSync(process.execPath, [CLI, 'render', file, '--json', '--out', out], { cwd: work, encoding: 'utf8', timeout: CLI_TIMEOUT_MS });
    expect(r.status, r.stderr).toBe(0);
    const text = fs.readFileSync(path.join(out, 'render.json'), 'utf8');
    expect(numbersOk(text)).toBe(true);
    expect(JSON.parse(text).conditions[0].xiAbs_nm).toBe('none');
  });

  it.each([
    ['render /dev/zero', ['render', '/dev/zero'], 'is a device'],
    ['render of a folder', ['render', '.'], 'is a folder'],
    ['--out ""', ['render', 'SCENARIO', '--out', ''], '--out: is empty'],
  ])('%s is refused at once with exit 2', (_w, argv, part) => {
    const file = path.join(work, 'ok.json');
    fs.writeFileSync(file, JSON.stringify(BASE));
    const r = spawnSync(process.execPath, [CLI, ...argv.map((a) => (a === 'SCENARIO' ? file : a))], { cwd: work, encoding: 'utf8', timeout: 20_000 });
    expect(r.signal).toBeNull();
    expect(r.status).toBe(2);
    expect(r.stderr).toContain(part);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
  });

  it('identify --micrograph from a FIFO and from /dev/zero: exit 2 at once, nothing read', () => {
    const file = path.join(work, 'ok.json');
    fs.writeFileSync(file, JSON.stringify(BASE));
    const fifo = path.join(work, 'pipe.tif');
    expect(spawnSync('mkfifo', [fifo]).status).toBe(0);
    for (const m of [fifo, '/dev/zero']) {
      const r = spawnSync(process.execPath, [CLI, 'identify', file, '--micrograph', `g200=${m}`, '--out', path.join(work, 'id')], { cwd: work, encoding: 'utf8', timeout: 20_000 });
      expect(r.signal, `${m} hung`).toBeNull();
      expect(r.status, r.stderr).toBe(2);
      expect(r.stderr).toMatch(/is a (pipe \(FIFO\)|device), not a saved file/);
    }
  });

  it('an input inside the output folder is refused before any work (render o/render.json --out o)', () => {
    const o = path.join(work, 'self');
    fs.mkdirSync(o);
    const file = path.join(o, 'render.json');
    fs.writeFileSync(file, JSON.stringify(BASE));
    const r = spawnSync(process.execPath, [CLI, 'render', file, '--out', o], { cwd: work, encoding: 'utf8', timeout: 20_000 });
    expect(r.status).toBe(2);
    expect(r.stderr).toContain('lies in the output folder');
    expect(JSON.parse(fs.readFileSync(file, 'utf8'))).toEqual(BASE);
    expect(fs.readdirSync(o)).toEqual(['render.json']);
  });
});
