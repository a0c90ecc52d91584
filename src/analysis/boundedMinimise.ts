/**
 * Minimisation within bounds, for the nuisance parameters of identification
 * (a few parameters, each evaluation a set of renders, so the methods count
 * evaluations rather than iterations):
 *
 *  - goldenSection: one parameter in [lo, hi], golden-section search
 *    (Kiefer 1953, "Sequential minimax search for a maximum"; Press et al.,
 *    Numerical Recipes 3rd ed. 2007, section 10.2). Returns the best point
 *    evaluated, including the end of [lo, hi] that the final bracket still
 *    touches (one of the maxEvaluations is kept for it).
 *  - nelderMead: several parameters in a box, the downhill simplex of
 *    Nelder & Mead 1965 (Computer Journal 7, 308) with the standard
 *    coefficients (reflection 1, expansion 2, contraction 1/2, shrink 1/2;
 *    Lagarias et al. 1998, SIAM J. Optim. 9, 112). Points outside the box are
 *    projected onto it (clamped) before evaluation, so every evaluated point
 *    is feasible.
 *
 * Both are pure: f is called only with in-range arguments. f may return a
 * promise (a render); the search awaits each evaluation in turn.
 */

export interface Minimum {
  readonly x: readonly number[];
  readonly value: number;
  readonly evaluations: number;
}

const GOLD = (Math.sqrt(5) - 1) / 2;

/** Golden-section search of f on [lo, hi] until the bracket is below tol or maxEvaluations are spent. */
export async function goldenSection(f: (x: number) => number | Promise<number>, lo: number, hi: number, tol: number, maxEvaluations = 40): Promise<Minimum> {
  if (!(hi >= lo)) throw new RangeError(`goldenSection: need lo <= hi, got ${lo}, ${hi}`);
  let evaluations = 0;
  let bestX = lo;
  let bestV = Infinity;
  const ev = async (x: number) => {
    const v = await f(x);
    evaluations++;
    if (v < bestV) {
      bestV = v;
      bestX = x;
    }
    return v;
  };
  if (hi - lo <= tol) {
    await ev(0.5 * (lo + hi));
    return { x: [bestX], value: bestV, evaluations };
  }
  let a = lo;
  let b = hi;
  let c = b - GOLD * (b - a);
  let d = a + GOLD * (b - a);
  let fc = await ev(c);
  let fd = await ev(d);
  // While the bracket still touches an end of [lo, hi], one evaluation is kept
  // back for that end: interior points alone never come nearer to it than
  // GOLD^n of the range, so a minimum at the bound would otherwise be missed.
  const touches = () => a === lo || b === hi;
  while (b - a > tol && evaluations < maxEvaluations - (touches() ? 1 : 0)) {
    if (fc <= fd) {
      b = d;
      d = c;
      fd = fc;
      c = b - GOLD * (b - a);
      fc = await ev(c);
    } else {
      a = c;
      c = d;
      fc = fd;
      d = a + GOLD * (b - a);
      fd = await ev(d);
    }
  }
  if (a === lo && evaluations < maxEvaluations) await ev(lo);
  if (b === hi && evaluations < maxEvaluations) await ev(hi);
  return { x: [bestX], value: bestV, evaluations };
}

export interface NelderMeadOptions {
  /** Initial simplex step per coordinate (default 10 % of the box side). */
  readonly step?: readonly number[];
  readonly maxEvaluations?: number;
  /** Stop when the simplex's values differ by less than this (default 1e-10). */
  readonly fTol?: number;
  /** ... and its vertices by less than this fraction of the box side (default 1e-6). */
  readonly xTol?: number;
}

/** Nelder-Mead minimisation of f from x0 inside the box [lo, hi] (per coordinate). */
export async function nelderMead(f: (x: readonly number[]) => number | Promise<number>, x0: readonly number[], lo: readonly number[], hi: readonly number[], opts: NelderMeadOptions = {}): Promise<Minimum> {
  const n = x0.length;
  if (lo.length !== n || hi.length !== n) throw new RangeError('nelderMead: x0, lo and hi must have the same length');
  for (let i = 0; i < n; i++) if (!(hi[i] >= lo[i])) throw new RangeError(`nelderMead: need lo <= hi in coordinate ${i}`);
  const maxEv = opts.maxEvaluations ?? 200 * n;
  const fTol = opts.fTol ?? 1e-10;
  const xTol = opts.xTol ?? 1e-6;
  const clamp = (x: number[]) => x.map((v, i) => Math.min(hi[i], Math.max(lo[i], v)));
  let evaluations = 0;
  const ev = async (x: number[]) => {
    evaluations++;
    return f(x);
  };
  const p0 = clamp([...x0]);
  const pts: number[][] = [p0];
  for (let i = 0; i < n; i++) {
    const side = hi[i] - lo[i];
    let h = opts.step?.[i] ?? 0.1 * side;
    if (h === 0) h = 1e-3;
    const p = [...p0];
    // step inwards when the start sits on the upper bound
    p[i] = p0[i] + h <= hi[i] ? p0[i] + h : p0[i] - h;
    pts.push(clamp(p));
  }
  const vals: number[] = [];
  for (const p of pts) vals.push(await ev(p));
  const order = () => {
    const idx = pts.map((_, i) => i).sort((a, b) => vals[a] - vals[b]);
    const P = idx.map((i) => pts[i]);
    const V = idx.map((i) => vals[i]);
    for (let i = 0; i <= n; i++) {
      pts[i] = P[i];
      vals[i] = V[i];
    }
  };
  order();
  while (evaluations < maxEv) {
    const spreadF = vals[n] - vals[0];
    let spreadX = 0;
    for (let i = 1; i <= n; i++) for (let j = 0; j < n; j++) spreadX = Math.max(spreadX, Math.abs(pts[i][j] - pts[0][j]) / Math.max(1e-300, hi[j] - lo[j]));
    if (spreadF <= fTol && spreadX <= xTol) break;
    if (spreadX <= xTol * 1e-3) break;
    const c = new Array<number>(n).fill(0);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) c[j] += pts[i][j] / n;
    const along = (t: number) => clamp(c.map((v, j) => v + t * (pts[n][j] - v)));
    const xr = along(-1);
    const fr = await ev(xr);
    if (fr < vals[0]) {
      const xe = along(-2);
      const fe = await ev(xe);
      if (fe < fr) {
        pts[n] = xe;
        vals[n] = fe;
      } else {
        pts[n] = xr;
        vals[n] = fr;
      }
    } else if (fr < vals[n - 1]) {
      pts[n] = xr;
      vals[n] = fr;
    } else {
      const outside = fr < vals[n];
      const xc = along(outside ? -0.5 : 0.5);
      const fc = await ev(xc);
      if (fc < (outside ? fr : vals[n])) {
        pts[n] = xc;
        vals[n] = fc;
      } else {
        for (let i = 1; i <= n; i++) {
          pts[i] = clamp(pts[i].map((v, j) => pts[0][j] + 0.5 * (v - pts[0][j])));
          vals[i] = await ev(pts[i]);
        }
      }
    }
    order();
  }
  return { x: pts[0], value: vals[0], evaluations };
}
