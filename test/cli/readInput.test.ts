/**
 * readInputFile: only regular files, with a size limit checked before reading
 * (issue: /dev/zero and a FIFO were read without end). The FIFO is never
 * opened, so these run in-process; a hang would still be caught by vitest's
 * test timeout only if the call returned, hence the FIFO case also runs in a
 * child of the compiled CLI in reliability.test.ts.
 */
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { InputError } from '../../src/errors.js';
import { readInputFile } from '../../src/cli/readInput.js';

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'thinfoil-readinput-'));
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

function refusal(p: string, max = 1024): string {
  try {
    readInputFile(p, 'micrograph file', max);
  } catch (e) {
    expect(e).toBeInstanceOf(InputError);
    return (e as Error).message;
  }
  throw new Error('not refused');
}

describe('readInputFile refuses what is not a regular file of bounded size', () => {
  it('/dev/zero is a device', () => {
    expect(refusal('/dev/zero')).toMatch(/^micrograph file "\/dev\/zero" is a device, not a saved file; give the path of a regular file$/);
  });
  it('a FIFO is refused without being opened', () => {
    const fifo = path.join(dir, 'pipe');
    const r = spawnSync('mkfifo', [fifo]);
    expect(r.status).toBe(0);
    expect(refusal(fifo)).toContain('is a pipe (FIFO)');
  });
  it('a folder', () => {
    expect(refusal(dir)).toContain('is a folder');
  });
  it('a file over the limit (sparse, 2 GB) is refused from its size', () => {
    const big = path.join(dir, 'big.tif');
    fs.writeFileSync(big, '');
    fs.truncateSync(big, 2 * 2 ** 30);
    expect(refusal(big, 1024 * 2 ** 20)).toContain('is 2048 MB, more than thinfoil reads (1024 MB)');
  });
  it('a missing file names the error code', () => {
    expect(refusal(path.join(dir, 'nope.png'))).toContain('cannot be read (ENOENT)');
  });
  it('a very long path is shown as a short excerpt', () => {
    const msg = refusal(path.join(dir, 'x'.repeat(5000)));
    expect(msg.length).toBeLessThan(200);
  });
  it('a regular file within the limit is read whole', () => {
    const f = path.join(dir, 'ok.bin');
    fs.writeFileSync(f, Buffer.from([1, 2, 3]));
    expect([...readInputFile(f, 'x', 3)]).toEqual([1, 2, 3]);
  });
});
