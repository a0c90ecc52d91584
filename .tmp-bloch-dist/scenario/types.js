/** Largest image the program will render, in pixels (memory guard: 4 float images of this size are ~ 64 MiB). */
export const MAX_PIXELS = 2048 * 2048;
export const MAX_SIDE_PX = 4096;
