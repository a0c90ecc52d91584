/**
 * The plate twist of a screw dislocation normal to the foil surfaces (Eshelby & Stroh 1951; see
 * surfaceRelaxation.ts): the image series of g = u_theta / r and two derivatives, unscaled
 * (multiply by -B / 2 pi),
 *   g(r, z) = sum_m (-1)^m [h((m+1) t - z) - h(z + m t)],  h(a) = 1/(sqrt(r^2 + a^2) + a),
 *   gr = (dg/dr)/r,  gz = dg/dz,
 * summed directly (`plateTwistSeries`) or, on the renderer's hot path, as the two m = 0 terms in
 * closed form plus the rest (m >= 1) interpolated from a table (`plateTwistTabulated`). The rest is
 * smooth in the foil: its nearest singularities (r = 0 at z = -t and z = 2 t) lie a thickness outside.
 * In units of t it depends on r/t and z/t only, so one table serves every foil.
 */

/** Partial sums averaged (Euler's transformation of an alternating series: repeated averaging). */
const K = 8;

/**
 * The direct series at r^2 = r2 (clamped by the caller away from 0 where the line meets a surface) and
 * depth Z in a plate of thickness t: (g, gr, gz) into s[0..2]. `ps` is scratch of 3 K numbers.
 * from = 1 leaves out the two m = 0 terms (the same partial sums less that constant, averaged alike).
 */
export function plateTwistSeries(r2: number, Z: number, t: number, s: Float64Array, ps: Float64Array, from = 0): void {
  const r = Math.sqrt(r2);
  // terms fall off like 1/m^2 once m t exceeds r; enough of them for the averaging to converge
  const M = K + 8 + Math.ceil((2 * r) / t);
  let g = 0, gr = 0, gz = 0;
  let sign = from % 2 === 0 ? 1 : -1;
  for (let m = from; m < M; m++) {
    const a1 = (m + 1) * t - Z;
    const a2 = Z + m * t;
    const q1 = Math.sqrt(r2 + a1 * a1);
    const q2 = Math.sqrt(r2 + a2 * a2);
    const h1 = 1 / (q1 + a1);
    const h2 = 1 / (q2 + a2);
    g += sign * (h1 - h2);
    // dh/dr / r = -h^2/q; dh/da = -h/q; dz a1 = -1, dz a2 = +1
    gr += sign * (-(h1 * h1) / q1 + (h2 * h2) / q2);
    gz += sign * (h1 / q1 + h2 / q2);
    sign = -sign;
    const j = m - (M - K);
    if (j >= 0) {
      ps[j] = g;
      ps[K + j] = gr;
      ps[2 * K + j] = gz;
    }
  }
  for (let q = 0; q < 3; q++) {
    const o = q * K;
    for (let level = K - 1; level > 0; level--) for (let j = 0; j < level; j++) ps[o + j] = 0.5 * (ps[o + j] + ps[o + j + 1]);
    s[q] = ps[o];
  }
}

/** Scratch for plateTwistSeries. */
export function plateTwistScratch(): Float64Array {
  return new Float64Array(3 * K);
}

/** The two m = 0 terms, (g, gr, gz) added into s[0..2] (the singular part). */
function firstTerms(r2: number, Z: number, t: number, s: Float64Array): void {
  const a1 = t - Z;
  const a2 = Z;
  const q1 = Math.sqrt(r2 + a1 * a1);
  const q2 = Math.sqrt(r2 + a2 * a2);
  // h = 1/(q + a) and 1/q from one division each: d = 1/(q (q + a)), h = q d, 1/q = (q + a) d
  const p1 = q1 + a1;
  const p2 = q2 + a2;
  const d1 = 1 / (q1 * p1);
  const d2 = 1 / (q2 * p2);
  const h1 = q1 * d1, i1 = p1 * d1;
  const h2 = q2 * d2, i2 = p2 * d2;
  s[0] += h1 - h2;
  s[1] += -(h1 * h1) * i1 + h2 * h2 * i2;
  s[2] += h1 * i1 + h2 * i2;
}

