/**
 * Atomic file output: the bytes go to a uniquely named temporary file in the
 * destination's own folder, are flushed to disk (fsync), and the temporary
 * file is then renamed over the destination. A reader (or an interrupted run)
 * sees either the old file or the complete new one, never a half-written one.
 * On any failure the temporary file is removed.
 *
 * Renaming replaces the directory entry: when the destination is a symbolic
 * link, the link is replaced and the file it pointed to stays untouched.
 * Pass the paths of the run's input files (scenario, micrographs) as
 * `protectedPaths` and the write is refused if the destination is one of them.
 */
import fs from 'node:fs';
import path from 'node:path';
import { randomBytes } from 'node:crypto';
import { InputError } from '../errors.js';

export interface AtomicWriteOptions {
  /** Files that must never be replaced (the run's inputs). */
  protectedPaths?: readonly string[];
}

/** fs error codes a user can fix by choosing another output path. */
const USER_FIXABLE: Readonly<Record<string, string>> = {
  EACCES: 'permission denied',
  EPERM: 'operation not permitted',
  EROFS: 'the file system is read-only',
  ENOTDIR: 'a part of the path is a file, not a folder',
  EISDIR: 'the path is a folder',
  ENOTEMPTY: 'the path is a folder',
  EEXIST: 'a part of the path already exists as a file',
  ENOSPC: 'the disk is full',
  EDQUOT: 'the disk quota is exceeded',
  ENAMETOOLONG: 'the name is too long',
  ENOENT: 'a part of the path does not exist',
};

function tempPathFor(target: string): string {
  const dir = path.dirname(target);
  const base = path.basename(target);
  return path.join(dir, `.${base}.${process.pid}.${randomBytes(6).toString('hex')}.tmp`);
}

function toBytes(data: Uint8Array | string): Uint8Array {
  return typeof data === 'string' ? Buffer.from(data, 'utf8') : data;
}

/** Convert an fs failure into an InputError when the user can fix it. */
function translate(err: unknown, target: string): unknown {
  const code = (err as NodeJS.ErrnoException | null)?.code;
  if (code !== undefined && Object.prototype.hasOwnProperty.call(USER_FIXABLE, code)) {
    return new InputError(
      `Cannot write output file ${target}: ${USER_FIXABLE[code]} (${code}); choose a writable output path.`,
    );
  }
  return err;
}

function sameFile(a: fs.Stats, b: fs.Stats): boolean {
  return a.dev === b.dev && a.ino === b.ino;
}

function checkProtected(target: string, existing: fs.Stats | undefined, protectedPaths: readonly string[]): void {
  if (existing === undefined) return;
  for (const p of protectedPaths) {
    let st: fs.Stats;
    try {
      st = fs.statSync(p);
    } catch {
      continue; // a protected path that does not exist cannot be replaced
    }
    if (sameFile(st, existing)) {
      throw new InputError(
        `Output file ${target} is the input file ${p}; choose a different output path so the input is not replaced.`,
      );
    }
  }
}

/** lstat that returns undefined when nothing is there. */
function lstatOrUndefined(p: string): fs.Stats | undefined {
  try {
    return fs.lstatSync(p);
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'ENOENT') return undefined;
    throw err;
  }
}

/** Best effort: make the rename itself durable. Not all platforms allow it. */
function fsyncDirSync(dir: string): void {
  let fd: number | undefined;
  try {
    fd = fs.openSync(dir, 'r');
    fs.fsyncSync(fd);
  } catch {
    // ignored: directory fsync is unsupported on some platforms
  } finally {
    if (fd !== undefined) fs.closeSync(fd);
  }
}

/** Kernel pseudo-file systems, where Node's recursive mkdir can spin forever. */
function underProcOrSys(absDir: string): boolean {
  return /^\/(proc|sys)(\/|$)/.test(absDir);
}

/**
 * Create an output folder before long work starts, so that a folder that
 * cannot be written is reported at once (InputError), not after a render.
 */
export function ensureOutputDir(dir: string): void {
  const abs = path.resolve(dir);
  if (underProcOrSys(abs)) throw new InputError(`cannot write into "${dir}" (under /proc or /sys); choose an ordinary folder with --out`);
  try {
    fs.mkdirSync(abs, { recursive: true });
    fs.accessSync(abs, fs.constants.W_OK);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code ?? 'error';
    throw new InputError(`cannot write into the output folder "${dir}" (${code}); choose another folder with --out`);
  }
}

/**
 * Write `data` (bytes, or a string written as UTF-8) to `target` atomically,
 * creating parent folders as needed. Synchronous: when it returns, the file is
 * complete on disk.
 */
export function writeFileAtomic(target: string, data: Uint8Array | string, options: AtomicWriteOptions = {}): void {
  const bytes = toBytes(data);
  const dir = path.dirname(path.resolve(target));
  if (underProcOrSys(dir)) {
    throw new InputError(`cannot write "${target}" under /proc or /sys; choose an ordinary folder with --out`);
  }
  let tmp: string | undefined;
  let fd: number | undefined;
  try {
    fs.mkdirSync(dir, { recursive: true });
    // stat (follows links) for the protection check, lstat for the mode to keep
    const linked = lstatOrUndefined(target);
    const existing = linked === undefined ? undefined : fs.statSync(target, { throwIfNoEntry: false });
    checkProtected(target, existing, options.protectedPaths ?? []);
    tmp = tempPathFor(path.resolve(target));
    fd = fs.openSync(tmp, 'wx', 0o666);
    let off = 0;
    while (off < bytes.length) off += fs.writeSync(fd, bytes, off, bytes.length - off);
    if (linked !== undefined && linked.isFile()) fs.fchmodSync(fd, linked.mode & 0o7777);
    fs.fsyncSync(fd);
    fs.closeSync(fd);
    fd = undefined;
    fs.renameSync(tmp, target);
    tmp = undefined;
    fsyncDirSync(dir);
  } catch (err) {
    if (fd !== undefined) {
      try {
        fs.closeSync(fd);
      } catch {
        // already failing; the original error is more useful
      }
    }
    if (tmp !== undefined) fs.rmSync(tmp, { force: true });
    throw translate(err, target);
  }
}
