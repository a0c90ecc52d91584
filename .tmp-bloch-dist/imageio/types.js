/** Largest image accepted (2^28 pixels, 1 GiB as Float32). */
export const MAX_PIXELS = 2 ** 28;
