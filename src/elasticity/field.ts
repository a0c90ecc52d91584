/**
 * The displacement field of a defect: R(r) and its gradient dR_i/dx_j, both in
 * the crystal's Cartesian frame (nm). Linear elasticity, so the fields of
 * several defects add (`superpose`).
 */

export interface DisplacementField {
  /** R at (x, y, z) (nm, Cartesian crystal frame) into out[0..2]. */
  displacement(out: Float64Array, x: number, y: number, z: number): void;
  /** Gradient dR_i/dx_j into out[3*i + j] (dimensionless). */
  gradient(out: Float64Array, x: number, y: number, z: number): void;
  /**
   * The scalar g . (grad R) . k for fixed vectors g and k, as a fast function
   * of position: beta' = d(g.R)/dz along a column of direction k. Equal to
   * sum_ij g_i (dR_i/dx_j) k_j computed from `gradient`.
   */
  directional(g: readonly [number, number, number], k: readonly [number, number, number]): (x: number, y: number, z: number) => number;
  /**
   * The same scalar as a probe that allocates nothing per call (the renderer's hot path): it reads the
   * point from p[0..2] and writes g . (grad R) . k into p[3]. A double passed to or returned from a call
   * that V8 does not inline is boxed (a heap allocation per call); through the array none is. Optional:
   * `directionalProbe` wraps `directional` for a field without it.
   */
  directionalAt?(g: readonly [number, number, number], k: readonly [number, number, number]): DirectionalProbe;
  /** `gradient` at the point p[0..2] (nothing boxed per call; optional, see `gradientProbe`). */
  gradientAt?(out: Float64Array, p: Float64Array): void;
}

/** The field's gradient with the point in an array: its own `gradientAt`, or `gradient` wrapped (which may box per call). */
export function gradientProbe(field: DisplacementField): (out: Float64Array, p: Float64Array) => void {
  if (field.gradientAt !== undefined) return field.gradientAt;
  return (out, p) => field.gradient(out, p[0], p[1], p[2]);
}

/** Reads a point from p[0..2] (nm), writes a scalar of the field there into p[3]. */
export type DirectionalProbe = (p: Float64Array) => void;

/** The field's directional probe: its own `directionalAt`, or `directional` wrapped (which may box per call). */
export function directionalProbe(field: DisplacementField, g: readonly [number, number, number], k: readonly [number, number, number]): DirectionalProbe {
  if (field.directionalAt !== undefined) return field.directionalAt(g, k);
  const f = field.directional(g, k);
  return (p) => {
    p[3] = f(p[0], p[1], p[2]);
  };
}

/** The parts of a field written in the array forms (`gradient` may be given instead of `gradientAt`). */
export type ArrayFormField = Omit<DisplacementField, 'directional' | 'directionalAt' | 'gradient'> & {
  readonly directionalAt: NonNullable<DisplacementField['directionalAt']>;
  readonly gradient?: DisplacementField['gradient'];
};

/**
 * A field whose `directional` (and `gradient`, when only `gradientAt` is given) are its array forms behind
 * scalar functions (the same numbers).
 */
export function withDirectional(field: ArrayFormField): DisplacementField {
  const gradientAt = field.gradientAt;
  const q = new Float64Array(3);
  const gradient: DisplacementField['gradient'] =
    field.gradient ??
    ((out, x, y, z) => {
      q[0] = x;
      q[1] = y;
      q[2] = z;
      gradientAt!(out, q);
    });
  if (field.gradient === undefined && gradientAt === undefined) throw new Error('withDirectional: give gradient or gradientAt');
  return {
    ...field,
    gradient,
    directional(g, k) {
      const probe = field.directionalAt(g, k);
      const p = new Float64Array(4);
      return (x, y, z) => {
        p[0] = x;
        p[1] = y;
        p[2] = z;
        probe(p);
        return p[3];
      };
    },
  };
}

/**
 * The sum of several fields (displacements and gradients add in linear
 * elasticity). Scratch arrays are allocated once here, so the returned field
 * is not re-entrant: use one instance per thread (each worker builds its own).
 */
export function superpose(fields: readonly DisplacementField[]): DisplacementField {
  const list = fields.slice();
  const n = list.length;
  const d = new Float64Array(3);
  const g = new Float64Array(9);
  const grads = list.map(gradientProbe);
  return withDirectional({
    displacement(out, x, y, z) {
      out[0] = 0;
      out[1] = 0;
      out[2] = 0;
      for (let k = 0; k < n; k++) {
        list[k].displacement(d, x, y, z);
        out[0] += d[0];
        out[1] += d[1];
        out[2] += d[2];
      }
    },
    gradientAt(out, p) {
      for (let i = 0; i < 9; i++) out[i] = 0;
      for (let k = 0; k < n; k++) {
        grads[k](g, p);
        for (let i = 0; i < 9; i++) out[i] += g[i];
      }
    },
    directionalAt(gv, kv) {
      const fs = list.map((f) => directionalProbe(f, gv, kv));
      if (fs.length === 1) return fs[0];
      // the sum in a local (a double kept inside one function is never boxed); each field overwrites p[3]
      return (p) => {
        let s = 0;
        for (let i = 0; i < fs.length; i++) {
          fs[i](p);
          s += p[3];
        }
        p[3] = s;
      };
    },
  });
}
