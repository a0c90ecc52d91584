/**
 * The displacement field of a defect: R(r) and its gradient dR_i/dx_j, both in
 * the crystal's Cartesian frame (nm). Linear elasticity, so the fields of
 * several defects add (`superpose`).
 */
/**
 * The sum of several fields (displacements and gradients add in linear
 * elasticity). Scratch arrays are allocated once here, so the returned field
 * is not re-entrant: use one instance per thread (each worker builds its own).
 */
export function superpose(fields) {
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
            for (let i = 0; i < 9; i++)
                out[i] = 0;
            for (let k = 0; k < n; k++) {
                list[k].gradient(g, x, y, z);
                for (let i = 0; i < 9; i++)
                    out[i] += g[i];
            }
        },
        directional(gv, kv) {
            const fs = list.map((f) => f.directional(gv, kv));
            if (fs.length === 1)
                return fs[0];
            if (fs.length === 2) {
                const [a, b] = fs;
                return (x, y, z) => a(x, y, z) + b(x, y, z);
            }
            return (x, y, z) => {
                let s = 0;
                for (let i = 0; i < fs.length; i++)
                    s += fs[i](x, y, z);
                return s;
            };
        },
    };
}
