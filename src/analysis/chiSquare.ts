/**
 * Survival function of the chi-square distribution, P(X > x) for k degrees
 * of freedom: the regularised upper incomplete gamma function Q(k/2, x/2),
 * by its power series for x < a + 1 and Lentz's continued fraction otherwise
 * (Press et al. 2007, Numerical Recipes, 3rd ed., section 6.2).
 */
function logGamma(z: number): number {
  // Lanczos approximation, g = 7, n = 9 (Numerical Recipes 6.1 gives the method; coefficients of the common g=7 set)
  const c = [0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059, 12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7];
  if (z < 0.5) return Math.log(Math.PI / Math.sin(Math.PI * z)) - logGamma(1 - z);
  const x = z - 1;
  let a = c[0];
  const t = x + 7.5;
  for (let i = 1; i < 9; i++) a += c[i] / (x + i);
  return 0.5 * Math.log(2 * Math.PI) + (x + 0.5) * Math.log(t) - t + Math.log(a);
}

/** Regularised upper incomplete gamma Q(a, x), a > 0, x >= 0. */
export function upperGammaQ(a: number, x: number): number {
  if (x <= 0) return 1;
  const lnPre = -x + a * Math.log(x) - logGamma(a);
  if (x < a + 1) {
    let sum = 1 / a, term = 1 / a;
    for (let n = 1; n < 1000; n++) {
      term *= x / (a + n);
      sum += term;
      if (Math.abs(term) < Math.abs(sum) * 1e-16) break;
    }
    return Math.max(0, 1 - Math.exp(lnPre) * sum);
  }
  const tiny = 1e-300;
  let b = x + 1 - a, c = 1 / tiny, d = 1 / b, h = d;
  for (let i = 1; i < 1000; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < tiny) d = tiny;
    c = b + an / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) < 1e-16) break;
  }
  return Math.exp(lnPre) * h;
}

/** P(X > x) for a chi-square variable with k degrees of freedom. */
export function chiSquareSurvival(x: number, k: number): number {
  return upperGammaQ(k / 2, x / 2);
}