// The table of the rest (m >= 1), t = 1: nodes uniform in v = r/(r + t) on [0, 1] (v = 1 is r = infinity,
// where the rest is 0 with zero slope) and in z/t on [0, 1]; one padding node on each side
// (v: mirrored at 0, since the rest is even in r, and at 1; z: the series itself, smooth there).
const NV = 257;
const NZ = 129;
const W = NZ + 2;
let table: Float64Array | null = null;

function restTable(): Float64Array {
  if (table !== null) return table;
  const T = new Float64Array((NV + 2) * W * 3);
  const s = new Float64Array(3);
  const ps = plateTwistScratch();
  for (let i = -1; i <= NV; i++) {
    const vi = Math.abs(i) / (NV - 1);
    const v = vi > 1 ? 2 - vi : vi; // mirrored at v = 1
    for (let j = -1; j <= NZ; j++) {
      const o = ((i + 1) * W + (j + 1)) * 3;
      if (v >= 1) continue; // r = infinity: 0
      const r = v / (1 - v);
      plateTwistSeries(r * r, j / (NZ - 1), 1, s, ps, 1);
      T[o] = s[0];
      T[o + 1] = s[1];
      T[o + 2] = s[2];
    }
  }
  table = T;
  return T;
}

/**
 * (g, gr, gz) into s[0..2] like plateTwistSeries (same r2 and Z), the part beyond the first two
 * terms interpolated (bicubic Catmull-Rom) from the table. Differs from the series by the
 * interpolation error (test/elasticity/surfaceRelaxation.test.ts measures it).
 */
export function plateTwistTabulated(r2: number, Z: number, t: number, s: Float64Array): void {
  const T = table ?? restTable();
  const r = Math.sqrt(r2);
  // r/(r + t) and 1/t from one division
  const d = 1 / (t * (r + t));
  const it = (r + t) * d;
  const fv = r * t * d * (NV - 1);
  let zt = Z * it;
  if (zt < 0) zt = 0;
  else if (zt > 1) zt = 1;
  const fz = zt * (NZ - 1);
  // both fractions are >= 0: truncation is the floor, in int32
  let i = fv | 0;
  if (i > NV - 2) i = NV - 2;
  let j = fz | 0;
  if (j > NZ - 2) j = NZ - 2;
  const f = fv - i, g = fz - j;
  const f2 = f * f, f3 = f2 * f, g2 = g * g, g3 = g2 * g;
  const wa0 = 0.5 * (-f3 + 2 * f2 - f), wa1 = 0.5 * (3 * f3 - 5 * f2 + 2), wa2 = 0.5 * (-3 * f3 + 4 * f2 + f), wa3 = 0.5 * (f3 - f2);
  const wb0 = 0.5 * (-g3 + 2 * g2 - g), wb1 = 0.5 * (3 * g3 - 5 * g2 + 2), wb2 = 0.5 * (-3 * g3 + 4 * g2 + g), wb3 = 0.5 * (g3 - g2);
  let a = 0, b = 0, c = 0;
  // padded row i is node i - 1: the stencil i - 1 .. i + 2 starts at padded row i (likewise in z)
  for (let p = 0; p < 4; p++) {
    const wp = p === 0 ? wa0 : p === 1 ? wa1 : p === 2 ? wa2 : wa3;
    const o = ((i + p) * W + j) * 3;
    a += wp * (wb0 * T[o] + wb1 * T[o + 3] + wb2 * T[o + 6] + wb3 * T[o + 9]);
    b += wp * (wb0 * T[o + 1] + wb1 * T[o + 4] + wb2 * T[o + 7] + wb3 * T[o + 10]);
    c += wp * (wb0 * T[o + 2] + wb1 * T[o + 5] + wb2 * T[o + 8] + wb3 * T[o + 11]);
  }
  // the table is for t = 1: g ~ 1/length, gr ~ 1/length^3, gz ~ 1/length^2
  s[0] = a * it;
  s[1] = b * it * it * it;
  s[2] = c * it * it;
  firstTerms(r2, Z, t, s);
}
