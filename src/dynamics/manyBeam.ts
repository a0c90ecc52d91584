/**
 * Many-beam column integrator for strained crystal (physics.md section 4):
 *
 *     dphi/dz = 2 pi i (A0 + D(z)) phi,   D(z) = diag(g_j . dR/dz)
 *
 * A0 is the perfect-crystal structure matrix; D(z) is real and diagonal. For a
 * systematic row, g_j . dR/dz = n_j beta'(z) with beta' = d(g.R)/dz of the
 * fundamental g; for a general beam set, g_j . dR/dz with dR/dz a 3-vector.
 *
 * Scheme (chosen for accuracy and speed):
 * - A0 = C Gamma C^-1 is diagonalised once (Bloch waves). The state is the
 *   vector of Bloch-wave amplitudes psi = C^-1 phi.
 * - Each step works in the interaction picture of the perfect crystal,
 *   anchored at the start z0 of the step: u(tau) = exp(-2 pi i Gamma tau)
 *   psi(z0 + tau), which obeys
 *       du/dtau = 2 pi i E(tau)^-1 C^-1 D(z0 + tau) C E(tau) u,
 *       E(tau) = diag(exp(2 pi i gamma_j tau)).
 *   The perfect-crystal part is thus propagated exactly: where D = 0 the
 *   right-hand side vanishes and steps grow to maxStep_nm with no error; only
 *   the strain is integrated numerically.
 * - Integration: embedded Runge-Kutta of Dormand & Prince 5(4) (Hairer,
 *   Norsett & Wanner, Solving ODEs I, 2nd ed., section II.5) with local
 *   extrapolation, FSAL, and step-size control on the local error of the
 *   Bloch-wave amplitudes at the end of the step (max norm). Step lengths
 *   are taken from the ladder maxStep_nm 2^(-k/4), so the phase factors
 *   E(c h) of every stage are computed once per system and reused by all
 *   columns (only the last step before a fault or the exit is off the
 *   ladder). Measured on the test cases (test/dynamics/manybeamColumn.test.ts,
 *   scipy references): the error of the exit amplitudes is 1 to 20 times
 *   tol for tol = 1e-4 .. 1e-12.
 * - Cost: 6 evaluations of the strain per step, each O(N^2) (a systematic
 *   row uses M = C^-1 diag(n_j) C; a general set C^-1 D C, 2 N^2). A
 *   stretch with beta' = 0 exactly costs no matrix work.
 * - Planar faults: a phase jump at depth z. Same sign convention as the
 *   two-beam engine (twoBeam.ts, derived in twoBeamColumn.ts): with
 *   Delta R = R_below - R_above (R_below on the exit side, larger z),
 *   beam j is multiplied by exp(+2 pi i g_j . Delta R); for a systematic row
 *   with alpha = 2 pi g.(R_below - R_above) of the fundamental g, beam n g
 *   gets exp(+i n alpha). This is exactly what the beta' form gives for a step
 *   of g.R by alpha/(2 pi) at z (a test checks it). A fault with alpha = 0
 *   is a breakpoint: a step boundary with a fresh small first step, useful
 *   at the depth of a dislocation core.
 *
 * Example (weak beam g(3g), beams -1..3, one column):
 *   const input = systematicRowInput({ nMin: -1, nMax: 3, s_g: weakBeamDeviation(3, lambda, g), ... });
 *   const sys = prepareColumnSystem(input, systematicRowOrders(-1, 3), { incident: 1 });
 *   const phi = new Float64Array(10);
 *   integrateColumnN(phi, sys, 100, (z) => betaPrime(z), 1e-6, Float64Array.from([zCore, 0]));
 *   // bright field phi[2]^2 + phi[3]^2, dark field g: phi[4]^2 + phi[5]^2
 *
 * Amplitude vectors are interleaved [re_0, im_0, re_1, im_1, ...].
 * A ColumnSystem carries its own work arrays: one system per thread of
 * execution (do not share one between concurrently running integrations).
 */
import { InternalError } from '../errors.js';
import { blochWaves } from './blochWaves.js';
import type { ManyBeamInput } from './manyBeamStructureMatrix.js';

/** Precomputed data of one beam set for many columns. */
export interface ColumnSystem {
  readonly n: number;
  /** 1 for a systematic row (scalar beta'), 3 for a general beam set (dR/dz) */
  readonly strainDim: 1 | 3;
  /** per-beam strain factors, n x strainDim (n_j, or the Cartesian g_j in nm^-1) */
  readonly factors: Float64Array;
  readonly gammaRe: Float64Array;
  readonly gammaIm: Float64Array;
  readonly cRe: Float64Array;
  readonly cIm: Float64Array;
  readonly cInvRe: Float64Array;
  readonly cInvIm: Float64Array;
  /** systematic row: M = C^-1 diag(n_j) C (empty for a general beam set) */
  readonly mRe: Float64Array;
  readonly mIm: Float64Array;
  /** Bloch amplitudes at the entrance, psi(0) = C^-1 phi(0) */
  readonly psi0Re: Float64Array;
  readonly psi0Im: Float64Array;
  /** largest step, nm */
  readonly maxStep_nm: number;
  /** internal work arrays and caches (mutable; not part of the interface) */
  readonly work: Work;
}

export interface ColumnOptions {
  /** index of the transmitted beam (phi(0) = e_incident) or a full interleaved phi(0) */
  readonly incident: number | Float64Array;
  /**
   * Largest integration step, nm (default 5). Bounds how far the stepper can
   * jump over a strain feature it has not yet seen.
   */
  readonly maxStep_nm?: number;
}

interface Work {
  readonly ur: Float64Array;
  readonly ui: Float64Array;
  readonly yr: Float64Array;
  readonly yi: Float64Array;
  readonly kr: Float64Array[]; // 7 stages
  readonly ki: Float64Array[];
  readonly d: Float64Array; // per-beam strain term g_j . dR/dz (general beam set)
  /**
   * The probe's array: the depth of the next strain evaluation in io[0], the strain components there in
   * io[1] (beta') or io[1..3] (dR/dz). Depths and strains pass through it, never as call arguments or
   * return values: a double crossing a call that V8 does not inline is boxed (a heap allocation).
   */
  readonly io: Float64Array;
  /** the depth of the stepper between steps, and where it stops */
  readonly depth: Float64Array;
  /** a step length handed to levelFor */
  readonly arg: Float64Array;
  /** the step lengths of the ladder, ladderStep(maxStep_nm, k) for k = 0..LEVELS */
  readonly ladder: Float64Array;
  readonly vr: Float64Array;
  readonly vi: Float64Array;
  readonly pr: Float64Array;
  readonly pi: Float64Array;
  /**
   * Phase tables of the step ladder h_k = maxStep 2^(-k/4): for level k,
   * E(c h_k) and E(c h_k)^-1 for the 5 distinct stage offsets c, laid out as
   * [Re E (5n), Im E (5n), Re E^-1 (5n), Im E^-1 (5n)]. Filled on first use
   * and kept for all later columns.
   */
  readonly levels: Array<Float64Array | null>;
  /** the same for a step off the ladder (the last step before a fault or the exit) */
  readonly custom: Float64Array;
  /** the table of the step being taken */
  tab: Float64Array;
  /**
   * Systematic row only: for ladder level k, the matrices E(c h_k)^-1 M E(c h_k) of the 5 stage offsets
   * (layout [stage][re (n^2), im (n^2)]), so that a stage costs one N x N product (filled on first use).
   */
  readonly levelsM: Array<Float64Array | null>;
  /** the rotated matrices of the step being taken, or null (the first step off the ladder of a new length uses tab) */
  rot: Float64Array | null;
  /** the rotated matrices of the step length customH, once that length is taken a second time */
  readonly customRot: Float64Array;
  customRotValid: boolean;
  readonly fr: Float64Array; // phase factors of a fault
  readonly fi: Float64Array;
  /** the strain probe of the running integration */
  probe: StrainProbe | null;
  /** statistics of the last integration */
  readonly stats: { accepted: number; rejected: number; evaluations: number };
  /** ladder level the last march would have used next (stretchMatrixN can start from it) */
  lastLevel: number;
  /** step length whose phase table `custom` holds (NaN: none) */
  customH: number;
  /** work arrays of stretchMatrixN (made on first use) */
  matrix: MatrixWork | null;
}

