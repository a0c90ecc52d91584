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
  // Every piece of work (a band of rows, a part of the classes, a whole small job) is a task in one queue that
  // the workers take from in turn, so renders requested at the same time (identification asks for many) share them.
  let workers: Worker[] | null = null;
  /** Seconds this pool spent rendering in the calling thread before its workers started. */
  let inThread_s = 0;
  const idle: Worker[] = [];
  const running = new Map<Worker, Task>();
  const queue: Task[] = [];
  const pump = () => {
    while (idle.length > 0 && queue.length > 0) {
      const w = idle.shift()!;
      const t = queue.shift()!;
      running.set(w, t);
      w.postMessage(t.request);
    }
  };
  const start = (f: string): void => {
    workers = Array.from({ length: threads }, () => new Worker(f, { resourceLimits: { maxYoungGenerationSizeMb: 64 } }));
    for (const w of workers) {
      w.on('message', (m: BandReply) => {
        const t = running.get(w);
        running.delete(w);
        idle.push(w);
        pump();
        t?.reply(m);
      });
      w.on('error', (e: Error) => {
        // a worker that failed outside a task's try (out of memory, a crash) is gone: its task fails, the others go on
        const t = running.get(w);
        running.delete(w);
        workers = workers?.filter((x) => x !== w) ?? null;
        const at = idle.indexOf(w);
        if (at >= 0) idle.splice(at, 1);
        t?.fail(e);
        if (workers !== null && workers.length === 0) for (const q of queue.splice(0)) q.fail(e);
      });
    }
    idle.push(...workers);
  };
  const submit = (request: unknown): Promise<BandReply> =>
    new Promise((resolve, reject) => {
      queue.push({
        request,
        reply: (m) => (m.ok ? resolve(m) : reject(m.userError ? new InputError(m.error ?? 'bad input') : new Error(m.error))),
        fail: reject,
      });
      pump();
    });
  return {
    threads,
    async render(job, onProgress) {
      const plan = translationPlan(job);
      const work = plan === null ? Infinity : sharedWork(job, plan);
      // small shared-column jobs are done here while no worker runs (cheaper than starting and warming them up),
      // until this pool has spent about what the workers' start-up costs on them: then the workers start (a
      // long-lived pool, as in explore or identify, pays the start-up once and renders on every core after it)
      if (work < IN_THREAD_WORK && workers === null && inThread_s < START_WORKERS_AFTER_S) {
        const t0 = performance.now();
        const img = renderHere(job, plan, onProgress);
        inThread_s += (performance.now() - t0) / 1000;
        return img;
      }
      if (workers === null) start(file);
      const n = job.width * job.height;
      // once workers run, a small job is one task, so that several requested together render side by side;
      // from SPLIT_WORK up it is cut into parts like a large one, so that one render alone uses every core
      if (work < SPLIT_WORK) {
        const m = await submit({ job, plan, part: 0, parts: 1 });
        onProgress?.(job.height, job.height);
        return { bf: m.bf, df: m.df, slices: m.slices };
      }
      const bf = new Float32Array(n);
      const df = new Float32Array(n);
      let done = 0;
      let slices = 0;
      const tasks: Promise<void>[] = [];
      if (plan !== null) {
        // translation method: parts of the classes of pixels, full-size images holding 0 outside their part
        const parts = Math.min(threads * 4, plan.starts.length);
        for (let part = 0; part < parts; part++) {
          tasks.push(
            submit({ job, plan, part, parts }).then((m) => {
              for (let k = 0; k < n; k++) {
                bf[k] += m.bf[k];
                df[k] += m.df[k];
              }
              done++;
              slices += m.slices;
              onProgress?.(Math.round((done / parts) * job.height), job.height);
            }),
          );
        }
      } else {
        // bands of rows, small enough that fast and slow bands balance
        const bandRows = Math.max(1, Math.floor(job.height / (threads * 8)));
        for (let row0 = 0; row0 < job.height; row0 += bandRows) {
          const row1 = Math.min(job.height, row0 + bandRows);
          tasks.push(
            submit({ job, row0, row1 }).then((m) => {
              bf.set(m.bf, m.row0 * job.width);
              df.set(m.df, m.row0 * job.width);
              done += m.row1 - m.row0;
              slices += m.slices;
              onProgress?.(done, job.height);
            }),
          );
        }
      }
      await Promise.all(tasks);
      return { bf, df, slices };
    },
    async close() {
      const ws = workers;
      workers = null;
      idle.length = 0;
      running.clear();
      for (const q of queue.splice(0)) q.fail(new Error('the render pool was closed'));
      if (ws !== null) await Promise.all(ws.map((w) => w.terminate()));
    },
  };
}

/** One piece of work for a worker and what to do with its reply. */
interface Task {
  readonly request: unknown;
  reply(m: BandReply): void;
  fail(e: Error): void;
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

/** Shared-column jobs below this work (see sharedWork) are rendered in the calling thread while no worker runs. */
const IN_THREAD_WORK = 4e5;
/**
 * In-thread rendering time after which the pool starts its workers anyway (about one worker's start-up and
 * JIT warm-up, bench/table.mjs: "process" against "1 thread"); so no process loses more than about that.
 */
const START_WORKERS_AFTER_S = 1;
/**
 * With workers running, shared-column jobs from this work up are cut into parts (one inclined line in a 100 nm
 * foil: 256 x 256 pixels of 0.5 nm about 1.2e5, 128 x 128 of 1 nm 5.8e4, identification's views of 64 x 64
 * about 2e4, which stay one task each: many of them are asked for together).
 */
export const SPLIT_WORK = 1e5;

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
