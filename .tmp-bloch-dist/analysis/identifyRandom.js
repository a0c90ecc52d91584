/**
 * Seeded random numbers for synthetic micrographs and the bootstrap:
 * mulberry32 (a 32-bit generator by Tommy Ettinger, public domain) for
 * uniforms, Box-Muller for normals, and for Poisson counts Knuth's product
 * method below a mean of 30 and Hoermann's transformed rejection (PTRS,
 * Hoermann 1993, Insurance: Mathematics and Economics 12, 39) above.
 */
export function seededRandom(seed) {
    let a = seed >>> 0;
    const uniform = () => {
        a = (a + 0x6d2b79f5) >>> 0;
        let t = a;
        t = Math.imul(t ^ (t >>> 15), t | 1);
        t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
        return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
    };
    let spare = null;
    const normal = () => {
        if (spare !== null) {
            const s = spare;
            spare = null;
            return s;
        }
        let u = 0;
        while (u === 0)
            u = uniform();
        const v = uniform();
        const r = Math.sqrt(-2 * Math.log(u));
        spare = r * Math.sin(2 * Math.PI * v);
        return r * Math.cos(2 * Math.PI * v);
    };
    const poisson = (mean) => {
        if (!(mean >= 0) || !Number.isFinite(mean))
            throw new RangeError(`poisson: mean must be finite and >= 0, got ${mean}`);
        if (mean === 0)
            return 0;
        if (mean < 30) {
            const L = Math.exp(-mean);
            let k = 0;
            let p = uniform();
            while (p > L) {
                k++;
                p *= uniform();
            }
            return k;
        }
        // PTRS (Hoermann 1993)
        const slam = Math.sqrt(mean);
        const loglam = Math.log(mean);
        const b = 0.931 + 2.53 * slam;
        const aa = -0.059 + 0.02483 * b;
        const invalpha = 1.1239 + 1.1328 / (b - 3.4);
        const vr = 0.9277 - 3.6224 / (b - 2);
        for (;;) {
            const U = uniform() - 0.5;
            const V = uniform();
            const us = 0.5 - Math.abs(U);
            const k = Math.floor(((2 * aa) / us + b) * U + mean + 0.43);
            if (us >= 0.07 && V <= vr)
                return k;
            if (k < 0 || (us < 0.013 && V > us))
                continue;
            if (Math.log(V) + Math.log(invalpha) - Math.log(aa / (us * us) + b) <= -mean + k * loglam - logFactorial(k))
                return k;
        }
    };
    return { uniform, normal, poisson };
}
function logFactorial(k) {
    if (k < 2)
        return 0;
    if (k < 20) {
        let s = 0;
        for (let i = 2; i <= k; i++)
            s += Math.log(i);
        return s;
    }
    // Stirling series
    return (k + 0.5) * Math.log(k) - k + 0.5 * Math.log(2 * Math.PI) + 1 / (12 * k) - 1 / (360 * k * k * k);
}