const DEFAULT_MAX_STEP_NM = 5;
/** steps are taken from the ladder maxStep 2^(-k/4), k = 0..LEVELS (so the phase tables can be reused) */
const LEVELS = 160;

/** Prepare a systematic row: beam j has strain factor orders[j] (n_j). */
export function prepareColumnSystem(input: ManyBeamInput, orders: Float64Array, options: ColumnOptions): ColumnSystem {
  if (orders.length !== input.excitationErrors_per_nm.length) {
    throw new InternalError(`orders has ${orders.length} entries: give one order n_j per beam (${input.excitationErrors_per_nm.length}).`);
  }
  return prepare(input, Float64Array.from(orders), 1, options);
}

/** Prepare a general beam set: beamVectors_per_nm holds the Cartesian g_j (N x 3, nm^-1). */
export function prepareColumnSystemVector(
  input: ManyBeamInput,
  beamVectors_per_nm: Float64Array,
  options: ColumnOptions,
): ColumnSystem {
  const n = input.excitationErrors_per_nm.length;
  if (beamVectors_per_nm.length !== 3 * n) {
    throw new InternalError(`beamVectors_per_nm has ${beamVectors_per_nm.length} numbers: give 3 per beam (${3 * n}).`);
  }
  return prepare(input, Float64Array.from(beamVectors_per_nm), 3, options);
}

function prepare(input: ManyBeamInput, factors: Float64Array, strainDim: 1 | 3, options: ColumnOptions): ColumnSystem {
  for (let i = 0; i < factors.length; i++) {
    if (!Number.isFinite(factors[i])) throw new InternalError(`beam strain factor [${i}] is not finite: give finite numbers.`);
  }
  const maxStep = options.maxStep_nm ?? DEFAULT_MAX_STEP_NM;
  if (!(Number.isFinite(maxStep) && maxStep > 0)) {
    throw new InternalError(`maxStep_nm is ${maxStep}: give a positive step in nm.`);
  }
  const waves = blochWaves(input, options.incident);
  const n = waves.n;
  // the Bloch-wave excitations C^-1 phi(0) are the state at the entrance surface
  const psi0Re = waves.excitationRe;
  const psi0Im = waves.excitationIm;
  // M = C^-1 diag(n_j) C for a systematic row
  const mRe = new Float64Array(strainDim === 1 ? n * n : 0);
  const mIm = new Float64Array(strainDim === 1 ? n * n : 0);
  if (strainDim === 1) {
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        let a = 0;
        let b = 0;
        for (let k = 0; k < n; k++) {
          // cInv[i,k] f_k C[k,j]
          const xr = waves.cInvRe[i * n + k] * factors[k];
          const xi = waves.cInvIm[i * n + k] * factors[k];
          a += xr * waves.cRe[k * n + j] - xi * waves.cIm[k * n + j];
          b += xr * waves.cIm[k * n + j] + xi * waves.cRe[k * n + j];
        }
        mRe[i * n + j] = a;
        mIm[i * n + j] = b;
      }
    }
  }
  const f = (): Float64Array => new Float64Array(n);
  const work: Work = {
    ur: f(),
    ui: f(),
    yr: f(),
    yi: f(),
    kr: Array.from({ length: 7 }, f),
    ki: Array.from({ length: 7 }, f),
    d: f(),
    io: new Float64Array(4),
    arg: new Float64Array(1),
    depth: new Float64Array(2),
    ladder: Float64Array.from({ length: LEVELS + 1 }, (_, k) => ladderStep(maxStep, k)),
    vr: f(),
    vi: f(),
    pr: f(),
    pi: f(),
    levels: new Array<Float64Array | null>(LEVELS + 1).fill(null),
    custom: new Float64Array(20 * n),
    tab: new Float64Array(20 * n),
    levelsM: new Array<Float64Array | null>(LEVELS + 1).fill(null),
    rot: null,
    customRot: new Float64Array(strainDim === 1 ? 10 * n * n : 0),
    customRotValid: false,
    fr: f(),
    fi: f(),
    probe: null,
    stats: { accepted: 0, rejected: 0, evaluations: 0 },
    lastLevel: -1,
    customH: NaN,
    matrix: null,
  };
  return {
    n,
    strainDim,
    factors,
    gammaRe: waves.gammaRe_per_nm,
    gammaIm: waves.gammaIm_per_nm,
    cRe: waves.cRe,
    cIm: waves.cIm,
    cInvRe: waves.cInvRe,
    cInvIm: waves.cInvIm,
    mRe,
    mIm,
    psi0Re,
    psi0Im,
    maxStep_nm: maxStep,
    work,
  };
}

/**
 * Integrate one column of a systematic row through thickness_nm with
 * beta'(z) = d(g.R)/dz of the fundamental g (beam j gets n_j beta').
 * Writes phi(t) interleaved into out (2N). tol is the local error allowed per
 * step on the Bloch-wave amplitudes (absolute; amplitudes are of order 1).
 * faults holds pairs [z_nm, alpha_rad] sorted by depth (the two-beam
 * engine's format): beam j gets exp(+i n_j alpha) at z, alpha =
 * 2 pi g.(R_below - R_above); alpha = 0 marks a breakpoint. Depths must lie in
 * [0, thickness]. Returns the number of accepted steps.
 */
export function integrateColumnN(
  out: Float64Array,
  system: ColumnSystem,
  thickness_nm: number,
  betaPrime: (z_nm: number) => number,
  tol = 1e-6,
  faults: Float64Array = NO_JUMPS,
): number {
  return integrateColumnNProbe(out, system, thickness_nm, scalarProbe(betaPrime), tol, faults);
}

/**
 * The strain of a column as a probe that allocates nothing per call: it reads the depth io[0] (nm) and
 * writes beta' into io[1] (systematic row) or dR/dz into io[1..3] (general beam set). Every number passes
 * through the array: a double passed to or returned from a call that V8 does not inline is boxed (a heap
 * allocation per call), so the renderer's hot path uses this form.
 */
export type StrainProbe = (io: Float64Array) => void;

/** A probe calling betaPrime(z) (for callers with a scalar function; its return value may be boxed per call). */
function scalarProbe(betaPrime: (z_nm: number) => number): StrainProbe {
  return (io) => {
    io[1] = betaPrime(io[0]);
  };
}

/** integrateColumnN with the strain given as a probe (io[0] = z in, io[1] = beta' out). */
export function integrateColumnNProbe(
  out: Float64Array,
  system: ColumnSystem,
  thickness_nm: number,
  probe: StrainProbe,
  tol = 1e-6,
  faults: Float64Array = NO_JUMPS,
): number {
  if (system.strainDim !== 1) throw new InternalError('this column system was prepared for a general beam set: use integrateColumnNVector.');
  return integrate(out, system, thickness_nm, probe, tol, faults, 2);
}

/**
 * Integrate one column of a general beam set with dR/dz (Cartesian, nm/nm)
 * supplied by dRdz(z, out3). Beam j gets g_j . dR/dz. faults holds records
 * [z_nm, dRx, dRy, dRz] (Delta R = R_below - R_above, Cartesian nm) sorted by
 * depth: beam j gets exp(+2 pi i g_j . Delta R) at z. Otherwise as
 * integrateColumnN.
 */
