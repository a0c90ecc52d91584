/**
 * Crafted micrographs (test/imageio/craft_micrographs.py, Debian python3-pil
 * and numpy, LZW encoder written from TIFF 6.0 section 13): tiles larger than
 * the image, damaged LZW, wrong SamplesPerPixel, huge declared sizes. Each
 * file is decoded by the compiled reader in a child process that the test
 * kills after a time limit, so a hang fails the test instead of stalling
 * it. Files with values must decode to exactly the numpy arrays (which PIL /
 * libtiff also read back in the generator); the others must be refused with
 * an InputError containing the listed phrase.
 */
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';
import { IN_CI, needPython, runPython } from '../python.js';

const HERE = path.dirname(fileURLToPath(import.meta.url));
const ROOT = path.resolve(HERE, '../..');
const pil = needPython('PIL', 'numpy');
const HAVE_PIL = pil.ok;
const HAVE_DIST = fs.existsSync(path.join(ROOT, 'dist/imageio/readImage.js'));

interface Case {
  file: string;
  width?: number;
  height?: number;
  expected?: number[];
  error?: string;
  damaged?: boolean;
}
interface Outcome {
  ok: boolean;
  inputError?: boolean;
  message?: string;
  width?: number;
  height?: number;
  data?: number[];
}

/**
 * Decode `files` in one child process killed after `limitMs`; a file without a
 * result line after a kill is the one that hung (and those after it were not tried).
 */
function decodeInChild(files: readonly string[], limitMs: number): { outcomes: Outcome[]; killed: boolean } {
  const r = spawnSync(process.execPath, [path.join(HERE, 'decodeChild.mjs'), ...files], {
    encoding: 'utf8',
    timeout: limitMs,
    maxBuffer: 1024 * 2 ** 20,
  });
  const outcomes = r.stdout.split('\n').filter((l) => l !== '').map((l) => JSON.parse(l) as Outcome);
  return { outcomes, killed: r.signal !== null || r.error !== undefined };
}

/** Results of a group, computed once; `hung` names the file that was running at the kill. */
function group(cases: readonly Case[], limitMs: number): () => { byFile: Map<string, Outcome>; hung?: string } {
  let memo: { byFile: Map<string, Outcome>; hung?: string } | undefined;
  return () => {
    if (memo) return memo;
    const r = decodeInChild(cases.map((c) => path.join(CRAFTED.dir, c.file)), limitMs);
    const byFile = new Map(r.outcomes.map((o, i) => [cases[i].file, o] as const));
    memo = r.killed ? { byFile, hung: cases[r.outcomes.length]?.file ?? '(after the last file)' } : { byFile };
    return memo;
  };
}

function craft(): { dir: string; cases: Case[] } {
  if (!HAVE_PIL) return { dir: '', cases: [] };
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'thinfoil-crafted-'));
  runPython([path.join(HERE, 'craft_micrographs.py'), dir]);
  return { dir, cases: JSON.parse(fs.readFileSync(path.join(dir, 'manifest.json'), 'utf8')) as Case[] };
}
const CRAFTED = craft();

describe('crafted micrographs: prerequisites', () => {
  it('has python3-pil and numpy and the compiled reader (required when CI=true)', (ctx) => {
    pil.require(ctx);
    if (!HAVE_DIST) {
      if (IN_CI) expect.fail('dist/ is not built; run npx tsc -p tsconfig.build.json');
      ctx.skip('dist/ is not built');
    }
    expect(CRAFTED.cases.length).toBe(68);
  });
});

describe.skipIf(!HAVE_PIL || !HAVE_DIST)('crafted micrographs (craft_micrographs.py), decoded in child processes killed after 60 s', () => {
  afterAll(() => {
    if (CRAFTED.dir !== '') fs.rmSync(CRAFTED.dir, { recursive: true, force: true });
  });
  const readable = CRAFTED.cases.filter((c) => c.expected !== undefined);
  const refused = CRAFTED.cases.filter((c) => c.error !== undefined);
  const damaged = CRAFTED.cases.filter((c) => c.damaged === true);
  // time limits for each group of files decoded in one child (generous for 2 busy cores)
  const readableRun = group(readable, 60_000);
  const refusedRun = group(refused, 60_000);
  const damagedRun = group(damaged, 60_000);
  const outcome = (run: ReturnType<typeof group>, file: string): Outcome => {
    const r = run();
    expect(r.hung, `decoding hung on ${r.hung} (killed after the time limit)`).toBeUndefined();
    const o = r.byFile.get(file);
    expect(o).toBeDefined();
    return o!;
  };

  it.each(readable.map((c) => [c.file, c] as const))('%s decodes to the numpy values exactly', (_, c) => {
    const o = outcome(readableRun, c.file);
    expect(o.message).toBeUndefined();
    expect([o.width, o.height]).toEqual([c.width, c.height]);
    const got = o.data!;
    const want = Float32Array.from(c.expected!);
    let diff = 0;
    for (let i = 0; i < want.length; i++) if (got[i] !== want[i]) diff++;
    expect(diff).toBe(0);
  });

  it.each(refused.map((c) => [c.file, c] as const))('%s is refused with one sentence', (_, c) => {
    const o = outcome(refusedRun, c.file);
    expect(o.ok).toBe(false);
    expect(o.inputError).toBe(true);
    expect(o.message).toContain(c.error);
    expect(o.message).not.toMatch(/\n/);
  });

  it('40 randomly damaged LZW strips: each refused or decoded, none hangs, none is an internal error', () => {
    let refusedCount = 0;
    let decoded = 0;
    for (const c of damaged) {
      const o = outcome(damagedRun, c.file);
      if (o.ok) decoded++;
      else {
        expect(o.inputError, o.message).toBe(true);
        refusedCount++;
      }
    }
    expect(refusedCount + decoded).toBe(40);
    // LZW carries no checksum: a damaged byte that keeps every code valid and the length right
    // cannot be told from data. Most damage changes the decoded length and is refused.
    console.log(`damaged LZW: ${refusedCount} refused, ${decoded} decoded`);
    expect(refusedCount).toBeGreaterThanOrEqual(30);
  });
});
