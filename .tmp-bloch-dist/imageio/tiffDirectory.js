/**
 * Reads the header and the first image file directory (IFD) of a classic
 * TIFF file (TIFF 6.0 specification, section 2). Only the first page is
 * read, so a broken or circular chain of later pages cannot hang the reader.
 * Every value that is read is checked to lie inside the file.
 */
import { InputError } from '../errors.js';
/** Field types (TIFF 6.0, section 2) and their sizes in bytes. */
const TYPE_SIZE = {
    1: 1, // BYTE
    2: 1, // ASCII
    3: 2, // SHORT
    4: 4, // LONG
    5: 8, // RATIONAL
    6: 1, // SBYTE
    7: 1, // UNDEFINED
    8: 2, // SSHORT
    9: 4, // SLONG
    10: 8, // SRATIONAL
    11: 4, // FLOAT
    12: 8, // DOUBLE
    13: 4, // IFD (TIFF technical note 1)
};
/** "II*\0" or "MM\0*" (TIFF 6.0, section 2, image file header). */
export function isTiff(bytes) {
    if (bytes.length < 4)
        return false;
    const ii = bytes[0] === 0x49 && bytes[1] === 0x49 && bytes[3] === 0;
    const mm = bytes[0] === 0x4d && bytes[1] === 0x4d && bytes[2] === 0;
    if (!(ii || mm))
        return false;
    const magic = ii ? bytes[2] : bytes[3];
    return magic === 42 || magic === 43; // 43 = BigTIFF, rejected with its own message
}
/** Values of one field; undefined for types this reader does not know (ignored, as TIFF 6.0 asks). */
function readValues(dv, type, count, at, le) {
    const out = [];
    for (let j = 0; j < count; j++) {
        switch (type) {
            case 1:
            case 7:
                out.push(dv.getUint8(at + j));
                break;
            case 6:
                out.push(dv.getInt8(at + j));
                break;
            case 3:
                out.push(dv.getUint16(at + 2 * j, le));
                break;
            case 8:
                out.push(dv.getInt16(at + 2 * j, le));
                break;
            case 4:
            case 13:
                out.push(dv.getUint32(at + 4 * j, le));
                break;
            case 9:
                out.push(dv.getInt32(at + 4 * j, le));
                break;
            case 5:
                out.push(dv.getUint32(at + 8 * j, le) / dv.getUint32(at + 8 * j + 4, le));
                break;
            case 10:
                out.push(dv.getInt32(at + 8 * j, le) / dv.getInt32(at + 8 * j + 4, le));
                break;
            case 11:
                out.push(dv.getFloat32(at + 4 * j, le));
                break;
            case 12:
                out.push(dv.getFloat64(at + 8 * j, le));
                break;
            default:
                return undefined;
        }
    }
    return out;
}
export function readFirstDirectory(bytes, name) {
    const damaged = (why) => new InputError(`${name} is a damaged or truncated TIFF file (${why}); save it again.`);
    if (bytes.length < 8)
        throw damaged('the header is incomplete');
    const le = bytes[0] === 0x49;
    const dv = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
    const magic = dv.getUint16(2, le);
    if (magic === 43) {
        throw new InputError(`${name} is a BigTIFF file, which thinfoil cannot read; save it as a classic TIFF (under 4 GB).`);
    }
    const ifd = dv.getUint32(4, le);
    if (ifd < 8 || ifd + 2 > bytes.length)
        throw damaged('the first directory lies outside the file');
    const n = dv.getUint16(ifd, le);
    if (ifd + 2 + 12 * n > bytes.length)
        throw damaged('the first directory runs past the end of the file');
    const numbers = new Map();
    const texts = new Map();
    for (let i = 0; i < n; i++) {
        const e = ifd + 2 + 12 * i;
        const tag = dv.getUint16(e, le);
        const type = dv.getUint16(e + 2, le);
        const count = dv.getUint32(e + 4, le);
        const size = TYPE_SIZE[type];
        if (size === undefined)
            continue; // unknown type: skip the field
        const total = size * count;
        const at = total <= 4 ? e + 8 : dv.getUint32(e + 8, le);
        if (at + total > bytes.length) {
            numbers.set(tag, []); // present but unreadable; required fields fail below
            continue;
        }
        if (type === 2) {
            let s = '';
            for (let j = 0; j < count && bytes[at + j] !== 0; j++)
                s += String.fromCharCode(bytes[at + j]);
            texts.set(tag, s);
        }
        else {
            const values = readValues(dv, type, count, at, le);
            if (values !== undefined)
                numbers.set(tag, values);
        }
    }
    return { littleEndian: le, numbers, texts };
}