export function integrateColumnNVector(
  out: Float64Array,
  system: ColumnSystem,
  thickness_nm: number,
  dRdz: (z_nm: number, out3: Float64Array) => void,
  tol = 1e-6,
  faults: Float64Array = NO_JUMPS,
): number {
  const w = new Float64Array(3);
  const probe: StrainProbe = (io) => {
    dRdz(io[0], w);
    io[1] = w[0];
    io[2] = w[1];
    io[3] = w[2];
  };
  return integrateColumnNVectorProbe(out, system, thickness_nm, probe, tol, faults);
}

/** integrateColumnNVector with the strain given as a probe (io[0] = z in, io[1..3] = dR/dz out). */
export function integrateColumnNVectorProbe(
  out: Float64Array,
  system: ColumnSystem,
  thickness_nm: number,
  probe: StrainProbe,
  tol = 1e-6,
  faults: Float64Array = NO_JUMPS,
): number {
  if (system.strainDim !== 3) throw new InternalError('this column system was prepared for a systematic row: use integrateColumnN.');
  return integrate(out, system, thickness_nm, probe, tol, faults, 4);
}

const NO_JUMPS = new Float64Array(0);

// Dormand-Prince 5(4) coefficients (Hairer, Norsett & Wanner, Table 5.2)
const C2 = 1 / 5, C3 = 3 / 10, C4 = 4 / 5, C5 = 8 / 9;
const A21 = 1 / 5;
const A31 = 3 / 40, A32 = 9 / 40;
const A41 = 44 / 45, A42 = -56 / 15, A43 = 32 / 9;
const A51 = 19372 / 6561, A52 = -25360 / 2187, A53 = 64448 / 6561, A54 = -212 / 729;
const A61 = 9017 / 3168, A62 = -355 / 33, A63 = 46732 / 5247, A64 = 49 / 176, A65 = -5103 / 18656;
const A71 = 35 / 384, A73 = 500 / 1113, A74 = 125 / 192, A75 = -2187 / 6784, A76 = 11 / 84;
const E1 = 71 / 57600, E3 = -71 / 16695, E4 = 71 / 1920, E5 = -17253 / 339200, E6 = 22 / 525, E7 = -1 / 40;

const TWO_PI = 2 * Math.PI;

/**
 * The error for a non-finite strain near the depth at[0]. The depth comes in an array: the stepper's depth
 * variable passed as an argument, even on this throwing branch, would make the optimiser keep it boxed
 * (a heap number allocated every step).
 */
function strainError(at: Float64Array): InternalError {
  const z = at[0];
  return new InternalError(
    `the strain term (beta' or dR/dz) is not finite near depth ${z.toPrecision(6)} nm: check the displacement field of the defects.`,
  );
}

/** Stage offsets c of the 5 distinct non-zero stage depths (c6 = c7 = 1). */
const STAGE_C = [C2, C3, C4, C5, 1];

/** Tabulate E(c h) and its inverse for the 5 stage offsets c into tab (layout of Work.levels). */
function tabulateE(sys: ColumnSystem, h: number, tab: Float64Array): void {
  const n = sys.n;
  const { gammaRe, gammaIm } = sys;
  for (let s = 0; s < 5; s++) {
    const tau = STAGE_C[s] * h;
    for (let j = 0; j < n; j++) {
      const a = TWO_PI * gammaIm[j] * tau;
      const ph = TWO_PI * gammaRe[j] * tau;
      const c = Math.cos(ph);
      const sn = Math.sin(ph);
      const m = Math.exp(-a);
      const mi = 1 / m;
      const at = s * n + j;
      tab[at] = m * c;
      tab[5 * n + at] = m * sn;
      tab[10 * n + at] = mi * c;
      tab[15 * n + at] = -mi * sn;
    }
  }
}

/** Step length of ladder level k. */
function ladderStep(hmax: number, k: number): number {
  return hmax * Math.pow(2, -k / 4);
}

/**
 * Ladder level of the largest ladder step not longer than h = at[0] (handed over in an array: a double
 * argument of a call V8 does not inline is boxed, and this one runs every step).
 */
function levelFor(hmax: number, at: Float64Array): number {
  const h = at[0];
  if (!(h < hmax)) return 0;
  // an integer in [0, LEVELS]; `| 0` keeps it a small integer for the optimiser (a double level would be boxed)
  const k = Math.ceil(-4 * Math.log2(h / hmax) - 1e-9) | 0;
  return k > LEVELS ? LEVELS : k;
}

/** The phase table of ladder level k (computed on first use). */
function levelTable(sys: ColumnSystem, k: number): Float64Array {
  const levels = sys.work.levels;
  let t = levels[k];
  if (t === null) {
    t = new Float64Array(20 * sys.n);
    tabulateE(sys, sys.work.ladder[k], t);
    levels[k] = t;
  }
  return t;
}

/**
 * Systematic row: the rotated matrices E(c h_k)^-1 M E(c h_k) of ladder level k for the 5 stage offsets c
 * (computed on first use from the level's phase table).
 */
function levelRotated(sys: ColumnSystem, k: number, tab: Float64Array): Float64Array {
  const levelsM = sys.work.levelsM;
  let r = levelsM[k];
  if (r === null) {
    r = new Float64Array(10 * sys.n * sys.n);
    rotate(sys, tab, r);
    levelsM[k] = r;
  }
  return r;
}

/** r = E(c h)^-1 M E(c h) for the 5 stage offsets c of the phase table tab (layout of Work.levelsM). */
function rotate(sys: ColumnSystem, tab: Float64Array, r: Float64Array): void {
  {
    const n = sys.n;
    const nn = n * n;
    const { mRe, mIm } = sys;
    for (let s = 0; s < 5; s++) {
      const o = 2 * nn * s;
      for (let i = 0; i < n; i++) {
        // E^-1_i M_ij E_j
        const ar = tab[10 * n + s * n + i];
        const ai = tab[15 * n + s * n + i];
        for (let j = 0; j < n; j++) {
          const er = tab[s * n + j];
          const ei = tab[5 * n + s * n + j];
          const xr = mRe[i * n + j] * er - mIm[i * n + j] * ei;
          const xi = mRe[i * n + j] * ei + mIm[i * n + j] * er;
          r[o + i * n + j] = ar * xr - ai * xi;
          r[o + nn + i * n + j] = ar * xi + ai * xr;
        }
      }
    }
  }
}

/** General beam set: the strain term g_j . dR/dz of every beam at the depth work.io[0] into work.d. */
function fillStrain(sys: ColumnSystem): void {
  const wk = sys.work;
  const n = sys.n;
  const d = wk.d;
  const f = sys.factors;
  const io = wk.io;
  wk.probe!(io);
  const w0 = io[1], w1 = io[2], w2 = io[3];
  for (let j = 0; j < n; j++) d[j] = f[3 * j] * w0 + f[3 * j + 1] * w1 + f[3 * j + 2] * w2;
}

/**
 * Right-hand side f = 2 pi i E^-1 C^-1 D(z) C E u at the depth z = work.io[0] (set by the caller: a depth
 * passed as an argument would be boxed per call), with E = E(c_s h) from the table (s = -1: E = I, the
 * start of the step).
 */
