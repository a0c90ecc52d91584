/**
 * Two-dimensional complex FFT on interleaved (re, im) Float64Arrays, built
 * from npm fft.js's one-dimensional radix-4 transform: rows first, then
 * columns. Sizes are powers of two. The plan owns its scratch buffers, so a
 * transform allocates nothing. fft.js's inverse divides by n per axis, so
 * inverse(forward(x)) = x.
 */
import { createRequire } from 'node:module';
// fft.js is CommonJS without type declarations
const FFT = createRequire(import.meta.url)('fft.js');
/** Smallest power of two >= n (at least 2). */
export function nextPow2(n) {
    let p = 2;
    while (p < n)
        p *= 2;
    return p;
}
export function fft2d(width, height) {
    const rowFft = new FFT(width);
    const colFft = width === height ? rowFft : new FFT(height);
    const rowIn = new Float64Array(2 * width);
    const rowOut = new Float64Array(2 * width);
    const colIn = new Float64Array(2 * height);
    const colOut = new Float64Array(2 * height);
    const run = (data, inverse) => {
        for (let y = 0; y < height; y++) {
            const o = 2 * y * width;
            rowIn.set(data.subarray(o, o + 2 * width));
            if (inverse)
                rowFft.inverseTransform(rowOut, rowIn);
            else
                rowFft.transform(rowOut, rowIn);
            data.set(rowOut, o);
        }
        for (let x = 0; x < width; x++) {
            for (let y = 0; y < height; y++) {
                const k = 2 * (y * width + x);
                colIn[2 * y] = data[k];
                colIn[2 * y + 1] = data[k + 1];
            }
            if (inverse)
                colFft.inverseTransform(colOut, colIn);
            else
                colFft.transform(colOut, colIn);
            for (let y = 0; y < height; y++) {
                const k = 2 * (y * width + x);
                data[k] = colOut[2 * y];
                data[k + 1] = colOut[2 * y + 1];
            }
        }
    };
    return {
        width,
        height,
        forward: (d) => run(d, false),
        inverse: (d) => run(d, true),
    };
}
