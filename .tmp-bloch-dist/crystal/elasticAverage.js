/** The full 6x6 stiffness matrix (GPa, Voigt notation) of a cubic or hexagonal crystal. */
export function stiffnessMatrix(c, symmetry) {
    const m = Array.from({ length: 6 }, () => new Array(6).fill(0));
    if (symmetry === 'cubic') {
        for (let i = 0; i < 3; i++) {
            for (let j = 0; j < 3; j++)
                m[i][j] = i === j ? c.C11 : c.C12;
            m[i + 3][i + 3] = c.C44;
        }
        return m;
    }
    if (c.C13 === undefined || c.C33 === undefined)
        throw new RangeError('hexagonal elastic constants need C13 and C33');
    m[0][0] = m[1][1] = c.C11;
    m[0][1] = m[1][0] = c.C12;
    m[0][2] = m[2][0] = m[1][2] = m[2][1] = c.C13;
    m[2][2] = c.C33;
    m[3][3] = m[4][4] = c.C44;
    m[5][5] = (c.C11 - c.C12) / 2; // C66 of a transversely isotropic (hexagonal) crystal
    return m;
}
/** True when the symmetric matrix is positive definite (Cholesky succeeds): the crystal is mechanically stable. */
export function isPositiveDefinite(m) {
    const n = m.length;
    const L = Array.from({ length: n }, () => new Array(n).fill(0));
    for (let i = 0; i < n; i++) {
        for (let j = 0; j <= i; j++) {
            let s = m[i][j];
            for (let k = 0; k < j; k++)
                s -= L[i][k] * L[j][k];
            if (i === j) {
                if (!(s > 0))
                    return false;
                L[i][i] = Math.sqrt(s);
            }
            else {
                L[i][j] = s / L[j][j];
            }
        }
    }
    return true;
}
/** Inverse of a square matrix by Gauss-Jordan elimination with partial pivoting. */
export function invertMatrix(m) {
    const n = m.length;
    const a = m.map((row, i) => [...row, ...Array.from({ length: n }, (_, j) => (i === j ? 1 : 0))]);
    for (let col = 0; col < n; col++) {
        let p = col;
        for (let r = col + 1; r < n; r++)
            if (Math.abs(a[r][col]) > Math.abs(a[p][col]))
                p = r;
        if (a[p][col] === 0)
            throw new RangeError('singular matrix');
        [a[col], a[p]] = [a[p], a[col]];
        const piv = a[col][col];
        for (let k = 0; k < 2 * n; k++)
            a[col][k] /= piv;
        for (let r = 0; r < n; r++) {
            if (r === col)
                continue;
            const f = a[r][col];
            if (f !== 0)
                for (let k = 0; k < 2 * n; k++)
                    a[r][k] -= f * a[col][k];
        }
    }
    return a.map((row) => row.slice(n));
}
/** Poisson ratio of an isotropic solid from its bulk and shear moduli. */
export function poissonFromBulkShear(K, G) {
    return (3 * K - 2 * G) / (2 * (3 * K + G));
}
/**
 * Voigt, Reuss and Hill averages. Throws RangeError when the constants are
 * not mechanically stable (stiffness matrix not positive definite).
 */
export function voigtReussHill(c, symmetry) {
    const C = stiffnessMatrix(c, symmetry);
    if (!isPositiveDefinite(C))
        throw new RangeError('elastic constants are not mechanically stable (stiffness matrix not positive definite)');
    const S = invertMatrix(C);
    const diag = (m) => m[0][0] + m[1][1] + m[2][2];
    const off = (m) => m[0][1] + m[0][2] + m[1][2];
    const shear = (m) => m[3][3] + m[4][4] + m[5][5];
    const KV = (diag(C) + 2 * off(C)) / 9;
    const GV = (diag(C) - off(C) + 3 * shear(C)) / 15;
    const KR = 1 / (diag(S) + 2 * off(S));
    const GR = 15 / (4 * diag(S) - 4 * off(S) + 3 * shear(S));
    const K = (KV + KR) / 2;
    const G = (GV + GR) / 2;
    return {
        bulkModulus_GPa: K,
        shearModulus_GPa: G,
        poissonRatio: poissonFromBulkShear(K, G),
        voigt: { bulkModulus_GPa: KV, shearModulus_GPa: GV },
        reuss: { bulkModulus_GPa: KR, shearModulus_GPa: GR },
    };
}
/** Zener anisotropy ratio A = 2 C44 / (C11 - C12) of a cubic crystal (1 when isotropic). */
export function cubicAnisotropy(c) {
    return (2 * c.C44) / (c.C11 - c.C12);
}
