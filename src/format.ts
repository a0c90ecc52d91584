/** Round to a number of significant digits for display ("0.0123", "4.5e-7", "Infinity"). */
export function sig(x: number, digits = 4): string {
  if (!Number.isFinite(x)) return String(x);
  if (x === 0) return '0';
  return Number(x.toPrecision(digits)).toString();
}
