/** Worker thread: renders bands of rows on request (see workerPool.ts). */
import { parentPort } from 'node:worker_threads';
import { renderRows, type RenderJob } from './renderRows.js';
import { InputError } from '../errors.js';
import { renderTranslated, type TranslationPlan } from './translationColumns.js';

interface BandRequest {
  readonly job: RenderJob;
  readonly row0: number;
  readonly row1: number;
}

/** Translation method: the classes c with c % parts === part, into full-size images. */
interface PartRequest {
  readonly job: RenderJob;
  readonly plan: TranslationPlan;
  readonly part: number;
  readonly parts: number;
}

parentPort?.on('message', (msg: BandRequest | PartRequest) => {
  try {
    if ('plan' in msg) {
      const n = msg.job.width * msg.job.height;
      const bf = new Float32Array(n);
      const df = new Float32Array(n);
      const stats = renderTranslated(msg.job, msg.plan, msg.part, msg.parts, bf, df);
      parentPort!.postMessage({ ok: true, row0: 0, row1: 0, part: msg.part, bf, df, slices: stats.slices }, [bf.buffer, df.buffer]);
      return;
    }
    const n = (msg.row1 - msg.row0) * msg.job.width;
    const bf = new Float32Array(n);
    const df = new Float32Array(n);
    const stats = renderRows(msg.job, msg.row0, msg.row1, bf, df);
    parentPort!.postMessage({ ok: true, row0: msg.row0, row1: msg.row1, bf, df, slices: stats.slices }, [bf.buffer, df.buffer]);
  } catch (e) {
    parentPort!.postMessage({ ok: false, error: e instanceof Error ? e.message : String(e), userError: e instanceof InputError });
  }
});
