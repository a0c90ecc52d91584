/**
 * Shards of a run for a cluster scheduler: `--shard k/n` does the k-th of n
 * deterministic shares of the work (candidate j of identify, condition j of
 * render, for j mod n = k - 1) and writes it into its output folder as
 * shard.json (what was done, of which inputs) plus shard.bin (the numbers);
 * `thinfoil merge` reads the n folders back (readShards) and finishes the
 * run as one run would.
 *
 * The fingerprint is a SHA-256 over the kind of run, the program version,
 * the bytes of the scenario and micrograph files, the micrographs' condition
 * ids in order and the options that shape the result; shards of different
 * inputs or options cannot be merged.
 */
import { createHash } from 'node:crypto';
import { join, resolve } from 'node:path';
import { excerpt, InputError } from '../errors.js';
import { readInputFile } from './readInput.js';
import type { OutputSet } from '../output/outputSet.js';
import { jsonText } from '../output/json.js';
import { printJson, sig } from './run.js';

export const SHARD_MANIFEST = 'shard.json';
export const SHARD_DATA = 'shard.bin';
export const SHARD_FORMAT = 'thinfoil shard 1';
/** Version of the program written into the fingerprint (shards of two versions are not merged). */
export const PROGRAM_VERSION = '0.1.0';
/** Largest n of --shard k/n (a job array of more tasks than this is not sensible for one scenario). */
export const MAX_SHARDS = 10000;
/** Largest shard.bin read by merge. */
export const MAX_SHARD_DATA_BYTES = 2 ** 31 - 1;
const MAX_MANIFEST_BYTES = 64 * 2 ** 20;

export interface Shard {
  /** 1-based index of this shard. */
  readonly index: number;
  readonly count: number;
}

/** `--shard k/n` -> { index: k, count: n }; InputError with one sentence otherwise. */
export function parseShard(text: string): Shard {
  const m = /^\s*(\d{1,6})\s*\/\s*(\d{1,6})\s*$/.exec(text);
  if (m === null) throw new InputError(`--shard "${excerpt(text, 40)}" must be k/n, two whole numbers such as 2/8 (the k-th of n shares of the work)`);
  const k = Number(m[1]);
  const n = Number(m[2]);
  if (n < 1 || n > MAX_SHARDS) throw new InputError(`--shard "${excerpt(text, 40)}": n must be between 1 and ${MAX_SHARDS}`);
  if (k < 1 || k > n) throw new InputError(`--shard "${excerpt(text, 40)}": k must be between 1 and n = ${n} (shards are numbered from 1, as SLURM_ARRAY_TASK_ID with --array=1-${n})`);
  return { index: k, count: n };
}

/** The items (0-based indices out of `total`) that shard k of n does: j with j mod n = k - 1. */
export function shardItems(total: number, shard: Shard): number[] {
  const out: number[] = [];
  for (let j = shard.index - 1; j < total; j += shard.count) out.push(j);
  return out;
}

export function sha256(bytes: Uint8Array | string): string {
  return createHash('sha256').update(bytes).digest('hex');
}

/** An input file of the run: the path as the user gave it and the hash of its bytes. */
export interface ShardInput {
  readonly path: string;
  readonly sha256: string;
}

export interface ShardItem {
  /** Index of the candidate (identify) or condition (render). */
  readonly index: number;
  readonly label: string;
  /** Byte ranges in shard.bin and the element type of each array. */
  readonly arrays: readonly { readonly offset: number; readonly length: number; readonly type: 'float64' | 'float32' | 'uint8' }[];
  /** Numbers that belong to the item (render: background, slices). */
  readonly extra?: Record<string, unknown>;
}

export interface ShardManifest {
  readonly format: string;
  readonly kind: 'identify' | 'render';
  readonly shard: Shard;
  readonly fingerprint: string;
  /** Working folder of the shard's run: relative input paths are read from it at merge. */
  readonly cwd: string;
  readonly scenario: ShardInput;
  /** identify: the --micrograph arguments, in order. */
  readonly micrographs: readonly (ShardInput & { readonly conditionId: string })[];
  /** The options that shape the result, as the command received them. */
  readonly options: Record<string, unknown>;
  /** Number of items of the whole run (candidates or conditions). */
  readonly total: number;
  readonly items: readonly ShardItem[];
  readonly dataBytes: number;
  readonly dataSha256: string;
  readonly seconds: number;
}

