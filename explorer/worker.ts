/**
 * Web Worker of the explorer page: renders bands of rows of a RenderJob with
 * the same renderRows the command line uses (bundled for the browser).
 */
import { renderRows, type RenderJob } from '../src/imaging/renderRows.js';

interface BandRequest {
  readonly gen: number;
  readonly job: RenderJob;
  readonly row0: number;
  readonly row1: number;
}

const scope = self as unknown as { onmessage: ((e: MessageEvent<BandRequest>) => void) | null; postMessage(m: unknown, transfer: Transferable[]): void };

scope.onmessage = (e) => {
  const { gen, job, row0, row1 } = e.data;
  try {
    const n = (row1 - row0) * job.width;
    const bf = new Float32Array(n);
    const df = new Float32Array(n);
    renderRows(job, row0, row1, bf, df);
    scope.postMessage({ ok: true, gen, row0, row1, bf, df }, [bf.buffer, df.buffer]);
  } catch (err) {
    scope.postMessage({ ok: false, gen, row0, row1, error: err instanceof Error ? err.message : String(err) }, []);
  }
};
