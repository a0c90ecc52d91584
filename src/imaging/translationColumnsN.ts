/**
 * The translation method (translationColumns.ts) for the many-beam engine
 * with a systematic row: the same classes of pixels, long columns and
 * sliding windows, with N x N transfer matrices in the Bloch-wave basis of
 * the perfect crystal. A stretch's matrix is built in one march: the N
 * unit Bloch amplitude vectors are propagated through the stretch together
 * by the column integrator's stepper (stretchMatrixN, same tolerance,
 * each step's error the largest over the N columns); a fault
 * is C^-1 diag(exp(i n_j alpha)) C; a dislocation's depth of closest approach
 * is a stretch boundary (the fresh first step the column path gets there).
 * A pixel's amplitudes are the rows (transmitted, g) of C W psi0, W its
 * window product.
 */
import { columnEntryPoint } from '../geometry/frames.js';
import { prepareColumnSystem, stretchMatrixNProbe } from '../dynamics/manyBeam.js';
import { columnStrain } from './columnStrain.js';
import { activeSurfaces, MANY_BEAM_TOL_FACTOR, type RenderJob } from './renderRows.js';
import { buildField } from './fieldSpecs.js';
import type { TranslationPlan, ClassWindows } from './translationColumns.js';
import { FAULT, longColumnEvents, WINDOW_END, WINDOW_START } from './longColumnEvents.js';

/** out[o..] = a[ao..] x b[bo..], N x N complex, interleaved [re, im], row-major. out may not alias a or b. */
function mulN(out: Float64Array, o: number, a: Float64Array, ao: number, b: Float64Array, bo: number, n: number): void {
  // two columns j at a time: each a_ik read once for both
  for (let i = 0; i < n; i++) {
    const ar0 = ao + 2 * i * n;
    const or0 = o + 2 * i * n;
    let j = 0;
    for (; j + 1 < n; j += 2) {
      let re0 = 0, im0 = 0, re1 = 0, im1 = 0;
      for (let k = 0, bk = bo + 2 * j; k < n; k++, bk += 2 * n) {
        const xr = a[ar0 + 2 * k];
        const xi = a[ar0 + 2 * k + 1];
        const br0 = b[bk], bi0 = b[bk + 1], br1 = b[bk + 2], bi1 = b[bk + 3];
        re0 += xr * br0 - xi * bi0;
        im0 += xr * bi0 + xi * br0;
        re1 += xr * br1 - xi * bi1;
        im1 += xr * bi1 + xi * br1;
      }
      out[or0 + 2 * j] = re0;
      out[or0 + 2 * j + 1] = im0;
      out[or0 + 2 * j + 2] = re1;
      out[or0 + 2 * j + 3] = im1;
    }
    if (j < n) {
      let re = 0, im = 0;
      for (let k = 0, bk = bo + 2 * j; k < n; k++, bk += 2 * n) {
        const xr = a[ar0 + 2 * k];
        const xi = a[ar0 + 2 * k + 1];
        re += xr * b[bk] - xi * b[bk + 1];
        im += xr * b[bk + 1] + xi * b[bk];
      }
      out[or0 + 2 * j] = re;
      out[or0 + 2 * j + 1] = im;
    }
  }
}

function identityN(m: Float64Array, o: number, n: number): void {
  m.fill(0, o, o + 2 * n * n);
  for (let i = 0; i < n; i++) m[o + 2 * (i * n + i)] = 1;
}

