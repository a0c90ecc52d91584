/**
 * Web Worker of the explorer page: the perfect-crystal bright and dark field
 * against w (rocking curve) of one condition of a scenario, at its thickness
 * and beams, with the CLI's own parser and renderer (bundled). Off the page's
 * thread because a many-beam curve takes a noticeable time.
 */
import { parseScenario } from '../src/scenario/parse.js';
import { resolveCondition, type ResolvedCondition } from '../src/imaging/resolveCondition.js';
import { background, renderJob } from '../src/imaging/renderScenario.js';

interface RockingRequest {
  readonly gen: number;
  readonly scenario: unknown;
  readonly cond: number;
  /** The curve runs over -wMax..wMax. */
  readonly wMax: number;
}

/** Points of the curve. */
export const ROCKING_POINTS = 161;

const scope = self as unknown as { onmessage: ((e: MessageEvent<RockingRequest>) => void) | null; postMessage(m: unknown, transfer: Transferable[]): void };

scope.onmessage = (e) => {
  const { gen, scenario, cond, wMax } = e.data;
  try {
    const sc = parseScenario(scenario);
    const c = resolveCondition(sc, sc.conditions[cond]);
    const perfect = { ...sc, defects: [] };
    const n = ROCKING_POINTS;
    const w = new Float64Array(n);
    const bf = new Float64Array(n);
    const df = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      w[i] = -wMax + (2 * wMax * i) / (n - 1);
      const ci: ResolvedCondition = { ...c, s_per_nm: w[i] / c.xi_nm, w: w[i] };
      const b = background(renderJob(perfect, ci));
      bf[i] = b.bf;
      df[i] = b.df;
    }
    scope.postMessage({ ok: true, gen, thickness_nm: sc.thickness_nm, w, bf, df }, [w.buffer, bf.buffer, df.buffer]);
  } catch (err) {
    scope.postMessage({ ok: false, gen, error: err instanceof Error ? err.message : String(err) }, []);
  }
};
