/**
 * Renders images on all cores: the rows are cut into bands, handed out to
 * worker threads one band at a time (so fast and slow bands balance), and
 * written into the final image. When running from TypeScript sources (tests)
 * the work is done in this thread instead.
 */
import { Worker } from 'node:worker_threads';
import { availableParallelism } from 'node:os';
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { renderRows, type RenderJob } from './renderRows.js';
import { renderTranslated, translationPlan, type TranslationPlan } from './translationColumns.js';
import { InputError } from '../errors.js';

export interface RenderedImage {
  readonly bf: Float32Array;
  readonly df: Float32Array;
  /** Total number of slab slices used (all columns). */
  readonly slices: number;
}

export type Progress = (doneRows: number, totalRows: number) => void;

export interface RenderPool {
  render(job: RenderJob, onProgress?: Progress): Promise<RenderedImage>;
  close(): Promise<void>;
  readonly threads: number;
}

interface BandReply {
  ok: boolean;
  error?: string;
  /** The worker's failure was an InputError (a user mistake): re-raise it as one. */
  userError?: boolean;
  row0: number;
  row1: number;
  /** Translation method: the part rendered (full-size images, zero outside its classes). */
  part?: number;
  bf: Float32Array;
  df: Float32Array;
  slices: number;
}

function workerFile(): string | null {
  const url = new URL('./renderWorker.js', import.meta.url);
  const path = fileURLToPath(url);
  return import.meta.url.endsWith('.js') && existsSync(path) ? path : null;
}

export function createRenderPool(threads = availableParallelism()): RenderPool {
  const file = workerFile();
  if (file === null || threads <= 1) return inThreadPool();
  // Workers start on the first job that needs them (a worker costs a start-up and its own JIT warm-up).
  // A larger young generation: the first bands run unoptimised code that boxes doubles, and scavenges are then frequent.
  let started: Worker[] | null = null;
  return {
    threads,
    async render(job, onProgress) {
      const plan = translationPlan(job);
      // small shared-column jobs are done here: cheaper than starting and warming up workers
      if (plan !== null && sharedWork(job, plan) < IN_THREAD_WORK) return renderHere(job, plan, onProgress);
      started ??= Array.from({ length: threads }, () => new Worker(file, { resourceLimits: { maxYoungGenerationSizeMb: 64 } }));
      const workers = started;
      const n = job.width * job.height;
      const bf = new Float32Array(n);
      const df = new Float32Array(n);
      // translation method: parts of the classes of pixels; otherwise bands of rows
      const parts = plan === null ? 0 : Math.min(threads * 4, plan.starts.length);
      const bandRows = Math.max(1, Math.floor(job.height / (threads * 8)));
      let next = 0;
      let nextPart = 0;
      let done = 0;
      let slices = 0;
      await Promise.all(
        workers.map(
          (w) =>
            new Promise<void>((resolve, reject) => {
              const ask = () => {
                if (plan !== null) {
                  if (nextPart >= parts) {
                    w.off('message', onMessage);
                    w.off('error', onError);
                    resolve();
                    return;
                  }
                  w.postMessage({ job, plan, part: nextPart++, parts });
                  return;
                }
                if (next >= job.height) {
                  w.off('message', onMessage);
                  w.off('error', onError);
                  resolve();
                  return;
                }
                const row0 = next;
                const row1 = Math.min(job.height, next + bandRows);
                next = row1;
                w.postMessage({ job, row0, row1 });
              };
              const onMessage = (m: BandReply) => {
                if (!m.ok) {
                  w.off('message', onMessage);
                  w.off('error', onError);
                  reject(m.userError ? new InputError(m.error ?? 'bad input') : new Error(m.error));
                  return;
                }
                if (m.part !== undefined) {
                  // full-size part: every pixel belongs to exactly one part, the others hold 0
                  for (let k = 0; k < n; k++) {
                    bf[k] += m.bf[k];
                    df[k] += m.df[k];
                  }
                  done++;
                  onProgress?.(Math.round((done / parts) * job.height), job.height);
                } else {
                  bf.set(m.bf, m.row0 * job.width);
                  df.set(m.df, m.row0 * job.width);
                  done += m.row1 - m.row0;
                  onProgress?.(done, job.height);
                }
                slices += m.slices;
                ask();
              };
              const onError = (e: Error) => reject(e);
              w.on('message', onMessage);
              w.on('error', onError);
              ask();
            }),
        ),
      );
      return { bf, df, slices };
    },
    async close() {
      if (started !== null) await Promise.all(started.map((w) => w.terminate()));
      started = null;
    },
  };
}

/**
 * Work of a shared-column job in nm of long column times N^2 for N beams (two beams: 1). Measured
 * (bench/table.mjs): a 256 x 256 two-beam image of one inclined dislocation is about 1.2e5 nm and
 * 0.17 CPU s, while two workers add about 1 CPU s of start-up and warm-up per process.
 */
function sharedWork(job: RenderJob, plan: TranslationPlan): number {
  const nb = job.manyBeam?.input.excitationErrors_per_nm.length ?? 1;
  return plan.pathLength_nm * nb * nb;
}

/** Shared-column jobs below this work (see sharedWork) are rendered in the calling thread. */
const IN_THREAD_WORK = 4e5;

/** The whole job in the calling thread, with its translation plan (null: column by column). */
function renderHere(job: RenderJob, plan: TranslationPlan | null, onProgress?: Progress): RenderedImage {
  const n = job.width * job.height;
  const bf = new Float32Array(n);
  const df = new Float32Array(n);
  const stats = plan === null ? renderRows(job, 0, job.height, bf, df) : renderTranslated(job, plan, 0, 1, bf, df);
  onProgress?.(job.height, job.height);
  return { bf, df, slices: stats.slices };
}

function inThreadPool(): RenderPool {
  return {
    threads: 1,
    async render(job, onProgress) {
      return renderHere(job, translationPlan(job), onProgress);
    },
    async close() {},
  };
}
