/**
 * Contrast stretch of a float image into 8-bit grey levels.
 *
 * autoStretch picks a display window [lo, hi] from percentiles of the pixel
 * values: lo is the `clipFraction` lower percentile and hi the matching upper
 * one, so that a fraction `clipFraction` of the pixels saturates at each end
 * (percentile clipping, common practice in image display). Percentiles use
 * order statistics without interpolation: with the values sorted ascending,
 * v[0..n-1], lo = v[floor(c (n-1))] and hi = v[(n-1) - floor(c (n-1))]
 * (numpy.percentile's 'lower' and 'higher' methods).
 *
 * Fallbacks, so the window is always finite with lo < hi:
 *  - the percentiles coincide but the image is not uniform (for example a
 *    flat background with a defect covering fewer pixels than the clip
 *    fraction): use the full range [min, max];
 *  - the image is uniform (min = max = v): a window centred on v, of width
 *    max(|v|, 1), so the image shows as mid grey.
 *
 * The caller should record the returned lo/hi (for example in the figure
 * caption or a side table): grey levels mean nothing without them.
 */
/** Default clip: 0.5 % of the pixels at each end (common practice). */
export const DEFAULT_CLIP_FRACTION = 0.005;
/**
 * Rearrange `a` so that a[k] holds the k-th smallest value, everything
 * before it is <= a[k] and everything after it is >= a[k] (Hoare's
 * selection with median-of-three pivots; equal values split evenly, so large
 * flat regions do not make it quadratic). Works in place.
 */
export function selectInPlace(a, k) {
    let left = 0;
    let right = a.length - 1;
    while (right > left) {
        const mid = (left + right) >>> 1;
        // median of three into a[mid]
        if (a[mid] < a[left])
            swap(a, mid, left);
        if (a[right] < a[left])
            swap(a, right, left);
        if (a[right] < a[mid])
            swap(a, right, mid);
        const pivot = a[mid];
        let i = left;
        let j = right;
        while (i <= j) {
            while (a[i] < pivot)
                i++;
            while (a[j] > pivot)
                j--;
            if (i <= j) {
                swap(a, i, j);
                i++;
                j--;
            }
        }
        if (k <= j)
            right = j;
        else if (k >= i)
            left = i;
        else
            return a[k];
    }
    return a[k];
}
function swap(a, i, j) {
    const t = a[i];
    a[i] = a[j];
    a[j] = t;
}
/** Percentile-based display window; see the module comment. Never NaN. */
export function autoStretch(img, opts = {}) {
    const clip = opts.clipFraction ?? DEFAULT_CLIP_FRACTION;
    if (!(clip >= 0 && clip < 0.5)) {
        throw new RangeError(`autoStretch: clipFraction must be in [0, 0.5), got ${clip}.`);
    }
    const n = img.length;
    if (n === 0)
        throw new RangeError('autoStretch: the image has no pixels.');
    let min = Infinity;
    let max = -Infinity;
    let bad = 0;
    for (let i = 0; i < n; i++) {
        const v = img[i];
        if (v - v !== 0)
            bad++; // true for NaN and +-Infinity
        else {
            if (v < min)
                min = v;
            if (v > max)
                max = v;
        }
    }
    if (bad > 0)
        throw new RangeError(`autoStretch: the image has ${bad} NaN or infinite pixel values.`);
    if (min === max) {
        const half = 0.5 * Math.max(Math.abs(min), 1);
        return { lo: min - half, hi: min + half };
    }
    const kLo = Math.floor(clip * (n - 1));
    if (kLo === 0)
        return { lo: min, hi: max };
    const work = img.slice();
    const lo = selectInPlace(work, kLo);
    // after selecting kLo, the upper order statistic lies in work[kLo+1..]
    const hi = selectInPlace(work.subarray(kLo), n - 1 - kLo - kLo);
    if (lo < hi)
        return { lo, hi };
    return { lo: min, hi: max };
}
/**
 * Map float pixels to 8-bit grey: round(255 (v - lo) / (hi - lo)), clamped to
 * 0..255 (ties to even). Requires finite lo < hi and finite pixels.
 */
export function stretchToBytes(img, lo, hi, out) {
    if (!(Number.isFinite(lo) && Number.isFinite(hi) && lo < hi)) {
        throw new RangeError(`stretchToBytes: the display window needs finite lo < hi, got lo=${lo}, hi=${hi}.`);
    }
    const n = img.length;
    const res = out ?? new Uint8Array(n);
    if (res.length !== n)
        throw new RangeError(`stretchToBytes: out has ${res.length} entries, the image ${n}.`);
    // Uint8ClampedArray assignment clamps to 0..255 and rounds ties to even
    const clamped = new Uint8ClampedArray(res.buffer, res.byteOffset, n);
    const width = hi - lo;
    let bad = 0;
    for (let i = 0; i < n; i++) {
        const v = img[i];
        if (v - v !== 0)
            bad++;
        clamped[i] = ((v - lo) * 255) / width;
    }
    if (bad > 0)
        throw new RangeError(`stretchToBytes: the image has ${bad} NaN or infinite pixel values.`);
    return res;
}
