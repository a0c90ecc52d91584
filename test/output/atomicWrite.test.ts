/**
 * writeFileAtomic (synchronous): temp file in the same folder, fsync,
 * rename (the POSIX rename(2) replaces the destination entry atomically);
 * parent folders created; temp removed on failure; input files never modified.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { InputError } from '../../src/errors.js';
import { writeFileAtomic } from '../../src/output/atomicWrite.js';

const TMP = fs.mkdtempSync(path.join(os.tmpdir(), 'thinfoil-atomic-'));
afterAll(() => fs.rmSync(TMP, { recursive: true, force: true }));
let counter = 0;
const freshDir = (): string => fs.mkdtempSync(path.join(TMP, `t${counter++}-`));
const leftovers = (dir: string): string[] => fs.readdirSync(dir).filter((f) => f.endsWith('.tmp'));

type Writer = (p: string, d: Uint8Array | string, o?: { protectedPaths?: readonly string[] }) => Promise<void>;
const WRITERS: Array<[string, Writer]> = [
  ['writeFileAtomic', async (p, d, o) => writeFileAtomic(p, d, o)],
];

describe.each(WRITERS)('%s', (_, write) => {
  it('writes bytes and UTF-8 text, creating parent folders', async () => {
    const dir = freshDir();
    const a = path.join(dir, 'deep', 'er', 'a.bin');
    await write(a, new Uint8Array([0, 1, 2, 255]));
    expect(Array.from(fs.readFileSync(a))).toEqual([0, 1, 2, 255]);
    const b = path.join(dir, 'b.csv');
    await write(b, 'ξ,Å\r\n');
    expect(fs.readFileSync(b, 'utf8')).toBe('ξ,Å\r\n');
    expect(leftovers(dir)).toEqual([]);
  });

  it('replaces an existing file completely, keeps its permissions, leaves no temp file', async () => {
    const dir = freshDir();
    const f = path.join(dir, 'out.txt');
    fs.writeFileSync(f, 'old content that is longer than the new one');
    fs.chmodSync(f, 0o640);
    await write(f, 'new');
    expect(fs.readFileSync(f, 'utf8')).toBe('new');
    expect(fs.statSync(f).mode & 0o777).toBe(0o640);
    expect(leftovers(dir)).toEqual([]);
  });

  it('writes an empty file', async () => {
    const dir = freshDir();
    const f = path.join(dir, 'empty');
    await write(f, new Uint8Array(0));
    expect(fs.statSync(f).size).toBe(0);
  });

  it('on failure (destination is a non-empty folder) throws an InputError and removes the temp file', async () => {
    const dir = freshDir();
    const target = path.join(dir, 'taken');
    fs.mkdirSync(target);
    fs.writeFileSync(path.join(target, 'x'), 'x');
    await expect(write(target, 'data')).rejects.toBeInstanceOf(InputError);
    await expect(write(target, 'data')).rejects.toThrow(/Cannot write output file .*taken/);
    expect(leftovers(dir)).toEqual([]);
    expect(fs.readFileSync(path.join(target, 'x'), 'utf8')).toBe('x');
  });

  it('a parent path that is a file gives an InputError', async () => {
    const dir = freshDir();
    fs.writeFileSync(path.join(dir, 'file'), 'x');
    await expect(write(path.join(dir, 'file', 'sub', 'out.png'), 'data')).rejects.toBeInstanceOf(InputError);
  });

  it('writing through a symbolic link to an input replaces the link, not the input', async () => {
    const dir = freshDir();
    const input = path.join(dir, 'micrograph.tif');
    fs.writeFileSync(input, 'INPUT');
    const link = path.join(dir, 'link.tif');
    fs.symlinkSync(input, link);
    await write(link, 'OUTPUT');
    expect(fs.readFileSync(input, 'utf8')).toBe('INPUT');
    expect(fs.lstatSync(link).isSymbolicLink()).toBe(false);
    expect(fs.readFileSync(link, 'utf8')).toBe('OUTPUT');
  });

  it('refuses to replace a protected input, under any spelling of its path', async () => {
    const dir = freshDir();
    const input = path.join(dir, 'scenario.json');
    fs.writeFileSync(input, '{"in": 1}');
    const hard = path.join(dir, 'hard.json');
    fs.linkSync(input, hard);
    for (const target of [input, path.join(dir, '.', 'scenario.json'), hard]) {
      await expect(write(target, 'x', { protectedPaths: [input] })).rejects.toThrow(/is the input file/);
    }
    expect(fs.readFileSync(input, 'utf8')).toBe('{"in": 1}');
    expect(leftovers(dir)).toEqual([]);
    // a protected path that does not exist does not block anything
    await write(path.join(dir, 'new.json'), 'ok', { protectedPaths: [path.join(dir, 'missing')] });
    expect(fs.readFileSync(path.join(dir, 'new.json'), 'utf8')).toBe('ok');
  });
});
