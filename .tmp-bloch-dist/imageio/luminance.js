/**
 * Colour to grey by luma weights of ITU-R BT.601 (Rec. 601):
 * Y' = 0.299 R' + 0.587 G' + 0.114 B'. Applied to the stored (gamma-encoded)
 * values as they are, without linearisation, which is how Rec. 601 luma is
 * defined.
 */
export const REC601_R = 0.299;
export const REC601_G = 0.587;
export const REC601_B = 0.114;
export function lumaRec601(r, g, b) {
    return REC601_R * r + REC601_G * g + REC601_B * b;
}
