/**
 * Foil thickness and extinction distance from two-beam convergent-beam
 * fringes (Kelly, Jostsons, Blake & Napier 1975, Phys. Stat. Sol. A 31, 771;
 * physics.md section 6).
 *
 * In the g disc of a two-beam convergent-beam pattern the dark fringes lie
 * where s_eff t is an integer, s_eff^2 = s^2 + 1/xi_g^2 (Pendelloesung,
 * Hirsch et al. 1965). Fringe i (counted outwards from the bright central
 * line, s = 0) at deviation s_i has s_i^2 + 1/xi_g^2 = n_i^2 / t^2 with
 * n_i = n_1 + i - 1, so
 *
 *     (s_i / n_i)^2 = 1/t^2 - (1/xi_g^2) (1/n_i^2)
 *
 * is a straight line in 1/n_i^2 with intercept 1/t^2 and slope -1/xi_g^2.
 * n_1 is unknown: try n_1 = 1, 2, ... and keep the integer that gives the
 * straightest line with a non-positive slope (Kelly et al. 1975). The fringe
 * positions are measured on the pattern as distances x_i from the central
 * line, and R is the distance between the 000 and g disc centres, so that
 * s_i = lambda g^2 x_i / R (the same angle scale as for Kikuchi lines; Kelly
 * et al. write s_i = lambda Delta_theta_i / (2 thetaB d^2), which is this
 * with Delta_theta_i = 2 thetaB x_i / R).
 *
 * Uncertainties: the straight-line least-squares standard errors of the
 * intercept and slope (residual variance with n - 2 degrees of freedom),
 * carried to t = intercept^(-1/2) and xi_g = (-slope)^(-1/2) to first order.
 */
import { InputError } from '../errors.js';

export interface FringeFit {
  /** Integer of the first fringe. */
  readonly n1: number;
  readonly thickness_nm: number;
  readonly thicknessError_nm: number;
  /** xi_g from the slope; undefined when the slope is not negative (xi_g not determined). */
  readonly xi_nm?: number;
  readonly xiError_nm?: number;
  /** Intercept 1/t^2 and slope -1/xi^2 (nm^-2) with their standard errors. */
  readonly intercept: number;
  readonly interceptError: number;
  readonly slope: number;
  readonly slopeError: number;
  /** Root-mean-square residual of (s/n)^2, nm^-2. */
  readonly rms: number;
  /** The residual of every integer tried (n1 = 1 ... ), for the report. */
  readonly tried: readonly { readonly n1: number; readonly rms: number; readonly slope: number }[];
}

interface Line {
  a: number;
  b: number;
  sa: number;
  sb: number;
  rms: number;
}

function straightLine(x: readonly number[], y: readonly number[]): Line {
  const n = x.length;
  let mx = 0, my = 0;
  for (let i = 0; i < n; i++) {
    mx += x[i] / n;
    my += y[i] / n;
  }
  let sxx = 0, sxy = 0;
  for (let i = 0; i < n; i++) {
    sxx += (x[i] - mx) ** 2;
    sxy += (x[i] - mx) * (y[i] - my);
  }
  const b = sxy / sxx;
  const a = my - b * mx;
  let ss = 0;
  for (let i = 0; i < n; i++) ss += (y[i] - a - b * x[i]) ** 2;
  const v = n > 2 ? ss / (n - 2) : 0;
  return { a, b, sb: Math.sqrt(v / sxx), sa: Math.sqrt(v * (1 / n + (mx * mx) / sxx)), rms: Math.sqrt(ss / n) };
}

/** Largest first-fringe integer tried. */
export const MAX_FIRST_FRINGE = 12;

/**
 * Fit t and xi_g to the deviations s_i (nm^-1, positive, increasing) of successive dark fringes.
 * InputError for fewer than 3 fringes or deviations that are not increasing.
 */
export function fitFringes(s_per_nm: readonly number[]): FringeFit {
  if (s_per_nm.length < 3) throw new InputError(`--fringes: ${s_per_nm.length} fringe position(s) given; give at least 3 successive dark fringes (4 or more for an uncertainty worth the name)`);
  for (let i = 0; i < s_per_nm.length; i++) {
    const s = s_per_nm[i];
    if (!(s > 0) || !Number.isFinite(s)) throw new InputError(`--fringes: position ${i + 1} is not a positive distance from the central line; give the distances of successive dark fringes on one side`);
    if (i > 0 && !(s > s_per_nm[i - 1])) throw new InputError('--fringes: the positions must increase outwards (first fringe nearest the central line)');
  }
  const tried: { n1: number; rms: number; slope: number }[] = [];
  let best: { n1: number; line: Line } | undefined;
  for (let n1 = 1; n1 <= MAX_FIRST_FRINGE; n1++) {
    const x: number[] = [];
    const y: number[] = [];
    s_per_nm.forEach((s, i) => {
      const n = n1 + i;
      x.push(1 / (n * n));
      y.push((s / n) ** 2);
    });
    const line = straightLine(x, y);
    // residual relative to the intercept, so that different n1 compare on the same footing
    const rel = line.rms / Math.abs(line.a);
    tried.push({ n1, rms: rel, slope: line.b });
    if (!(line.a > 0)) continue;
    if (line.b > 0) continue; // 1/xi_g^2 would be negative
    if (best === undefined || rel < best.line.rms / Math.abs(best.line.a)) best = { n1, line };
  }
  if (best === undefined) {
    throw new InputError('--fringes: no first-fringe integer gives a straight line with a positive intercept and a falling slope; check that the positions are dark fringes of one disc, measured from its central line');
  }
  const { a, b, sa, sb, rms } = best.line;
  const t = 1 / Math.sqrt(a);
  const fit: FringeFit = {
    n1: best.n1,
    thickness_nm: t,
    thicknessError_nm: sa / (2 * a ** 1.5),
    intercept: a,
    interceptError: sa,
    slope: b,
    slopeError: sb,
    rms,
    tried,
    ...(b < 0 ? { xi_nm: 1 / Math.sqrt(-b), xiError_nm: sb / (2 * (-b) ** 1.5) } : {}),
  };
  return fit;
}

/** s_i from distances on the pattern: s = lambda g^2 x / R. */
export function fringeDeviations(x: readonly number[], R: number, lambda_nm: number, g_per_nm: number): number[] {
  if (!(R > 0) || !Number.isFinite(R)) throw new InputError(`--spacing ${R} must be the positive distance between the 000 and g disc centres, in the units of the fringe positions`);
  return x.map((xi) => (lambda_nm * g_per_nm * g_per_nm * xi) / R);
}