export function classWindowsN(job: RenderJob, plan: TranslationPlan): ClassWindows {
  const mbj = job.manyBeam;
  if (mbj === undefined || mbj.beamVectors !== undefined) throw new Error('classWindowsN: a systematic-row job is required');
  const { width, height, frame, g_cart, tol } = job;
  const L = frame.columnLength_nm;
  const sys = prepareColumnSystem(mbj.input, mbj.orders, { incident: mbj.incident });
  const n = sys.n;
  const nn = 2 * n * n;
  const stepTol = tol * MANY_BEAM_TOL_FACTOR;
  const field = buildField(job.model.fields);
  const surfaces = activeSurfaces(job);
  const lines = job.model.fields.flatMap((f) => (f.kind === 'dislocation' ? [{ p: f.point_nm, u: f.line }] : []));
  const [kx, ky, kz] = frame.ez;
  const { c0, betaProbe } = columnStrain(field, g_cart, frame.ez);
  const { D } = plan;
  const maxK = Math.max(width, height) + 1;
  // events: 0 end of window k, 1 fault (ref = surface), 2 start of window k, 3 breakpoint
  const events = longColumnEvents(surfaces, lines, maxK);
  const { pos: evPos, code: evCode, ref: evRef, order, faultAlpha } = events;
  const nMaxEvents = evPos.length;
  const first = new Int32Array(maxK);
  const last = new Int32Array(maxK);
  const nMaxElements = nMaxEvents + 1;
  const E = new Float64Array(nn * nMaxElements);
  const F = new Float64Array(nn * nMaxElements);
  const B = new Float64Array(nn);
  const T = new Float64Array(nn);
  const v = new Float64Array(2 * n);
  const w = new Float64Array(2 * n);
  // psi0 and the rows of C for the transmitted and the g beam
  const psi0 = new Float64Array(2 * n);
  for (let j = 0; j < n; j++) {
    psi0[2 * j] = sys.psi0Re[j];
    psi0[2 * j + 1] = sys.psi0Im[j];
  }
  const r0 = mbj.incident * n;
  const rg = mbj.darkField * n;
  const stats = { slices: 0 };

  /**
   * Matrix of the stretch [a, b] into E at element m. Every column starts at ladder level `level`
   * (-1: a fresh first step, as the column path takes after a fault or breakpoint); returns the level
   * the first column would take next, for the following stretch.
   */
  const stretch = (m: number, a: number, b: number, level: number): number => {
    // all N unit Bloch vectors on one step sequence: T(b, a) in one march
    stats.slices += n * stretchMatrixNProbe(E, nn * m, sys, a, b, betaProbe, stepTol, level);
    return sys.work.lastLevel;
  };
  /** Fault matrix C^-1 diag(exp(i n_j alpha)) C into E at element m. */
  const fault = (m: number, alpha: number): void => {
    const o = nn * m;
    const { cRe, cIm, cInvRe, cInvIm } = sys;
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        let re = 0;
        let im = 0;
        for (let k = 0; k < n; k++) {
          const ang = mbj.orders[k] * alpha;
          const pr = Math.cos(ang);
          const pi = Math.sin(ang);
          // (C^-1)_ik phase_k C_kj
          const ar = cInvRe[i * n + k] * pr - cInvIm[i * n + k] * pi;
          const ai = cInvRe[i * n + k] * pi + cInvIm[i * n + k] * pr;
          re += ar * cRe[k * n + j] - ai * cIm[k * n + j];
          im += ar * cIm[k * n + j] + ai * cRe[k * n + j];
        }
        E[o + 2 * (i * n + j)] = re;
        E[o + 2 * (i * n + j) + 1] = im;
      }
    }
  };
  /** v = M psi0 for the matrix at M[mo..]. */
  const apply = (out: Float64Array, M: Float64Array, mo: number, x: Float64Array): void => {
    for (let i = 0; i < n; i++) {
      let re = 0;
      let im = 0;
      for (let k = 0; k < n; k++) {
        const ar = M[mo + 2 * (i * n + k)];
        const ai = M[mo + 2 * (i * n + k) + 1];
        re += ar * x[2 * k] - ai * x[2 * k + 1];
        im += ar * x[2 * k + 1] + ai * x[2 * k];
      }
      out[2 * i] = re;
      out[2 * i + 1] = im;
    }
  };

  const run = (amp: Float64Array, x: number, y: number, K: number): void => {
    columnEntryPoint(c0, frame, x, y);
    const cx = c0[0];
    const cy = c0[1];
    const cz = c0[2];
    const ne = events.collect(cx, cy, cz, frame.ez, K, D, L);
    let m = 0;
    let zPrev = 0;
    let level = -1;
    for (let e = 0; e < ne; e++) {
      const ev0 = order[e];
      const z = evPos[ev0];
      if (z > zPrev) {
        level = stretch(m++, zPrev, z, level);
        zPrev = z;
      }
      const code = evCode[ev0];
      if (code === WINDOW_END) last[evRef[ev0]] = m;
      else if (code === WINDOW_START) first[evRef[ev0]] = m;
      else if (code === FAULT) {
        fault(m++, faultAlpha[evRef[ev0]]);
        level = -1;
      } else level = -1; // breakpoint: a fresh first step, as in the column path
    }
    let frontEnd = 0;
    let backEnd = 0;
    identityN(B, 0, n);
    for (let k = 0; k < K; k++) {
      const a = first[k];
      const b = last[k];
      while (backEnd < b) {
        mulN(T, 0, E, nn * backEnd, B, 0, n);
        B.set(T);
        backEnd++;
      }
      if (a >= frontEnd) {
        if (backEnd > frontEnd) {
          for (let q = nn * (backEnd - 1); q < nn * backEnd; q++) F[q] = E[q]; // (no subarray view per call)
          for (let t = backEnd - 2; t >= frontEnd; t--) mulN(F, nn * t, F, nn * (t + 1), E, nn * t, n);
        }
        frontEnd = backEnd;
        identityN(B, 0, n);
      }
      // psi at the exit = B F[a] psi0; phi = C psi for the transmitted and the g beam
      if (a < frontEnd) apply(v, F, nn * a, psi0);
      else v.set(psi0);
      apply(w, B, 0, v);
      let p0r = 0, p0i = 0, pgr = 0, pgi = 0;
      for (let j = 0; j < n; j++) {
        const wr = w[2 * j];
        const wi = w[2 * j + 1];
        p0r += sys.cRe[r0 + j] * wr - sys.cIm[r0 + j] * wi;
        p0i += sys.cRe[r0 + j] * wi + sys.cIm[r0 + j] * wr;
        pgr += sys.cRe[rg + j] * wr - sys.cIm[rg + j] * wi;
        pgi += sys.cRe[rg + j] * wi + sys.cIm[rg + j] * wr;
      }
      amp[4 * k] = p0r;
      amp[4 * k + 1] = p0i;
      amp[4 * k + 2] = pgr;
      amp[4 * k + 3] = pgi;
    }
  };
  return Object.assign(run, { stats });
}
