/**
 * Reading the user's input files (scenarios, micrographs) with a size limit
 * checked before reading. Only regular files are read: a folder, a device
 * such as /dev/zero, a FIFO or a socket is refused with one sentence, so a
 * read can neither block nor run without end. A FIFO is never opened.
 */
import fs from 'node:fs';
import { excerpt, InputError } from '../errors.js';

/** Largest scenario file read. */
export const MAX_SCENARIO_BYTES = 4 * 2 ** 20;

function mb(n: number): string {
  return n >= 2 ** 20 ? `${Math.round(n / 2 ** 20)} MB` : `${Math.ceil(n / 1024)} kB`;
}

/**
 * The bytes of a regular file no larger than `maxBytes`; `what` names the
 * file in messages (e.g. `scenario file`), `context` follows the path (e.g. ` for g200`).
 */
export function readInputFile(path: string, what: string, maxBytes: number, context = ''): Buffer {
  const shown = `"${excerpt(path, 80)}"${context}`;
  let st: fs.Stats;
  try {
    st = fs.statSync(path);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new InputError(`${what} ${shown} cannot be read (${code ?? 'error'}); check the path`);
  }
  if (!st.isFile()) {
    const kind = st.isDirectory() ? 'a folder' : st.isFIFO() ? 'a pipe (FIFO)' : st.isCharacterDevice() || st.isBlockDevice() ? 'a device' : st.isSocket() ? 'a socket' : 'not a regular file';
    throw new InputError(`${what} ${shown} is ${kind}, not a saved file; give the path of a regular file`);
  }
  if (st.size > maxBytes) {
    throw new InputError(`${what} ${shown} is ${mb(st.size)}, more than thinfoil reads (${mb(maxBytes)}); give a smaller file`);
  }
  let fd: number | undefined;
  try {
    // O_NONBLOCK: if the path was replaced by a FIFO since the check, opening it does not wait for a writer
    fd = fs.openSync(path, fs.constants.O_RDONLY | fs.constants.O_NONBLOCK);
    const now = fs.fstatSync(fd);
    if (!now.isFile()) throw new InputError(`${what} ${shown} is not a regular file; give the path of a saved file`);
    const size = Math.min(now.size, maxBytes);
    const buf = Buffer.alloc(size);
    let off = 0;
    while (off < size) {
      const n = fs.readSync(fd, buf, off, size - off, off);
      if (n === 0) break; // shrank while reading
      off += n;
    }
    return off === size ? buf : buf.subarray(0, off);
  } catch (e) {
    if (e instanceof InputError) throw e;
    const code = (e as NodeJS.ErrnoException).code;
    throw new InputError(`${what} ${shown} cannot be read (${code ?? 'error'}); check the path`);
  } finally {
    if (fd !== undefined) fs.closeSync(fd);
  }
}
