/** A micrograph decoded to one grey value per pixel. */
export interface DecodedImage {
  width: number;
  height: number;
  /** Grey values row by row, top row first, as stored (not rescaled), as float. */
  data: Float32Array;
  /** Bits per sample in the file (for palette images: of the palette entries). */
  bitDepth: number;
  kind: 'png' | 'tiff';
  /**
   * Pixel size in nm from the file's resolution fields (TIFF XResolution with
   * ResolutionUnit inch or cm, PNG pHYs in metres), when present and square.
   * Many programs write a placeholder such as 72 dpi here: treat it as a hint.
   */
  pixel_nm?: number;
}

/**
 * Largest micrograph accepted: 8192 x 8192 pixels (2^26; 256 MiB as Float32),
 * at most 32768 pixels on a side, checked from the header before decoding.
 */
export const MAX_PIXELS = 8192 * 8192;
export const MAX_SIDE = 32768;
/** Largest uncompressed pixel data of a TIFF (all samples), checked before decoding. */
export const MAX_RAW_BYTES = 512 * 2 ** 20;
/** Largest micrograph file read (checked on the file's size before reading). */
export const MAX_FILE_BYTES = 1024 * 2 ** 20;
