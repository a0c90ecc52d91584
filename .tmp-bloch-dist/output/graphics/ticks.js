/**
 * Axis ticks by the 1-2-5 rule (common practice in plotting): the step is
 * 1, 2 or 5 times a power of ten, chosen so that about `target` intervals
 * span the range.
 */
/** A step of the 1-2-5 series close to span / target. */
export function niceStep(span, target) {
    if (!(span > 0) || !Number.isFinite(span))
        throw new RangeError(`niceStep: span must be positive and finite, got ${span}`);
    const raw = span / Math.max(1, target);
    const mag = 10 ** Math.floor(Math.log10(raw));
    const f = raw / mag;
    const m = f < 1.5 ? 1 : f < 3.5 ? 2 : f < 7.5 ? 5 : 10;
    return m * mag;
}
/** Tick values k * step inside [lo, hi] (ends included within 1e-9 step). */
export function ticksIn(lo, hi, step) {
    const out = [];
    const k0 = Math.ceil(lo / step - 1e-9);
    const k1 = Math.floor(hi / step + 1e-9);
    for (let k = k0; k <= k1; k++)
        out.push(k * step === 0 ? 0 : k * step);
    return out;
}
/**
 * A range that contains [min, max] with ends on multiples of a 1-2-5 step,
 * and its ticks. A degenerate range is widened (by 1 around 0, else by 10 %
 * of the value).
 */
export function niceRange(min, max, target) {
    if (!(Number.isFinite(min) && Number.isFinite(max))) {
        min = 0;
        max = 1;
    }
    if (max < min)
        [min, max] = [max, min];
    if (max - min <= 1e-12 * Math.max(Math.abs(min), Math.abs(max))) {
        const d = min === 0 ? 1 : 0.1 * Math.abs(min);
        min -= d;
        max += d;
    }
    const step = niceStep(max - min, target);
    const lo = Math.floor(min / step + 1e-9) * step;
    const hi = Math.ceil(max / step - 1e-9) * step;
    return { range: [lo, hi], step, ticks: ticksIn(lo, hi, step) };
}
/** Tick label text: as many decimals as the step needs, a true minus sign, exponent form for extreme magnitudes. */
export function formatTick(v, step) {
    if (Math.abs(v) < step * 1e-9)
        v = 0;
    const big = Math.max(Math.abs(v), step);
    let s;
    if (big >= 1e6 || step < 1e-5) {
        const digits = Math.max(0, Math.round(Math.log10(big) - Math.log10(step)));
        s = v === 0 ? '0' : v.toExponential(Math.min(digits, 6)).replace(/\.?0+e/, 'e').replace('e+', 'e');
    }
    else {
        const decimals = Math.max(0, -Math.floor(Math.log10(step) + 1e-9));
        s = v.toFixed(decimals);
    }
    return s.replace(/-/g, '\u2212');
}