function rhs(sys: ColumnSystem, s: number, ur: Float64Array, ui: Float64Array, fr: Float64Array, fi: Float64Array): void {
  const wk = sys.work;
  const n = sys.n;
  wk.stats.evaluations++;
  // strain: a scalar beta' (systematic row, M = C^-1 diag(n_j) C precomputed) or per-beam d_j
  let scale = TWO_PI;
  let mRe: Float64Array;
  let mIm: Float64Array;
  const d = wk.d;
  if (sys.strainDim === 1) {
    const io = wk.io;
    wk.probe!(io);
    const b = io[1];
    if (b === 0) {
      fr.fill(0);
      fi.fill(0);
      return;
    }
    scale *= b;
    const rot = wk.rot;
    if (s >= 0 && rot !== null) {
      // f = i scale (E^-1 M E)_s u with the rotated matrix of this stage: one N x N product
      const nn = n * n;
      const o = 2 * nn * s;
      for (let i = 0; i < n; i++) {
        let a = 0;
        let c = 0;
        const row = o + i * n;
        for (let j = 0; j < n; j++) {
          const cr = rot[row + j];
          const ci = rot[row + nn + j];
          a += cr * ur[j] - ci * ui[j];
          c += cr * ui[j] + ci * ur[j];
        }
        fr[i] = -scale * c;
        fi[i] = scale * a;
      }
      return;
    }
    mRe = sys.mRe;
    mIm = sys.mIm;
  } else {
    fillStrain(sys);
    let any = false;
    for (let j = 0; j < n; j++) if (d[j] !== 0) any = true; // NaN counts as non-zero
    if (!any) {
      fr.fill(0);
      fi.fill(0);
      return;
    }
    mRe = sys.cRe;
    mIm = sys.cIm;
  }
  const { vr, vi, pr, pi, tab } = wk;
  const off = s * n;
  const offIm = off + 5 * n;
  if (s < 0) {
    for (let j = 0; j < n; j++) {
      vr[j] = ur[j];
      vi[j] = ui[j];
    }
  } else {
    for (let j = 0; j < n; j++) {
      const er = tab[off + j];
      const ei = tab[offIm + j];
      vr[j] = er * ur[j] - ei * ui[j];
      vi[j] = er * ui[j] + ei * ur[j];
    }
  }
  // p = M v (row) or p = D C v (general)
  for (let i = 0; i < n; i++) {
    let a = 0;
    let b = 0;
    const row = i * n;
    for (let j = 0; j < n; j++) {
      const cr = mRe[row + j];
      const ci = mIm[row + j];
      a += cr * vr[j] - ci * vi[j];
      b += cr * vi[j] + ci * vr[j];
    }
    pr[i] = a;
    pi[i] = b;
  }
  if (sys.strainDim === 3) {
    // v = C^-1 D p
    const { cInvRe, cInvIm } = sys;
    for (let j = 0; j < n; j++) {
      pr[j] *= d[j];
      pi[j] *= d[j];
    }
    for (let i = 0; i < n; i++) {
      let a = 0;
      let b = 0;
      const row = i * n;
      for (let j = 0; j < n; j++) {
        const cr = cInvRe[row + j];
        const ci = cInvIm[row + j];
        a += cr * pr[j] - ci * pi[j];
        b += cr * pi[j] + ci * pr[j];
      }
      vr[i] = a;
      vi[i] = b;
    }
  } else {
    for (let i = 0; i < n; i++) {
      vr[i] = pr[i];
      vi[i] = pi[i];
    }
  }
  // f = i scale E^-1 v
  const offInvRe = off + 10 * n;
  const offInvIm = off + 15 * n;
  for (let i = 0; i < n; i++) {
    let qr = vr[i];
    let qi = vi[i];
    if (s >= 0) {
      const er = tab[offInvRe + i];
      const ei = tab[offInvIm + i];
      const a = qr;
      qr = er * a - ei * qi;
      qi = er * qi + ei * a;
    }
    fr[i] = -scale * qi;
    fi[i] = scale * qr;
  }
}

function integrate(
  out: Float64Array,
  sys: ColumnSystem,
  thickness: number,
  probe: StrainProbe,
  tol: number,
  jumps: Float64Array,
  stride: 2 | 4,
): number {
  if (!(Number.isFinite(thickness) && thickness >= 0)) {
    throw new InternalError(`thickness_nm is ${thickness}: give a non-negative thickness in nm.`);
  }
  if (!(Number.isFinite(tol) && tol > 0)) throw new InternalError(`tol is ${tol}: give a positive tolerance such as 1e-6.`);
  if (out.length < 2 * sys.n) throw new InternalError(`out has ${out.length} numbers: give at least 2N = ${2 * sys.n}.`);
  const n = sys.n;
  const wk = sys.work;
  const { ur, ui } = wk;
  wk.probe = probe;
  wk.stats.accepted = 0;
  wk.stats.rejected = 0;
  wk.stats.evaluations = 0;

  // jumps (faults, breakpoints), validated and in depth order
  if (jumps.length % stride !== 0) {
    throw new InternalError(`faults has ${jumps.length} numbers: give records of ${stride} numbers (depth first).`);
  }
  const nJumps = jumps.length / stride;
  for (let q = 0; q < nJumps; q++) {
    const z = jumps[q * stride];
    if (!(Number.isFinite(z) && z >= 0 && z <= thickness)) {
      throw new InternalError(`fault depth ${z} nm lies outside the column: give a depth from 0 to ${thickness} nm.`);
    }
    if (q > 0 && z < jumps[(q - 1) * stride]) throw new InternalError('faults must be sorted by increasing depth: sort them.');
    for (let k = 1; k < stride; k++) {
      if (!Number.isFinite(jumps[q * stride + k])) throw new InternalError(`fault ${q} has a non-finite phase or shift: give finite numbers.`);
    }
  }

  // psi (Bloch amplitudes) lives in ur/ui between steps
  ur.set(sys.psi0Re);
  ui.set(sys.psi0Im);
  const accepted = march(sys, 0, thickness, jumps, nJumps, stride, tol);
  wk.probe = null;

  // phi = C psi
  const { cRe, cIm } = sys;
  for (let i = 0; i < n; i++) {
    let a = 0;
    let b = 0;
    for (let j = 0; j < n; j++) {
      const cr = cRe[i * n + j];
      const ci = cIm[i * n + j];
      a += cr * ur[j] - ci * ui[j];
      b += cr * ui[j] + ci * ur[j];
    }
    out[2 * i] = a;
    out[2 * i + 1] = b;
  }
  return accepted;
}

