/**
 * One consistent output set per run. All files of a run are written into a
 * hidden staging folder beside the target folder (same parent, so the same
 * file system), flushed, and the staging folder is then swapped in by two
 * renames: target -> hidden "old" folder, staging -> target; the old folder
 * is then removed. Files of the previous set that the new run does not
 * write disappear with it, so the folder never mixes two runs.
 *
 * A run killed while staging leaves only its hidden staging folder; a run
 * killed between the two renames leaves no target but a complete hidden old
 * set. The next run for the same target (begin()) removes staging folders of
 * runs that no longer live and puts such an old set back, so after a kill a
 * reader finds the complete old set or the complete new one.
 *
 * A thinfoil output folder is replaced whole. To keep the user's own files
 * safe, begin() only accepts a target that does not exist, is empty, carries
 * the marker file of an earlier set, or holds only names thinfoil writes;
 * and it refuses any input file of the run that lies inside the target
 * (it would be replaced), before any work is done.
 */
import fs from 'node:fs';
import path from 'node:path';
import { randomBytes } from 'node:crypto';
import { excerpt, InputError } from '../errors.js';

/** Marker file in every output folder: the names of the set, one per line. */
export const SET_MARKER = '.thinfoil-output';

/** Names thinfoil writes (for folders of versions before the marker). */
const OWN_NAME = /^(render\.json|plan\.(png|svg|json)|scenario\.json|visibility\.(txt|json)|faults-and-inclusions\.txt|identify(-figure\.(png|svg)|-report\.html|\.json|-scenario\.json|-micrographs)?|.+-(bf|df)\.(png|tif)|bloch-waves\.csv|(thickness|rocking|profiles)\.(csv|png|svg))$/;

/** A folder without the marker is taken as an earlier thinfoil set only if it holds one of these. */
const LEGACY_SUMMARY = new Set(['render.json', 'plan.json', 'identify.json', 'bloch-waves.csv', 'visibility.txt']);

const USER_FIXABLE: Readonly<Record<string, string>> = {
  EACCES: 'permission denied',
  EPERM: 'operation not permitted',
  EROFS: 'the file system is read-only',
  ENOTDIR: 'a part of the path is a file, not a folder',
  EEXIST: 'a part of the path already exists as a file',
  ENOSPC: 'the disk is full',
  EDQUOT: 'the disk quota is exceeded',
  ENAMETOOLONG: 'the name is too long',
};

function translate(err: unknown, shown: string): unknown {
  if (err instanceof InputError) return err;
  const code = (err as NodeJS.ErrnoException | null)?.code;
  if (code !== undefined && Object.prototype.hasOwnProperty.call(USER_FIXABLE, code)) {
    return new InputError(`cannot write the output folder "${shown}": ${USER_FIXABLE[code]} (${code}); free space or choose another folder with --out`);
  }
  return err;
}

function alive(pid: number): boolean {
  if (pid === process.pid) return true;
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return (e as NodeJS.ErrnoException).code === 'EPERM';
  }
}

function fsyncPath(p: string): void {
  let fd: number | undefined;
  try {
    fd = fs.openSync(p, 'r');
    fs.fsyncSync(fd);
  } catch {
    // best effort (some file systems refuse fsync on folders)
  } finally {
    if (fd !== undefined) fs.closeSync(fd);
  }
}

function realOrResolved(p: string): string {
  try {
    return fs.realpathSync(p);
  } catch {
    return path.resolve(p);
  }
}

function isInside(child: string, parent: string): boolean {
  const rel = path.relative(parent, child);
  return rel === '' || (!rel.startsWith('..') && !path.isAbsolute(rel));
}

/**
 * Remove staging folders of dead runs for `target` and put back an old set
 * that a killed run left between its two renames. Safe to call at any time.
 */
export function recoverOutputFolder(target: string): void {
  const abs = path.resolve(target);
  const parent = path.dirname(abs);
  const base = path.basename(abs);
  let names: string[];
  try {
    names = fs.readdirSync(parent);
  } catch {
    return;
  }
  const re = new RegExp(`^\\.${base.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}\\.thinfoil-(new|old)-(\\d+)-[0-9a-f]+$`);
  for (const n of names) {
    const m = re.exec(n);
    if (!m || alive(Number(m[2]))) continue;
    const p = path.join(parent, n);
    if (m[1] === 'old' && !fs.existsSync(abs)) fs.renameSync(p, abs);
    else fs.rmSync(p, { recursive: true, force: true });
  }
}

export interface OutputSetOptions {
  /** The run's input files: refused when they lie inside the output folder. */
  inputs?: readonly string[];
  /** Option name for messages (default --out). */
  option?: string;
}

export class OutputSet {
  /** The target folder as given (paths reported to the user are under it). */
  readonly dir: string;
  private readonly abs: string;
  private readonly staging: string;
  private readonly names: string[] = [];
  private done = false;

  private constructor(dir: string, abs: string, staging: string) {
    this.dir = dir;
    this.abs = abs;
    this.staging = staging;
  }

