/**
 * Choosing the conditions: the smallest set of two-beam conditions that tells
 * every candidate from every other (a test cover: every pair of candidates is
 * separated by at least one chosen condition), and the order of taking them
 * that needs the least tilting.
 *
 * greedyCover: repeatedly take the condition that separates the most pairs
 * not yet separated (ties: the lower cost, i.e. less tilting). exactCover:
 * all subsets of increasing size up to maxSize (for small problems and to
 * check the greedy choice).
 */

/** Index sets of the chosen conditions; `complete` false when some pair cannot be separated by any condition. */
export interface Cover {
  readonly chosen: number[];
  readonly complete: boolean;
  /** Pairs left unseparated (indices into the pair list). */
  readonly unseparated: number[];
}

/** separates[c][p] = 1 when condition c separates pair p; cost[c] breaks ties. */
export function greedyCover(separates: readonly Uint8Array[], cost: readonly number[]): Cover {
  const nPairs = separates.length === 0 ? 0 : separates[0].length;
  const done = new Uint8Array(nPairs);
  let left = nPairs;
  const chosen: number[] = [];
  while (left > 0) {
    let best = -1, bestGain = 0;
    for (let c = 0; c < separates.length; c++) {
      if (chosen.includes(c)) continue;
      let gain = 0;
      const s = separates[c];
      for (let p = 0; p < nPairs; p++) if (s[p] && !done[p]) gain++;
      if (gain > bestGain || (gain === bestGain && gain > 0 && cost[c] < cost[best])) {
        best = c;
        bestGain = gain;
      }
    }
    if (best < 0) break;
    chosen.push(best);
    const s = separates[best];
    for (let p = 0; p < nPairs; p++) if (s[p] && !done[p]) {
      done[p] = 1;
      left--;
    }
  }
  const unseparated: number[] = [];
  for (let p = 0; p < nPairs; p++) if (!done[p]) unseparated.push(p);
  return { chosen, complete: unseparated.length === 0, unseparated };
}

/** The smallest complete cover by exhaustive search over subsets of size 1..maxSize; undefined when none that small exists. */
export function exactCover(separates: readonly Uint8Array[], maxSize: number): number[] | undefined {
  const n = separates.length;
  const nPairs = n === 0 ? 0 : separates[0].length;
  if (nPairs === 0) return [];
  const idx: number[] = [];
  const covers = (): boolean => {
    for (let p = 0; p < nPairs; p++) {
      let ok = false;
      for (const c of idx) if (separates[c][p]) { ok = true; break; }
      if (!ok) return false;
    }
    return true;
  };
  const search = (start: number, k: number): boolean => {
    if (idx.length === k) return covers();
    for (let c = start; c < n; c++) {
      idx.push(c);
      if (search(c + 1, k)) return true;
      idx.pop();
    }
    return false;
  };
  for (let k = 1; k <= Math.min(maxSize, n); k++) {
    idx.length = 0;
    if (search(0, k)) return [...idx];
  }
  return undefined;
}

/**
 * Order of visiting the points (indices into `steps`) from `start` with the least total tilt,
 * dist(a, b) in degrees with a = -1 for the start. Exhaustive for up to 8 points, nearest neighbour beyond.
 */
export function leastTiltOrder(count: number, dist: (a: number, b: number) => number): number[] {
  const items = Array.from({ length: count }, (_, i) => i);
  if (count <= 8) {
    let best: number[] = items, bestCost = Infinity;
    const perm: number[] = [];
    const used = new Uint8Array(count);
    const walk = (cost: number) => {
      if (cost >= bestCost) return;
      if (perm.length === count) {
        bestCost = cost;
        best = [...perm];
        return;
      }
      const last = perm.length === 0 ? -1 : perm[perm.length - 1];
      for (let i = 0; i < count; i++) {
        if (used[i]) continue;
        used[i] = 1;
        perm.push(i);
        walk(cost + dist(last, i));
        perm.pop();
        used[i] = 0;
      }
    };
    walk(0);
    return best;
  }
  const order: number[] = [];
  const used = new Uint8Array(count);
  let last = -1;
  for (let k = 0; k < count; k++) {
    let bi = -1, bd = Infinity;
    for (let i = 0; i < count; i++) if (!used[i] && dist(last, i) < bd) { bd = dist(last, i); bi = i; }
    used[bi] = 1;
    order.push(bi);
    last = bi;
  }
  return order;
}