/** Steps the Bloch amplitudes in work.ur/ui from depth zStart to zStop, applying the jumps on the way. */
function march(sys: ColumnSystem, zStart: number, zStop: number, jumps: Float64Array, nJumps: number, stride: 2 | 4, tol: number, startLevel = -1): number {
  const n = sys.n;
  const wk = sys.work;
  const { ur, ui, yr, yi, kr, ki, io, arg, ladder } = wk;
  const hmax = sys.maxStep_nm;
  // The depth lives in an array between steps, not in a loop variable: TurboFan kept that variable (a phi
  // mixing the untyped parameter with doubles) boxed and allocated a heap number for it every step
  // (seen with --print-opt-code, measured with bench/heapSampling.mjs).
  const depth = wk.depth;
  depth[0] = zStart;
  depth[1] = zStop;
  let jumpIdx = 0;
  let accepted = 0;
  let rejected = 0;
  let fsalValid = false;
  let level = startLevel | 0; // ladder level of the next step; -1: choose a fresh first step
  const k1r = kr[0], k1i = ki[0], k2r = kr[1], k2i = ki[1], k3r = kr[2], k3i = ki[2];
  const k4r = kr[3], k4i = ki[3], k5r = kr[4], k5i = ki[4], k6r = kr[5], k6i = ki[5], k7r = kr[6], k7i = ki[6];
  const tol2 = tol * tol;

  for (;;) {
    const z = depth[0];
    // apply the jumps sitting at the current depth
    while (jumpIdx < nJumps && jumps[jumpIdx * stride] <= z) {
      applyJump(sys, jumps, jumpIdx * stride);
      jumpIdx++;
      fsalValid = false;
      level = -1;
    }
    const stop = depth[1];
    if (z >= stop) break;
    const zEnd = jumpIdx < nJumps ? jumps[jumpIdx * stride] : stop;

    if (!fsalValid) {
      io[0] = z;
      rhs(sys, -1, ur, ui, k1r, k1i);
      if (level < 0) {
        // largest |g_j . dR/dz| at z (left by rhs in w or d)
        let dmax = 0;
        if (sys.strainDim === 1) {
          for (let j = 0; j < n; j++) dmax = Math.max(dmax, Math.abs(sys.factors[j] * io[1]));
        } else {
          for (let j = 0; j < n; j++) dmax = Math.max(dmax, Math.abs(wk.d[j]));
        }
        if (!Number.isFinite(dmax)) {
          arg[0] = z;
          throw strainError(arg);
        }
        arg[0] = 0.05 / (TWO_PI * dmax + 1e-300);
        level = levelFor(hmax, arg);
      }
      fsalValid = true;
    }
    let h = ladder[level];
    let lastStep = false;
    if (z + h >= zEnd || zEnd - (z + h) < 1e-12 * Math.max(1, zEnd)) {
      h = zEnd - z;
      lastStep = true;
      if (h !== wk.customH) {
        tabulateE(sys, h, wk.custom);
        wk.customH = h; // the columns of one stretch matrix end with the same step: tabulated once
        wk.customRotValid = false;
        wk.rot = null;
      } else if (sys.strainDim === 1) {
        // the same length again (stretches of the translation method): worth the rotated matrices
        if (!wk.customRotValid) {
          rotate(sys, wk.custom, wk.customRot);
          wk.customRotValid = true;
        }
        wk.rot = wk.customRot;
      } else wk.rot = null;
      wk.tab = wk.custom;
    } else {
      wk.tab = levelTable(sys, level);
      wk.rot = sys.strainDim === 1 ? levelRotated(sys, level, wk.tab) : null;
    }
    const tab = wk.tab;
    for (let j = 0; j < n; j++) {
      yr[j] = ur[j] + h * A21 * k1r[j];
      yi[j] = ui[j] + h * A21 * k1i[j];
    }
    io[0] = z + C2 * h;
    rhs(sys, 0, yr, yi, k2r, k2i);
    for (let j = 0; j < n; j++) {
      yr[j] = ur[j] + h * (A31 * k1r[j] + A32 * k2r[j]);
      yi[j] = ui[j] + h * (A31 * k1i[j] + A32 * k2i[j]);
    }
    io[0] = z + C3 * h;
    rhs(sys, 1, yr, yi, k3r, k3i);
    for (let j = 0; j < n; j++) {
      yr[j] = ur[j] + h * (A41 * k1r[j] + A42 * k2r[j] + A43 * k3r[j]);
      yi[j] = ui[j] + h * (A41 * k1i[j] + A42 * k2i[j] + A43 * k3i[j]);
    }
    io[0] = z + C4 * h;
    rhs(sys, 2, yr, yi, k4r, k4i);
    for (let j = 0; j < n; j++) {
      yr[j] = ur[j] + h * (A51 * k1r[j] + A52 * k2r[j] + A53 * k3r[j] + A54 * k4r[j]);
      yi[j] = ui[j] + h * (A51 * k1i[j] + A52 * k2i[j] + A53 * k3i[j] + A54 * k4i[j]);
    }
    io[0] = z + C5 * h;
    rhs(sys, 3, yr, yi, k5r, k5i);
    for (let j = 0; j < n; j++) {
      yr[j] = ur[j] + h * (A61 * k1r[j] + A62 * k2r[j] + A63 * k3r[j] + A64 * k4r[j] + A65 * k5r[j]);
      yi[j] = ui[j] + h * (A61 * k1i[j] + A62 * k2i[j] + A63 * k3i[j] + A64 * k4i[j] + A65 * k5i[j]);
    }
    const zNext = lastStep ? zEnd : z + h;
    io[0] = zNext;
    rhs(sys, 4, yr, yi, k6r, k6i);
    for (let j = 0; j < n; j++) {
      yr[j] = ur[j] + h * (A71 * k1r[j] + A73 * k3r[j] + A74 * k4r[j] + A75 * k5r[j] + A76 * k6r[j]);
      yi[j] = ui[j] + h * (A71 * k1i[j] + A73 * k3i[j] + A74 * k4i[j] + A75 * k5i[j] + A76 * k6i[j]);
    }
    io[0] = zNext;
    rhs(sys, 4, yr, yi, k7r, k7i);
    // local error, weighted by |E(h)| so that it measures the Bloch amplitudes at z + h
    let err2 = 0;
    const off = 4 * n;
    const offIm = 9 * n;
    for (let j = 0; j < n; j++) {
      const xr = h * (E1 * k1r[j] + E3 * k3r[j] + E4 * k4r[j] + E5 * k5r[j] + E6 * k6r[j] + E7 * k7r[j]);
      const xi = h * (E1 * k1i[j] + E3 * k3i[j] + E4 * k4i[j] + E5 * k5i[j] + E6 * k6i[j] + E7 * k7i[j]);
      const e2 = (xr * xr + xi * xi) * (tab[off + j] * tab[off + j] + tab[offIm + j] * tab[offIm + j]);
      err2 = Math.max(err2, e2); // propagates NaN
    }
    const err = Math.sqrt(err2 / tol2);
    if (!Number.isFinite(err)) {
      arg[0] = z;
      throw strainError(arg);
    }
    if (err <= 1 || level >= LEVELS) {
      // accept: re-anchor, psi(z + h) = E(h) u(h); FSAL derivative k7 -> E(h) k7
      for (let j = 0; j < n; j++) {
        const er = tab[off + j];
        const ei = tab[offIm + j];
        const a = yr[j], b = yi[j];
        ur[j] = er * a - ei * b;
        ui[j] = er * b + ei * a;
        const c = k7r[j], e = k7i[j];
        k1r[j] = er * c - ei * e;
        k1i[j] = er * e + ei * c;
      }
      accepted++;
      depth[0] = zNext;
      const fac = err < 3e-4 ? 5 : Math.min(5, 0.9 * Math.pow(err, -0.2));
      arg[0] = h * fac;
      level = levelFor(hmax, arg);
    } else {
      rejected++;
      arg[0] = h * Math.max(0.2, 0.9 * Math.pow(err, -0.2));
      level = Math.max(level + 1, levelFor(hmax, arg));
      if (level > LEVELS) level = LEVELS;
    }
  }
  wk.stats.accepted = accepted;
  wk.stats.rejected = rejected;
  wk.lastLevel = level;
  return accepted;
}

/** psi <- C^-1 diag(phase) C psi for the fault record jumps[at..]. */
function applyJump(sys: ColumnSystem, jumps: Float64Array, at: number): void {
  const n = sys.n;
  const { ur, ui, vr, vi, fr, fi } = sys.work;
  const f = sys.factors;
  let trivial = true;
  for (let j = 0; j < n; j++) {
    // phase angle of beam j: n_j alpha (row) or 2 pi g_j . Delta R (general)
    const ang =
      sys.strainDim === 3
        ? TWO_PI * (f[3 * j] * jumps[at + 1] + f[3 * j + 1] * jumps[at + 2] + f[3 * j + 2] * jumps[at + 3])
        : f[j] * jumps[at + 1];
    fr[j] = Math.cos(ang);
    fi[j] = Math.sin(ang);
    if (ang !== 0) trivial = false;
  }
  if (trivial) return; // a breakpoint
  const { cRe, cIm, cInvRe, cInvIm } = sys;
  for (let i = 0; i < n; i++) {
    let a = 0;
    let b = 0;
    for (let j = 0; j < n; j++) {
      a += cRe[i * n + j] * ur[j] - cIm[i * n + j] * ui[j];
      b += cRe[i * n + j] * ui[j] + cIm[i * n + j] * ur[j];
    }
    vr[i] = fr[i] * a - fi[i] * b;
    vi[i] = fr[i] * b + fi[i] * a;
  }
  for (let i = 0; i < n; i++) {
    let a = 0;
    let b = 0;
    for (let j = 0; j < n; j++) {
      a += cInvRe[i * n + j] * vr[j] - cInvIm[i * n + j] * vi[j];
      b += cInvRe[i * n + j] * vi[j] + cInvIm[i * n + j] * vr[j];
    }
    ur[i] = a;
    ui[i] = b;
  }
}

/** Statistics of the last integration with this system (accepted, rejected steps, right-hand-side evaluations). */
export function lastIntegrationStats(system: ColumnSystem): { accepted: number; rejected: number; evaluations: number } {
  return { ...system.work.stats };
}

