/**
 * Micrograph import: PNG or TIFF bytes to one grey value per pixel, as float.
 * The format is recognised by its signature, not by the file name. Colour
 * images become grey by Rec. 601 luma (ITU-R BT.601 weights, luminance.ts).
 * Anything unreadable raises an InputError naming the file and the fix.
 * This module only decodes bytes; reading the file is the caller's job.
 */
import { InputError } from '../errors.js';
import { decodePng, isPng } from './readPng.js';
import { decodeTiff } from './readTiff.js';
import { isTiff } from './tiffDirectory.js';
export function decodeImage(bytes, nameForErrors) {
    if (isPng(bytes))
        return decodePng(bytes, nameForErrors);
    if (isTiff(bytes))
        return decodeTiff(bytes, nameForErrors);
    if (bytes.length === 0)
        throw new InputError(`${nameForErrors} is empty; save the micrograph as PNG or TIFF.`);
    throw new InputError(`${nameForErrors} is not a PNG or TIFF file; save the micrograph as PNG or TIFF.`);
}