/**
 * Writes a shard (its data and its manifest, completed here with the format, the fingerprint of its inputs and
 * options, the working folder and the data's size and hash) into its output set and commits the set.
 */
export function commitShard(
  set: OutputSet,
  part: Omit<ShardManifest, 'format' | 'fingerprint' | 'cwd' | 'dataBytes' | 'dataSha256'>,
  data: Uint8Array,
): ShardManifest {
  const manifest: ShardManifest = {
    format: SHARD_FORMAT,
    ...part,
    fingerprint: fingerprint(part.kind, part.scenario, part.micrographs, part.options),
    cwd: process.cwd(),
    dataBytes: data.length,
    dataSha256: sha256(data),
  };
  set.write(SHARD_DATA, data);
  set.write(SHARD_MANIFEST, `${jsonText(manifest, 2)}\n`);
  set.commit();
  return manifest;
}

/**
 * The inputs' contents (not their paths: tasks may name the same files differently) and the options; merge
 * reads the inputs by the paths of the first shard.
 */
function fingerprint(kind: string, scenario: ShardInput, micrographs: ShardManifest['micrographs'], options: Record<string, unknown>): string {
  return sha256(
    JSON.stringify({ kind, version: PROGRAM_VERSION, scenario: scenario.sha256, micrographs: micrographs.map((m) => ({ conditionId: m.conditionId, sha256: m.sha256 })), options }),
  );
}

/** Packs typed arrays into one byte buffer (8-byte aligned) with their ranges. */
export class ShardData {
  private readonly parts: Uint8Array[] = [];
  private bytes = 0;

  add(a: Float64Array | Float32Array | Uint8Array): ShardItem['arrays'][number] {
    const type = a instanceof Float64Array ? 'float64' : a instanceof Float32Array ? 'float32' : 'uint8';
    const offset = this.bytes;
    const view = new Uint8Array(a.buffer, a.byteOffset, a.byteLength);
    this.parts.push(view);
    this.bytes += view.length;
    const pad = (8 - (this.bytes % 8)) % 8;
    if (pad > 0) {
      this.parts.push(new Uint8Array(pad));
      this.bytes += pad;
    }
    return { offset, length: a.length, type };
  }

  toBytes(): Uint8Array {
    return Buffer.concat(this.parts, this.bytes);
  }
}

/** Little-endian machines only write and read shard.bin as raw typed arrays (Node on x86-64 and arm64). */
export function readArray(data: Buffer, r: ShardItem['arrays'][number], where: string): Float64Array | Float32Array | Uint8Array {
  const size = r.type === 'float64' ? 8 : r.type === 'float32' ? 4 : 1;
  if (!Number.isInteger(r.offset) || !Number.isInteger(r.length) || r.offset < 0 || r.length < 0 || r.offset + r.length * size > data.length) {
    throw new InputError(`${where}: an array lies outside ${SHARD_DATA}; the shard is damaged, run that shard again`);
  }
  const copy = new Uint8Array(r.length * size);
  copy.set(data.subarray(r.offset, r.offset + copy.length));
  return r.type === 'float64' ? new Float64Array(copy.buffer) : r.type === 'float32' ? new Float32Array(copy.buffer) : copy;
}

export interface LoadedShard {
  readonly dir: string;
  readonly manifest: ShardManifest;
  readonly data: Buffer;
}

function readManifest(dir: string): ShardManifest {
  const file = join(dir, SHARD_MANIFEST);
  const bytes = readInputFile(file, 'shard manifest', MAX_MANIFEST_BYTES, ` (is "${excerpt(dir, 80)}" the output folder of a run with --shard?)`);
  let m: unknown;
  try {
    m = JSON.parse(bytes.toString('utf8'));
  } catch {
    throw new InputError(`${excerpt(file, 80)} is not valid JSON; the shard is damaged, run that shard again`);
  }
  const o = m as Partial<ShardManifest> | null;
  if (typeof o !== 'object' || o === null || o.format !== SHARD_FORMAT || (o.kind !== 'identify' && o.kind !== 'render') || typeof o.fingerprint !== 'string' || !Array.isArray(o.items)) {
    throw new InputError(`${excerpt(file, 80)} is not a shard of this version of thinfoil (format "${SHARD_FORMAT}"); run the shards again with this version`);
  }
  return o as ShardManifest;
}