/** Work arrays of stretchMatrixN (N x N, re and im apart): state, trial, 7 stages. */
interface MatrixWork {
  readonly ur: Float64Array;
  readonly ui: Float64Array;
  readonly yr: Float64Array;
  readonly yi: Float64Array;
  readonly kr: Float64Array[];
  readonly ki: Float64Array[];
  /** the error sum of stages 1 .. 6 of a step */
  readonly sr: Float64Array;
  readonly si: Float64Array;
  /** beta' at the 6 distinct stage depths of a step, and the step length (index 6) */
  readonly beta: Float64Array;
  /**
   * Phase tables and rotated matrices of the last two step lengths off the ladder: the stretches of the
   * translation method alternate between two lengths (window starts and ends D apart).
   */
  readonly slotH: Float64Array;
  readonly slotTab: Float64Array[];
  readonly slotRot: Float64Array[];
  nextSlot: number;
  /** the first-step words (see buildWords) of the two slots (null: not built for the slot's length yet) and of the ladder levels */
  readonly slotWords: Array<Float64Array | null>;
  readonly levelWords: Array<Float64Array | null>;
  /** the coefficients of the words in one first step */
  readonly coef: Float64Array;
}
/** The stretch work arrays of sys (the making apart, so that a call allocates nothing). */
function matrixWork(sys: ColumnSystem): MatrixWork {
  return sys.work.matrix ?? newMatrixWork(sys);
}

function newMatrixWork(sys: ColumnSystem): MatrixWork {
  {
    const f = (): Float64Array => new Float64Array(sys.n * sys.n);
    const n = sys.n;
    const w: MatrixWork = {
      ur: f(),
      ui: f(),
      yr: f(),
      yi: f(),
      kr: Array.from({ length: 7 }, f),
      ki: Array.from({ length: 7 }, f),
      sr: f(),
      si: f(),
      beta: new Float64Array(7),
      slotH: Float64Array.of(NaN, NaN),
      slotTab: [new Float64Array(20 * n), new Float64Array(20 * n)],
      slotRot: [new Float64Array(10 * n * n), new Float64Array(10 * n * n)],
      nextSlot: 0,
      slotWords: [null, null],
      levelWords: new Array<Float64Array | null>(LEVELS + 1).fill(null),
      coef: new Float64Array(WORDS),
    };
    sys.work.matrix = w;
    return w;
  }
}

/**
 * K = i 2 pi beta' R Y for an N x N matrix Y (re/im apart), R = M (s = -1) or the rotated matrix of
 * stage s in rot, beta' = beta[at] (numbers pass through typed arrays in the stepper: no boxing per call).
 * beta' = 0 gives K = 0.
 */
function rhsMatrix(sys: ColumnSystem, beta: Float64Array, at: number, rot: Float64Array, s: number, yr: Float64Array, yi: Float64Array, kr: Float64Array, ki: Float64Array): void {
  const n = sys.n;
  const nn = n * n;
  const b = beta[at];
  if (b === 0) {
    kr.fill(0);
    ki.fill(0);
    return;
  }
  const scale = TWO_PI * b;
  let rr: Float64Array, ri: Float64Array, o: number, oi: number;
  if (s < 0) {
    rr = sys.mRe;
    ri = sys.mIm;
    o = 0;
    oi = 0;
  } else {
    rr = rot;
    ri = rot;
    o = 2 * nn * s;
    oi = o + nn;
  }
  // K_ij = i scale sum_k R_ik Y_kj, two columns j at a time (each R_ik read once for both)
  for (let i = 0; i < n; i++) {
    const row = i * n;
    let j = 0;
    for (; j + 1 < n; j += 2) {
      let re0 = 0, im0 = 0, re1 = 0, im1 = 0;
      for (let k = 0, kj = j; k < n; k++, kj += n) {
        const ar = rr[o + row + k];
        const ai = ri[oi + row + k];
        const br0 = yr[kj], bi0 = yi[kj], br1 = yr[kj + 1], bi1 = yi[kj + 1];
        re0 += ar * br0 - ai * bi0;
        im0 += ar * bi0 + ai * br0;
        re1 += ar * br1 - ai * bi1;
        im1 += ar * bi1 + ai * br1;
      }
      kr[row + j] = -scale * im0;
      ki[row + j] = scale * re0;
      kr[row + j + 1] = -scale * im1;
      ki[row + j + 1] = scale * re1;
    }
    if (j < n) {
      let re = 0, im = 0;
      for (let k = 0, kj = j; k < n; k++, kj += n) {
        const ar = rr[o + row + k];
        const ai = ri[oi + row + k];
        re += ar * yr[kj] - ai * yi[kj];
        im += ar * yi[kj] + ai * yr[kj];
      }
      kr[row + j] = -scale * im;
      ki[row + j] = scale * re;
    }
  }
}

/**
 * First step of a stretch from the identity, by words. With the state I at the start of a step, the stage
 * derivatives of the stepper are K_1 = sigma_1 G_1 and K_s = sigma_s G_s (I + h sum_{j<s} a_sj K_j), with
 * sigma_s = 2 pi i beta'(z + c_s h), G_1 = M and G_s the rotated matrix of stage s. Expanded, K_s is a sum over
 * the subsets W of {1 .. s-1} of fixed products ("words") P_{s,W} = G_s P_{m, W \ m} (m the largest member of
 * W, P_{s,{}} = G_s) with scalar coefficients r_{s,W} i^(|W|+1), r_{s,{}} = 2 pi beta'_s and
 * r_{s,W} = 2 pi beta'_s h a_sm r_{m, W \ m}. The words depend only on the step length, so K_2 .. K_4 cost 2, 4
 * and 8 scaled sums of N x N matrices instead of an N x N product each (the same numbers up to rounding).
 */
const WORD_STAGES = 4;
/** Words of stages 1 .. WORD_STAGES: stage s holds 2^(s-1) of them from index 2^(s-1) - 1. */
const WORDS = (1 << WORD_STAGES) - 1;
/** Dormand-Prince a_sm of the stages expanded into words (row s, column m; 1-based, 0 unused). */
const A_WORDS = [[], [], [0, A21], [0, A31, A32], [0, A41, A42, A43]];

/** Offsets of the packed words of stages 2 .. WORD_STAGES in units of n^2 (see buildWords), and their total. */
const PACKED_AT = [0, 0, 0, 4, 12];
const PACKED = 28;

/**
 * The words P_{s,W} of the first step for the rotated matrices rot, packed for wordStage: for stage s
 * (2 .. WORD_STAGES) with nw = 2^(s-1) words, from n^2 PACKED_AT[s], the part of every word that lands in
 * the real part of K_s with the sign of i^(|W|+1) folded in, element-major ([t][w], n^2 x nw), then the same
 * for the imaginary part.
 */
