/**
 * Writes the rendered images of a scenario: per condition and field an 8-bit
 * contrast-stretched PNG for viewing and a 32-bit float TIFF holding the
 * intensity as a fraction of the incident beam.
 */
import { join } from 'node:path';
import { writeFileAtomic } from './atomicWrite.js';
import { autoStretch, encodeGreyPng, stretchToBytes } from './png.js';
import { encodeFloatTiff } from './tiff.js';
export function imageStats(img) {
    let min = Infinity;
    let max = -Infinity;
    let sum = 0;
    for (let i = 0; i < img.length; i++) {
        const v = img[i];
        if (v < min)
            min = v;
        if (v > max)
            max = v;
        sum += v;
    }
    return { min, max, mean: sum / img.length };
}
export function writeConditionImages(dir, images, scenarioName) {
    const entries = [];
    for (const ci of images) {
        for (const field of ['bf', 'df']) {
            const img = field === 'bf' ? ci.bf : ci.df;
            const base = `${ci.condition.id}-${field}`;
            const png = join(dir, `${base}.png`);
            const tiff = join(dir, `${base}.tif`);
            const stretch = autoStretch(img);
            writeFileAtomic(png, encodeGreyPng(stretchToBytes(img, stretch.lo, stretch.hi), ci.width, ci.height));
            const g = ci.condition.g;
            const description = `thinfoil simulation (model, not a measurement): ${scenarioName}; condition ${ci.condition.id}, ` +
                `g = (${g.join(' ')}), ${field === 'bf' ? 'bright field' : 'dark field'}, intensity as a fraction of the incident beam`;
            writeFileAtomic(tiff, encodeFloatTiff(img, ci.width, ci.height, { pixel_nm: ci.pixel_nm, description }));
            const st = imageStats(img);
            entries.push({
                condition: ci.condition.id,
                field,
                png,
                tiff,
                width: ci.width,
                height: ci.height,
                ...st,
                background: field === 'bf' ? ci.background.bf : ci.background.df,
                stretch: { lo: stretch.lo, hi: stretch.hi },
            });
        }
    }
    return entries;
}
