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

/** Largest image accepted (2^28 pixels, 1 GiB as Float32). */
export const MAX_PIXELS = 2 ** 28;