function buildWords(sys: ColumnSystem, rot: Float64Array): Float64Array {
  const n = sys.n;
  const nn = n * n;
  // raw words, [word][re (n^2), im (n^2)], stage s from index 2^(s-1) - 1
  const raw = new Float64Array(WORDS * 2 * nn);
  for (let s = 1; s <= WORD_STAGES; s++) {
    const base = (1 << (s - 1)) - 1;
    const g = 2 * nn * base;
    // G_s: stage 1 M, stage s >= 2 the rotated matrix of stage offset index s - 2
    if (s === 1) {
      raw.set(sys.mRe, g);
      raw.set(sys.mIm, g + nn);
    } else raw.set(rot.subarray(2 * nn * (s - 2), 2 * nn * (s - 1)), g);
    for (let w = 1; w < 1 << (s - 1); w++) {
      const m = 32 - Math.clz32(w);
      const rest = w & ~(1 << (m - 1));
      const o = 2 * nn * (base + w);
      const p = 2 * nn * ((1 << (m - 1)) - 1 + rest);
      for (let i = 0; i < n; i++) {
        for (let j = 0; j < n; j++) {
          let re = 0;
          let im = 0;
          for (let k = 0; k < n; k++) {
            const ar = raw[g + i * n + k];
            const ai = raw[g + nn + i * n + k];
            const br = raw[p + k * n + j];
            const bi = raw[p + nn + k * n + j];
            re += ar * br - ai * bi;
            im += ar * bi + ai * br;
          }
          raw[o + i * n + j] = re;
          raw[o + nn + i * n + j] = im;
        }
      }
    }
  }
  const out = new Float64Array(PACKED * nn);
  for (let s = 2; s <= WORD_STAGES; s++) {
    const nw = 1 << (s - 1);
    const base = nw - 1;
    const x = PACKED_AT[s] * nn;
    const y = x + nw * nn;
    for (let w = 0; w < nw; w++) {
      let pow = 1;
      for (let v = w; v !== 0; v &= v - 1) pow++;
      // r i^pow (P_re + i P_im): real part +-r P_re or +-r P_im, imaginary part the other
      const q = pow & 3;
      const o = 2 * nn * (base + w);
      const xo = q === 1 || q === 3 ? o + nn : o;
      const yo = q === 1 || q === 3 ? o : o + nn;
      const xs = q === 0 || q === 3 ? 1 : -1;
      const ys = q === 0 || q === 1 ? 1 : -1;
      for (let t = 0; t < nn; t++) {
        out[x + t * nw + w] = xs * raw[xo + t];
        out[y + t * nw + w] = ys * raw[yo + t];
      }
    }
  }
  return out;
}

/**
 * K_s of a first step from the identity for stage s (2 .. WORD_STAGES) into kr, ki from the packed words
 * (buildWords): the coefficients r of the stages below s are in coef (filled here for stage s), beta' of
 * stage s is beta[s - 1], the step beta[6].
 */
function wordStage(words: Float64Array, coef: Float64Array, beta: Float64Array, nn: number, s: number, kr: Float64Array, ki: Float64Array): void {
  const sb = TWO_PI * beta[s - 1];
  const h = beta[6];
  const nw = 1 << (s - 1);
  const base = nw - 1;
  const a = A_WORDS[s];
  coef[base] = sb;
  for (let w = 1; w < nw; w++) {
    const m = 32 - Math.clz32(w);
    coef[base + w] = sb * h * a[m] * coef[(1 << (m - 1)) - 1 + (w & ~(1 << (m - 1)))];
  }
  const x = PACKED_AT[s] * nn;
  const y = x + nw * nn;
  if (s === 2) {
    const r0 = coef[1], r1 = coef[2];
    for (let t = 0, u = x, v = y; t < nn; t++, u += 2, v += 2) {
      kr[t] = r0 * words[u] + r1 * words[u + 1];
      ki[t] = r0 * words[v] + r1 * words[v + 1];
    }
  } else if (s === 3) {
    const r0 = coef[3], r1 = coef[4], r2 = coef[5], r3 = coef[6];
    for (let t = 0, u = x, v = y; t < nn; t++, u += 4, v += 4) {
      kr[t] = r0 * words[u] + r1 * words[u + 1] + r2 * words[u + 2] + r3 * words[u + 3];
      ki[t] = r0 * words[v] + r1 * words[v + 1] + r2 * words[v + 2] + r3 * words[v + 3];
    }
  } else {
    const r0 = coef[7], r1 = coef[8], r2 = coef[9], r3 = coef[10], r4 = coef[11], r5 = coef[12], r6 = coef[13], r7 = coef[14];
    for (let t = 0, u = x, v = y; t < nn; t++, u += 8, v += 8) {
      kr[t] = r0 * words[u] + r1 * words[u + 1] + r2 * words[u + 2] + r3 * words[u + 3] + r4 * words[u + 4] + r5 * words[u + 5] + r6 * words[u + 6] + r7 * words[u + 7];
      ki[t] = r0 * words[v] + r1 * words[v + 1] + r2 * words[v + 2] + r3 * words[v + 3] + r4 * words[v + 4] + r5 * words[v + 5] + r6 * words[v + 6] + r7 * words[v + 7];
    }
  }
}

/** y += u for the state u of the step (u = I on a first step: only the diagonal). */
function addState(yr: Float64Array, yi: Float64Array, ur: Float64Array, ui: Float64Array, n: number, identity: boolean): void {
  if (identity) {
    for (let i = 0; i < n; i++) yr[i * n + i] += 1;
    return;
  }
  for (let q = 0; q < n * n; q++) {
    yr[q] = ur[q] + yr[q];
    yi[q] = ui[q] + yi[q];
  }
}

/**
 * The transfer matrix T(b, a) of a systematic row from depth a to depth b > a through beta'(z), in the
 * Bloch-wave basis, into T at offset to (N x N, interleaved [re, im], row-major): column j is the unit
 * Bloch amplitude vector e_j propagated by the stepper of integrateColumnN, all columns on one step
 * sequence (each step's error is the largest over the columns, so each column meets tol). beta' is
 * evaluated once per stage for all columns. startLevel: the ladder level of the first step (-1: a fresh
 * first step, as the column path takes after a fault or breakpoint); the level the march would take next
 * is left in sys.work.lastLevel. Returns the number of accepted steps. Used by the translation method for
 * the matrix of a stretch.
 */
export function stretchMatrixN(T: Float64Array, to: number, sys: ColumnSystem, a: number, b: number, betaPrime: (z_nm: number) => number, tol: number, startLevel = -1): number {
  return stretchMatrixNProbe(T, to, sys, a, b, scalarProbe(betaPrime), tol, startLevel);
}