  /**
   * Check the target and the inputs, clean up after killed runs and create
   * the staging folder. Call it before long work, so a refusal costs nothing.
   */
  static begin(dir: string, opts: OutputSetOptions = {}): OutputSet {
    const option = opts.option ?? '--out';
    if (dir.trim() === '') throw new InputError(`${option}: is empty; give the name of an output folder`);
    const abs = path.resolve(dir);
    const shown = excerpt(dir, 80);
    if (/^\/(proc|sys|dev)(\/|$)/.test(abs) || abs === path.parse(abs).root) {
      throw new InputError(`${option}: cannot write into "${shown}"; choose an ordinary folder`);
    }
    if (isInside(process.cwd(), abs)) {
      throw new InputError(`${option}: "${shown}" is the current folder or holds it, and an output folder is replaced whole; choose a new folder`);
    }
    const real = realOrResolved(abs);
    for (const input of opts.inputs ?? []) {
      const r = realOrResolved(input);
      if (isInside(r, real) || isInside(r, abs)) {
        throw new InputError(
          `input file "${excerpt(input, 80)}" lies in the output folder "${shown}", which is replaced by this run's files; move the input or choose another folder with ${option}`,
        );
      }
    }
    try {
      recoverOutputFolder(abs);
      const st = fs.statSync(abs, { throwIfNoEntry: false });
      if (st !== undefined) {
        if (!st.isDirectory()) throw new InputError(`${option}: "${shown}" is a file, not a folder; choose a folder`);
        const entries = fs.readdirSync(abs);
        const visible = entries.filter((n) => !n.startsWith('.'));
        if (!entries.includes(SET_MARKER) && visible.length > 0) {
          // a folder of an earlier version: only thinfoil's names, with one of its summaries
          const foreign = visible.find((n) => !OWN_NAME.test(n)) ?? (visible.some((n) => LEGACY_SUMMARY.has(n)) ? undefined : visible[0]);
          if (foreign !== undefined) {
            throw new InputError(
              `${option}: the folder "${shown}" holds files thinfoil did not write (e.g. "${excerpt(foreign, 40)}") and an output folder is replaced whole; choose a new or empty folder`,
            );
          }
        }
      }
      fs.mkdirSync(path.dirname(abs), { recursive: true });
      const staging = path.join(path.dirname(abs), `.${path.basename(abs)}.thinfoil-new-${process.pid}-${randomBytes(4).toString('hex')}`);
      fs.mkdirSync(staging);
      return new OutputSet(dir, abs, staging);
    } catch (e) {
      throw translate(e, shown);
    }
  }

  /** Where a file of the set will be once committed (for reports and JSON). */
  finalPath(name: string): string {
    return path.join(this.dir, name);
  }

  /** Where a file of the set is while staged (to read back before commit). */
  stagedPath(name: string): string {
    return path.join(this.staging, name);
  }

  /** Write one file of the set into the staging folder; `name` may contain sub-folders. */
  write(name: string, data: Uint8Array | string): string {
    if (this.done) throw new Error('output set already committed or aborted');
    const p = path.join(this.staging, name);
    if (!isInside(p, this.staging) || p === this.staging) throw new Error(`output name "${name}" leaves the output folder`);
    try {
      fs.mkdirSync(path.dirname(p), { recursive: true });
      const fd = fs.openSync(p, 'wx', 0o666);
      try {
        const bytes = typeof data === 'string' ? Buffer.from(data, 'utf8') : data;
        let off = 0;
        while (off < bytes.length) off += fs.writeSync(fd, bytes, off, bytes.length - off);
        fs.fsyncSync(fd);
      } finally {
        fs.closeSync(fd);
      }
    } catch (e) {
      this.abort();
      throw translate(e, excerpt(this.dir, 80));
    }
    this.names.push(name);
    return this.finalPath(name);
  }

  /** Swap the staged set in place of the previous one. */
  commit(): void {
    if (this.done) throw new Error('output set already committed or aborted');
    const parent = path.dirname(this.abs);
    let old: string | undefined;
    try {
      this.write(SET_MARKER, `${this.names.join('\n')}\n`);
      fsyncPath(this.staging);
      this.done = true;
      if (fs.existsSync(this.abs)) {
        old = path.join(parent, `.${path.basename(this.abs)}.thinfoil-old-${process.pid}-${randomBytes(4).toString('hex')}`);
        fs.renameSync(this.abs, old);
      }
      fs.renameSync(this.staging, this.abs);
      fsyncPath(parent);
      if (old !== undefined) fs.rmSync(old, { recursive: true, force: true });
    } catch (e) {
      this.done = true;
      fs.rmSync(this.staging, { recursive: true, force: true });
      if (old !== undefined && !fs.existsSync(this.abs)) fs.renameSync(old, this.abs);
      throw translate(e, excerpt(this.dir, 80));
    }
  }

  /** Drop the staged files (the previous set stays as it was). */
  abort(): void {
    this.done = true;
    fs.rmSync(this.staging, { recursive: true, force: true });
  }
}
