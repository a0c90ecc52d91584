/**
 * A renderer that remembers its results: a render is a pure function of the
 * scenario it is given (one condition, one view; the tolerance is fixed by
 * the renderer), so a second request for the same scenario returns the first
 * result instead of integrating every column again. The key is the whole
 * scenario as JSON, so a hit means the input was identical to the last digit.
 *
 * Identification asks for the same picture more than once: a candidate at
 * the stated parameters is rendered for the ranking, again as the "other
 * candidate at the best one's values" of the spread when the best kept its
 * stated values, and again for the registration-limit check. Requests made
 * while the first is still rendering share its promise.
 *
 * The least recently used results are dropped once the cached images exceed
 * maxBytes. Results are shared: callers must not write into them
 * (simulateView only reads).
 */
import type { Scenario } from '../scenario/types.js';
import type { ConditionImages } from '../imaging/renderScenario.js';
import type { Renderer } from './simulateView.js';

/** Default memory bound of a cache (bytes of image data). */
export const DEFAULT_CACHE_BYTES = 128 * 1024 * 1024;

export interface CachedRenderer extends Renderer {
  /** Requests answered from the cache and requests rendered. */
  readonly stats: { hits: number; misses: number };
}

export function cachedRenderer(render: Renderer, maxBytes = DEFAULT_CACHE_BYTES): CachedRenderer {
  // a Map keeps insertion order: re-inserting on a hit makes its first key the least recently used
  const entries = new Map<string, { result: Promise<readonly ConditionImages[]>; bytes: number }>();
  let bytes = 0;
  const stats = { hits: 0, misses: 0 };
  const cached = (sc: Scenario): Promise<readonly ConditionImages[]> => {
    const key = JSON.stringify(sc);
    const hit = entries.get(key);
    if (hit !== undefined) {
      stats.hits++;
      entries.delete(key);
      entries.set(key, hit);
      return hit.result;
    }
    stats.misses++;
    const entry = { result: render(sc), bytes: 0 };
    entries.set(key, entry);
    entry.result.then(
      (imgs) => {
        if (entries.get(key) !== entry) return;
        entry.bytes = imgs.reduce((a, c) => a + c.bf.byteLength + c.df.byteLength + c.coreMask.byteLength, 0);
        bytes += entry.bytes;
        for (const [k, e] of entries) {
          if (bytes <= maxBytes) break;
          entries.delete(k);
          bytes -= e.bytes;
        }
      },
      // a failed render is not remembered (the caller sees the error)
      () => {
        if (entries.get(key) === entry) entries.delete(key);
      },
    );
    return entry.result;
  };
  return Object.assign(cached, { stats });
}