/** stretchMatrixN with beta' given as a probe (io[0] = z in, io[1] = beta' out; nothing boxed per call). */
export function stretchMatrixNProbe(T: Float64Array, to: number, sys: ColumnSystem, a: number, b: number, probe: StrainProbe, tol: number, startLevel = -1): number {
  if (sys.strainDim !== 1) throw new InternalError('this column system was prepared for a general beam set: stretchMatrixN takes a systematic row.');
  const n = sys.n;
  const nn = n * n;
  if (T.length < to + 2 * nn) throw new InternalError(`T has ${T.length} numbers: give 2 N^2 = ${2 * nn} from offset ${to}.`);
  const mw = matrixWork(sys);
  const wk = sys.work;
  const { ur, ui, yr, yi, kr, ki, sr, si, beta } = mw;
  const { io, arg, ladder } = wk;
  // the state starts as the identity
  ur.fill(0);
  ui.fill(0);
  for (let i = 0; i < n; i++) ur[i * n + i] = 1;
  let identity = true;
  const hmax = sys.maxStep_nm;
  const k1r = kr[0], k1i = ki[0], k2r = kr[1], k2i = ki[1], k3r = kr[2], k3i = ki[2];
  const k4r = kr[3], k4i = ki[3], k5r = kr[4], k5i = ki[4], k6r = kr[5], k6i = ki[5], k7r = kr[6], k7i = ki[6];
  const tol2 = tol * tol;
  // the depth in an array between steps (see march)
  const depth = wk.depth;
  depth[0] = a;
  depth[1] = b;
  let level = startLevel | 0;
  let accepted = 0;
  let fsalValid = false;
  let written = false; // T holds the result (the last step wrote it)
  for (;;) {
    const z = depth[0];
    const end = depth[1];
    if (!(z < end)) break;
    if (!fsalValid) {
      io[0] = z;
      probe(io);
      beta[0] = io[1];
      if (!Number.isFinite(beta[0])) {
        arg[0] = z;
        throw strainError(arg);
      }
      if (identity) {
        // K1 = i 2 pi beta' M I: no product
        const scale = TWO_PI * beta[0];
        for (let q = 0; q < nn; q++) {
          k1r[q] = -scale * sys.mIm[q];
          k1i[q] = scale * sys.mRe[q];
        }
      } else rhsMatrix(sys, beta, 0, mw.slotRot[0], -1, ur, ui, k1r, k1i);
      if (level < 0) {
        let dmax = 0;
        for (let j = 0; j < n; j++) dmax = Math.max(dmax, Math.abs(sys.factors[j] * beta[0]));
        arg[0] = 0.05 / (TWO_PI * dmax + 1e-300);
        level = levelFor(hmax, arg);
      }
      fsalValid = true;
    }
    let h = ladder[level];
    let lastStep = false;
    let tab: Float64Array;
    let rot: Float64Array;
    let words: Float64Array | null = null;
    if (z + h >= end || end - (z + h) < 1e-12 * Math.max(1, end)) {
      h = end - z;
      lastStep = true;
      let slot = h === mw.slotH[0] ? 0 : h === mw.slotH[1] ? 1 : -1;
      if (slot < 0) {
        slot = mw.nextSlot;
        mw.nextSlot = 1 - slot;
        mw.slotH[slot] = h;
        tabulateE(sys, h, mw.slotTab[slot]);
        rotate(sys, mw.slotTab[slot], mw.slotRot[slot]);
        mw.slotWords[slot] = null;
      }
      tab = mw.slotTab[slot];
      rot = mw.slotRot[slot];
      if (identity) words = mw.slotWords[slot] ??= buildWords(sys, rot);
    } else {
      tab = levelTable(sys, level);
      rot = levelRotated(sys, level, tab);
      if (identity) words = mw.levelWords[level] ??= buildWords(sys, rot);
    }
    io[0] = z + C2 * h;
    probe(io);
    beta[1] = io[1];
    io[0] = z + C3 * h;
    probe(io);
    beta[2] = io[1];
    io[0] = z + C4 * h;
    probe(io);
    beta[3] = io[1];
    if (words !== null) {
      // a first step from the identity: K_2 .. K_4 from the words of this step length
      mw.coef[0] = TWO_PI * beta[0];
      beta[6] = h;
      wordStage(words, mw.coef, beta, nn, 2, k2r, k2i);
      wordStage(words, mw.coef, beta, nn, 3, k3r, k3i);
      wordStage(words, mw.coef, beta, nn, 4, k4r, k4i);
    } else {
      for (let q = 0; q < nn; q++) {
        yr[q] = ur[q] + h * A21 * k1r[q];
        yi[q] = ui[q] + h * A21 * k1i[q];
      }
      rhsMatrix(sys, beta, 1, rot, 0, yr, yi, k2r, k2i);
      for (let q = 0; q < nn; q++) {
        yr[q] = ur[q] + h * (A31 * k1r[q] + A32 * k2r[q]);
        yi[q] = ui[q] + h * (A31 * k1i[q] + A32 * k2i[q]);
      }
      rhsMatrix(sys, beta, 2, rot, 1, yr, yi, k3r, k3i);
      for (let q = 0; q < nn; q++) {
        yr[q] = ur[q] + h * (A41 * k1r[q] + A42 * k2r[q] + A43 * k3r[q]);
        yi[q] = ui[q] + h * (A41 * k1i[q] + A42 * k2i[q] + A43 * k3i[q]);
      }
      rhsMatrix(sys, beta, 3, rot, 2, yr, yi, k4r, k4i);
    }
    // y = u + h sum a K (u = I on a first step: only its diagonal is read)
    for (let q = 0; q < nn; q++) {
      yr[q] = h * (A51 * k1r[q] + A52 * k2r[q] + A53 * k3r[q] + A54 * k4r[q]);
      yi[q] = h * (A51 * k1i[q] + A52 * k2i[q] + A53 * k3i[q] + A54 * k4i[q]);
    }
    addState(yr, yi, ur, ui, n, identity);
    io[0] = z + C5 * h;
    probe(io);
    beta[4] = io[1];
    rhsMatrix(sys, beta, 4, rot, 3, yr, yi, k5r, k5i);
    for (let q = 0; q < nn; q++) {
      yr[q] = h * (A61 * k1r[q] + A62 * k2r[q] + A63 * k3r[q] + A64 * k4r[q] + A65 * k5r[q]);
      yi[q] = h * (A61 * k1i[q] + A62 * k2i[q] + A63 * k3i[q] + A64 * k4i[q] + A65 * k5i[q]);
    }
    addState(yr, yi, ur, ui, n, identity);
    const zNext = lastStep ? end : z + h;
    io[0] = zNext;
    probe(io);
    beta[5] = io[1];
    rhsMatrix(sys, beta, 5, rot, 4, yr, yi, k6r, k6i);
    // y7, and the error sum of the stages before K7 (the same terms in the same order)
    for (let q = 0; q < nn; q++) {
      yr[q] = h * (A71 * k1r[q] + A73 * k3r[q] + A74 * k4r[q] + A75 * k5r[q] + A76 * k6r[q]);
      yi[q] = h * (A71 * k1i[q] + A73 * k3i[q] + A74 * k4i[q] + A75 * k5i[q] + A76 * k6i[q]);
      sr[q] = E1 * k1r[q] + E3 * k3r[q] + E4 * k4r[q] + E5 * k5r[q] + E6 * k6r[q];
      si[q] = E1 * k1i[q] + E3 * k3i[q] + E4 * k4i[q] + E5 * k5i[q] + E6 * k6i[q];
    }
    addState(yr, yi, ur, ui, n, identity);
    rhsMatrix(sys, beta, 5, rot, 4, yr, yi, k7r, k7i);
    // local error of every column, weighted by |E(h)| of its row (the Bloch amplitudes at z + h)
    let err2 = 0;
    const off = 4 * n;
    const offIm = 9 * n;
    for (let i = 0; i < n; i++) {
      const w2 = tab[off + i] * tab[off + i] + tab[offIm + i] * tab[offIm + i];
      for (let j = 0; j < n; j++) {
        const q = i * n + j;
        const xr = h * (sr[q] + E7 * k7r[q]);
        const xi = h * (si[q] + E7 * k7i[q]);
        err2 = Math.max(err2, (xr * xr + xi * xi) * w2); // propagates NaN
      }
    }
    const err = Math.sqrt(err2 / tol2);
    if (!Number.isFinite(err)) {
      arg[0] = z;
      throw strainError(arg);
    }
    if (err <= 1 || level >= LEVELS) {
      if (lastStep) {
        // the end of the stretch: E(h) u(h) straight into T (no derivative for a next step)
        for (let i = 0; i < n; i++) {
          const er = tab[off + i];
          const ei = tab[offIm + i];
          for (let j = 0; j < n; j++) {
            const q = i * n + j;
            const p = yr[q], r = yi[q];
            T[to + 2 * q] = er * p - ei * r;
            T[to + 2 * q + 1] = er * r + ei * p;
          }
        }
        written = true;
      } else {
        for (let i = 0; i < n; i++) {
          const er = tab[off + i];
          const ei = tab[offIm + i];
          for (let j = 0; j < n; j++) {
            const q = i * n + j;
            const p = yr[q], r = yi[q];
            ur[q] = er * p - ei * r;
            ui[q] = er * r + ei * p;
            const c = k7r[q], e = k7i[q];
            k1r[q] = er * c - ei * e;
            k1i[q] = er * e + ei * c;
          }
        }
      }
      accepted++;
      identity = false;
      depth[0] = zNext;
      const fac = err < 3e-4 ? 5 : Math.min(5, 0.9 * Math.pow(err, -0.2));
      arg[0] = h * fac;
      level = levelFor(hmax, arg);
    } else {
      arg[0] = h * Math.max(0.2, 0.9 * Math.pow(err, -0.2));
      level = Math.max(level + 1, levelFor(hmax, arg));
      if (level > LEVELS) level = LEVELS;
    }
  }
  wk.lastLevel = level;
  if (!written) {
    // an empty stretch: the identity
    for (let q = 0; q < nn; q++) {
      T[to + 2 * q] = ur[q];
      T[to + 2 * q + 1] = ui[q];
    }
  }
  return accepted;
}
