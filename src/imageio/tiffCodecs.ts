/**
 * Decompression of one TIFF strip or tile into a caller-owned buffer of the
 * exact size the image geometry asks for. Every loop is bounded by the input
 * it has (each step consumes input) and stops writing when the output is full,
 * so damaged data ends in a refusal, never in a hang or a large allocation.
 *
 *   LZW:      TIFF 6.0 specification, section 13 (MSB-first codes, 9 to 12 bits,
 *             Clear 256, EndOfInformation 257, the code width grows one code early).
 *   PackBits: TIFF 6.0 specification, section 9.
 *   Deflate:  zlib stream (TIFF technical note 2, RFC 1950/1951) through Node's zlib,
 *             with the output size capped.
 *
 * Written here instead of calling utif 3.1.0: utif's LZW decoder loops without
 * end on some damaged streams, and for a file of one strip or tile it replaces
 * the stored byte count by "the rest of the file" before decoding, so a wrong
 * layout was decoded silently.
 */
import { inflateSync } from 'node:zlib';

/** Result of decoding one block: bytes written and whether the data held more than fits. */
export interface BlockResult {
  written: number;
  /** The stream held more data than the block's size. */
  overflow: boolean;
  /** A reason when the stream itself is damaged. */
  error?: string;
}

const CLEAR = 256;
const EOI = 257;
// one table for the whole process: prefix code, last byte, first byte, length of each string
const prefix = new Int32Array(4096);
const suffix = new Uint8Array(4096);
const first = new Uint8Array(4096);
const length = new Int32Array(4096);
for (let i = 0; i < 256; i++) {
  prefix[i] = -1;
  suffix[i] = i;
  first[i] = i;
  length[i] = 1;
}

/** TIFF LZW (TIFF 6.0, section 13). */
export function lzwDecode(src: Uint8Array, out: Uint8Array): BlockResult {
  if (src.length >= 2 && src[0] === 0 && (src[1] & 1) === 1) {
    return { written: 0, overflow: false, error: 'it uses the old-style LZW coding of pre-1992 writers' };
  }
  const nBits = src.length * 8;
  let bitPos = 0;
  let width = 9;
  let next = 258;
  let old = -1;
  let o = 0;
  const cap = out.length;
  while (bitPos + width <= nBits) {
    // read `width` bits, most significant first
    let code = 0;
    for (let k = 0; k < width; k++) {
      const p = bitPos + k;
      code = (code << 1) | ((src[p >>> 3] >>> (7 - (p & 7))) & 1);
    }
    bitPos += width;
    if (code === EOI) return { written: o, overflow: false };
    if (code === CLEAR) {
      width = 9;
      next = 258;
      old = -1;
      continue;
    }
    let entry: number;
    if (old === -1) {
      if (code > 255) return { written: o, overflow: false, error: `the LZW data starts with code ${code} after a reset` };
      entry = code;
    } else if (code < next) {
      entry = code;
      if (next < 4096) {
        prefix[next] = old;
        suffix[next] = first[code];
        first[next] = first[old];
        length[next] = length[old] + 1;
        next++;
      }
    } else if (code === next && next < 4096) {
      // the string just being defined: old string + its own first byte
      prefix[next] = old;
      suffix[next] = first[old];
      first[next] = first[old];
      length[next] = length[old] + 1;
      entry = next;
      next++;
    } else {
      return { written: o, overflow: false, error: `the LZW data holds code ${code} before it is defined` };
    }
    // write the string of `entry` backwards from its end
    const len = length[entry];
    if (o + len > cap) {
      // write what fits, then report the excess
      let c = entry;
      for (let k = len - 1; k >= 0; k--) {
        if (o + k < cap) out[o + k] = suffix[c];
        c = prefix[c];
      }
      return { written: cap, overflow: true };
    }
    let c = entry;
    for (let k = len - 1; k >= 0; k--) {
      out[o + k] = suffix[c];
      c = prefix[c];
    }
    o += len;
    old = entry;
    // early change: the width grows when the next code would need it, one code early
    if (next >= 511 && width === 9) width = 10;
    else if (next >= 1023 && width === 10) width = 11;
    else if (next >= 2047 && width === 11) width = 12;
    if (next >= 4096) {
      // a conforming writer sends Clear before the table is full (TIFF 6.0, section 13)
      // here we keep decoding with the full table, as libtiff does
    }
  }
  // data ended without EndOfInformation: accepted if the block is complete (libtiff does the same)
  return { written: o, overflow: false };
}

/** PackBits (TIFF 6.0, section 9). */
export function packBitsDecode(src: Uint8Array, out: Uint8Array): BlockResult {
  let i = 0;
  let o = 0;
  const cap = out.length;
  while (i < src.length) {
    const n = src[i++];
    if (n < 128) {
      const count = n + 1;
      if (i + count > src.length) return { written: o, overflow: false, error: 'a PackBits literal run passes the end of the data' };
      if (o + count > cap) {
        out.set(src.subarray(i, i + (cap - o)), o);
        return { written: cap, overflow: true };
      }
      out.set(src.subarray(i, i + count), o);
      o += count;
      i += count;
    } else if (n > 128) {
      const count = 257 - n;
      if (i >= src.length) return { written: o, overflow: false, error: 'a PackBits repeat run passes the end of the data' };
      const v = src[i++];
      if (o + count > cap) {
        out.fill(v, o, cap);
        return { written: cap, overflow: true };
      }
      out.fill(v, o, o + count);
      o += count;
    }
    // n === 128: no operation
    if (o === cap && i < src.length) {
      // trailing bytes after a full block: only no-ops may follow
      while (i < src.length && src[i] === 128) i++;
      return { written: o, overflow: i < src.length };
    }
  }
  return { written: o, overflow: false };
}

/** zlib stream with the output capped at the block size (one byte more detects excess). */
export function inflateDecode(src: Uint8Array, out: Uint8Array): BlockResult {
  let data: Buffer;
  try {
    data = inflateSync(src, { maxOutputLength: out.length + 1 });
  } catch (err) {
    const e = err as NodeJS.ErrnoException;
    if (e.code === 'ERR_BUFFER_TOO_LARGE') return { written: out.length, overflow: true };
    return { written: 0, overflow: false, error: `the Deflate data is damaged (${(e.message ?? String(err)).replace(/[.;]+$/, '')})` };
  }
  if (data.length > out.length) return { written: out.length, overflow: true };
  out.set(data, 0);
  return { written: data.length, overflow: false };
}
