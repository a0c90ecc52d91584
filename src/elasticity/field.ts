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
  return {
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
    gradient(out, x, y, z) {
      for (let i = 0; i < 9; i++) out[i] = 0;
      for (let k = 0; k < n; k++) {
        list[k].gradient(g, x, y, z);
        for (let i = 0; i < 9; i++) out[i] += g[i];
      }
    },
    directional(gv, kv) {
      const fs = list.map((f) => f.directional(gv, kv));
      if (fs.length === 1) return fs[0];
      if (fs.length === 2) {
        const [a, b] = fs;
        return (x, y, z) => a(x, y, z) + b(x, y, z);
      }
      return (x, y, z) => {
        let s = 0;
        for (let i = 0; i < fs.length; i++) s += fs[i](x, y, z);
        return s;
      };
    },
  };
}
