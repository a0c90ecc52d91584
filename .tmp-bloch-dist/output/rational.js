/**
 * Best rational approximation p/q of a positive number with p and q unsigned
 * 32-bit integers, as stored in a TIFF RATIONAL field (TIFF 6.0, section 2:
 * "Two LONGs: the first represents the numerator of a fraction; the second,
 * the denominator"). Uses the continued-fraction convergents of x and stops at
 * the last one whose numerator and denominator both fit in 32 bits, so exact
 * ratios of small integers (such as 1e8/3) come out exact.
 */
export const UINT32_MAX = 0xffffffff;
export function toRational32(x) {
    if (!(Number.isFinite(x) && x > 0))
        throw new RangeError(`toRational32: need a finite positive number, got ${x}.`);
    if (x > UINT32_MAX)
        throw new RangeError(`toRational32: ${x} does not fit in a 32-bit rational.`);
    // convergents h_k / k_k with h_{-1}=1, h_{-2}=0, k_{-1}=0, k_{-2}=1
    let hPrev = 1;
    let hPrev2 = 0;
    let kPrev = 0;
    let kPrev2 = 1;
    let rest = x;
    for (let iter = 0; iter < 64; iter++) {
        const a = Math.floor(rest);
        const h = a * hPrev + hPrev2;
        const k = a * kPrev + kPrev2;
        if (h > UINT32_MAX || k > UINT32_MAX)
            break;
        hPrev2 = hPrev;
        hPrev = h;
        kPrev2 = kPrev;
        kPrev = k;
        const frac = rest - a;
        if (frac === 0 || h / k === x)
            break;
        rest = 1 / frac;
    }
    if (kPrev === 0 || hPrev === 0) {
        // x < 1 / UINT32_MAX: not representable with a non-zero numerator
        throw new RangeError(`toRational32: ${x} is too small for a 32-bit rational.`);
    }
    return [hPrev, kPrev];
}