/**
 * Reads the shard folders, checks that they are the n shards of one run
 * (same kind, fingerprint and n; every k from 1 to n exactly once) and that
 * their data are intact; returns them ordered by k.
 */
export function readShards(dirs: readonly string[]): LoadedShard[] {
  if (dirs.length === 0) throw new InputError('merge needs the output folders of the shards; give them all, e.g. thinfoil merge out/shard-*');
  const shards = dirs.map((dir) => ({ dir, manifest: readManifest(dir) }));
  const first = shards[0];
  const n = first.manifest.shard.count;
  for (const s of shards) {
    const m = s.manifest;
    if (m.kind !== first.manifest.kind) {
      throw new InputError(`shard "${excerpt(s.dir, 60)}" comes from ${m.kind} and "${excerpt(first.dir, 60)}" from ${first.manifest.kind}; merge the shards of one run only`);
    }
    if (m.fingerprint !== first.manifest.fingerprint || m.shard.count !== n) {
      throw new InputError(
        `shard "${excerpt(s.dir, 60)}" was made from other inputs or options than "${excerpt(first.dir, 60)}" (fingerprints ${m.fingerprint.slice(0, 12)} and ${first.manifest.fingerprint.slice(0, 12)}); merge the shards of one run only, each run with the same scenario, micrographs and options`,
      );
    }
  }
  const byIndex = new Map<number, string>();
  for (const s of shards) {
    const k = s.manifest.shard.index;
    const seen = byIndex.get(k);
    if (seen !== undefined) throw new InputError(`shard ${k}/${n} is given twice ("${excerpt(seen, 60)}" and "${excerpt(s.dir, 60)}"); give each shard's folder once`);
    byIndex.set(k, s.dir);
  }
  const missing: number[] = [];
  for (let k = 1; k <= n; k++) if (!byIndex.has(k)) missing.push(k);
  if (missing.length > 0) {
    const list = missing.length > 8 ? `${missing.slice(0, 8).join(', ')} and ${missing.length - 8} more` : missing.join(', ');
    throw new InputError(`shard${missing.length > 1 ? 's' : ''} ${list} of ${n} ${missing.length > 1 ? 'are' : 'is'} missing; run ${missing.length > 1 ? 'them' : 'it'} (--shard k/${n}) and give every shard's folder to merge`);
  }
  return shards
    .sort((a, b) => a.manifest.shard.index - b.manifest.shard.index)
    .map((s) => {
      const file = join(s.dir, SHARD_DATA);
      const data = readInputFile(file, 'shard data', MAX_SHARD_DATA_BYTES);
      if (data.length !== s.manifest.dataBytes || sha256(data) !== s.manifest.dataSha256) {
        throw new InputError(`${excerpt(file, 80)} does not match its ${SHARD_MANIFEST} (size or hash); the shard is damaged or was overwritten, run shard ${s.manifest.shard.index}/${n} again`);
      }
      return { ...s, data };
    });
}

/**
 * Reads an input file named in a shard (relative to the shard run's folder)
 * and checks that it still holds the bytes the shards were made from.
 */
export function readRecordedInput(cwd: string, input: ShardInput, what: string, maxBytes: number): Buffer {
  const bytes = readInputFile(resolve(cwd, input.path), what, maxBytes);
  if (sha256(bytes) !== input.sha256) {
    throw new InputError(`${what} "${excerpt(input.path, 80)}" has changed since the shards were made; restore it or run the shards again`);
  }
  return bytes;
}

/** What a shard run prints: its share of the work and where it went. */
export function printShard(dir: string, m: ShardManifest, json: boolean): void {
  const what = m.kind === 'identify' ? 'candidates' : 'conditions';
  if (json) {
    printJson({ shard: `${m.shard.index}/${m.shard.count}`, kind: m.kind, [what]: m.items.map((it) => it.label), of: m.total, fingerprint: m.fingerprint, dir, seconds: m.seconds });
    return;
  }
  process.stdout.write(
    `shard ${m.shard.index}/${m.shard.count} of ${m.kind}: ${m.items.length} of ${m.total} ${what}${m.items.length ? ` (${m.items.map((it) => it.label).join(', ')})` : ''}, ${sig(m.seconds, 3)} s; written to ${resolve(dir)} (${SHARD_MANIFEST}, ${SHARD_DATA}); when all ${m.shard.count} are done: thinfoil merge <the ${m.shard.count} folders>\n`,
  );
}

