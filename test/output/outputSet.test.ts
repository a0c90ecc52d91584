/**
 * One consistent output set (src/output/outputSet.ts): after a failed write or
 * a kill at any moment, the output folder holds the complete old set or the
 * complete new one, never a mix; stale files of the old set do not survive a
 * new set; staging folders of killed runs are cleaned by the next run.
 */
import { spawn, spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';
import { InputError } from '../../src/errors.js';
import { OutputSet, recoverOutputFolder, SET_MARKER } from '../../src/output/outputSet.js';

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const CLI = path.join(ROOT, 'dist', 'cli', 'main.js');
const work = fs.mkdtempSync(path.join(os.tmpdir(), 'thinfoil-set-'));
afterAll(() => fs.rmSync(work, { recursive: true, force: true }));

/** The names of the set in `dir` when it is complete (marker lists exactly the files there); undefined otherwise. */
function completeSet(dir: string): string[] | undefined {
  if (!fs.existsSync(path.join(dir, SET_MARKER))) return undefined;
  const listed = fs.readFileSync(path.join(dir, SET_MARKER), 'utf8').split('\n').filter((l) => l !== '' && l !== SET_MARKER).sort();
  const present = fs.readdirSync(dir).filter((n) => n !== SET_MARKER).sort();
  return JSON.stringify(listed) === JSON.stringify(present) ? present : undefined;
}

function deadPid(): number {
  const r = spawnSync(process.execPath, ['-e', 'process.stdout.write(String(process.pid))'], { encoding: 'utf8' });
  return Number(r.stdout);
}

function writeSet(dir: string, files: Record<string, string>): void {
  const set = OutputSet.begin(dir);
  for (const [n, d] of Object.entries(files)) set.write(n, d);
  set.commit();
}

describe('OutputSet in-process', () => {
  it('a new set replaces the old one whole: stale files of the old set are gone', () => {
    const dir = path.join(work, 'stale');
    writeSet(dir, { 'a-bf.png': 'A', 'b-bf.png': 'B', 'render.json': 'old' });
    writeSet(dir, { 'a-bf.png': 'A2', 'render.json': 'new' });
    expect(completeSet(dir)).toEqual(['a-bf.png', 'render.json']);
    expect(fs.readFileSync(path.join(dir, 'render.json'), 'utf8')).toBe('new');
  });

  it('a write that fails half-way (ENAMETOOLONG) leaves the complete old set and no staging folder', () => {
    const dir = path.join(work, 'failed');
    writeSet(dir, { 'a-bf.png': 'A', 'render.json': 'old' });
    const set = OutputSet.begin(dir);
    set.write('a-bf.png', 'A2');
    expect(() => set.write(`${'x'.repeat(300)}.png`, 'X')).toThrow(InputError);
    expect(completeSet(dir)).toEqual(['a-bf.png', 'render.json']);
    expect(fs.readFileSync(path.join(dir, 'render.json'), 'utf8')).toBe('old');
    expect(fs.readdirSync(work).filter((n) => n.startsWith('.failed.'))).toEqual([]);
  });

  it('a run killed between its two renames: the next run puts the old set back; staging of dead runs is removed', () => {
    const dir = path.join(work, 'swap');
    writeSet(dir, { 'a-bf.png': 'A', 'render.json': 'old' });
    const pid = deadPid();
    fs.renameSync(dir, path.join(work, `.swap.thinfoil-old-${pid}-0a0b`));
    fs.mkdirSync(path.join(work, `.swap.thinfoil-new-${pid}-0c0d`));
    fs.writeFileSync(path.join(work, `.swap.thinfoil-new-${pid}-0c0d`, 'half.png'), 'h');
    recoverOutputFolder(dir);
    expect(completeSet(dir)).toEqual(['a-bf.png', 'render.json']);
    expect(fs.readdirSync(work).filter((n) => n.startsWith('.swap.'))).toEqual([]);
  });

  it('refuses an empty name, a folder of foreign files, and inputs inside the folder, before writing anything', () => {
    expect(() => OutputSet.begin('')).toThrow(/--out: is empty/);
    const foreign = path.join(work, 'mine');
    fs.mkdirSync(foreign);
    fs.writeFileSync(path.join(foreign, 'thesis.tex'), 'x');
    expect(() => OutputSet.begin(foreign)).toThrow(/holds files thinfoil did not write/);
    // micrographs named like thinfoil's images, without any thinfoil summary: not taken as an old set
    const mics = path.join(work, 'mics');
    fs.mkdirSync(mics);
    fs.writeFileSync(path.join(mics, 'g200-df.png'), 'measured');
    expect(() => OutputSet.begin(mics)).toThrow(/holds files thinfoil did not write \(e\.g\. "g200-df\.png"\)/);
    const dir = path.join(work, 'withinput');
    writeSet(dir, { 'g200-df.png': 'old' });
    expect(() => OutputSet.begin(dir, { inputs: [path.join(dir, 'g200-df.png')] })).toThrow(/lies in the output folder/);
    expect(fs.readdirSync(work).filter((n) => n.startsWith('.withinput.') || n.startsWith('.mine.') || n.startsWith('.mics.'))).toEqual([]);
  });
});

const SC = (name: string, n: number, px: number) => ({
  name,
  material: 'Cu',
  kV: 200,
  foil: { thickness_nm: 80, normal: [0, 0, 1] },
  beam: [0, 0, 1],
  imageX: [1, 0, 0],
  image: { width_px: px, height_px: px, pixel_nm: 1 },
  conditions: [
    { id: 'g200', g: [2, 0, 0], w: 0.5 },
    { id: 'g020', g: [0, 2, 0], w: 0.5 },
    { id: 'g220', g: [2, 2, 0], w: 0.5 },
    { id: 'g2m20', g: [2, -2, 0], w: 0.5 },
  ].slice(0, n),
  defects: [{ type: 'dislocation', b: '1/2[1 0 1]', line: [1, 1, 2], point_nm: [0, 0, 40] }],
});

describe.skipIf(!fs.existsSync(CLI))('render killed with SIGKILL at different moments (compiled CLI)', () => {
  it('each time the folder holds the complete old set or the complete new set (after the next run\'s recovery at the latest)', async () => {
    const oldFile = path.join(work, 'old.json');
    const newFile = path.join(work, 'new.json');
    fs.writeFileSync(oldFile, JSON.stringify(SC('old set', 1, 16)));
    fs.writeFileSync(newFile, JSON.stringify(SC('new set', 4, 32)));
    const out = path.join(work, 'killed');
    const outcomes: string[] = [];
    // kill plans: after a delay (ms), or as soon as the run's staging folder holds k files (mid-write)
    const plans: Array<{ delay?: number; files?: number }> = [{ delay: 300 }, { files: 1 }, { files: 4 }, { files: 8 }, { files: 9 }, { files: 10 }, {}];
    // the old set is rendered once (a complete committed set) and copied into place before every kill
    const pristine = path.join(work, 'pristine-old');
    const first = spawnSync(process.execPath, [CLI, 'render', oldFile, '--out', pristine, '--json'], { encoding: 'utf8', timeout: 60_000 });
    expect(first.status, first.stderr).toBe(0);
    for (const plan of plans) {
      const delay = plan.delay ?? (plan.files === undefined ? 'none' : `${plan.files} staged files`);
      fs.rmSync(out, { recursive: true, force: true });
      fs.cpSync(pristine, out, { recursive: true });
      const child = spawn(process.execPath, [CLI, 'render', newFile, '--out', out, '--json'], { stdio: 'ignore' });
      const exited = new Promise<number | null>((resolve) => child.on('exit', (code) => resolve(code)));
      const staged = (): number => {
        const st = fs.readdirSync(work).find((n) => n.startsWith('.killed.thinfoil-new-'));
        if (st === undefined) return 0;
        try {
          return fs.readdirSync(path.join(work, st)).length;
        } catch {
          return 0; // renamed away just now
        }
      };
      const timer =
        plan.delay !== undefined
          ? setTimeout(() => child.kill('SIGKILL'), plan.delay)
          : plan.files !== undefined
            ? setInterval(() => {
                if (staged() >= plan.files!) child.kill('SIGKILL');
              }, 1)
            : undefined;
      const code = await exited;
      clearTimeout(timer);
      clearInterval(timer);
      const check = (when: string): string => {
        const names = completeSet(out);
        expect(names, `${when}, kill at ${delay}`).toBeDefined();
        const summary = JSON.parse(fs.readFileSync(path.join(out, 'render.json'), 'utf8')) as {
          scenario: string;
          images: { png: string; tiff: string }[];
          figures: { files: string[] };
          conditions: { corePixels?: { mask: string } }[];
        };
        const listed = summary.images
          .flatMap((e) => [path.basename(e.png), path.basename(e.tiff)])
          .concat(summary.figures.files.map((f) => path.basename(f)))
          .concat(summary.conditions.flatMap((c) => (c.corePixels === undefined ? [] : [path.basename(c.corePixels.mask)])))
          .concat('render.json')
          .sort();
        expect(names, `${when}: render.json lists exactly the images there`).toEqual(listed);
        return summary.scenario;
      };
      if (fs.existsSync(out)) check('right after the kill');
      recoverOutputFolder(out); // what the next run does first
      const which = check('after recovery');
      expect(fs.readdirSync(work).filter((n) => n.startsWith('.killed.')), 'no staging or old folders left').toEqual([]);
      outcomes.push(`${delay}: ${code === null ? 'killed' : `exit ${code}`}, ${which}`);
    }
    console.log(outcomes.join('; '));
    expect(outcomes.some((o) => o.includes('new set'))).toBe(true);
  });
});
