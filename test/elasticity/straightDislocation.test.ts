import { describe, expect, it } from 'vitest';
import { type Vec3, add, cross, dot, norm, scale, sub } from '../../src/math/vec3.js';
import { InputError } from '../../src/errors.js';
import { dislocationFrame, straightDislocation } from '../../src/elasticity/straightDislocation.js';
import type { DisplacementField } from '../../src/elasticity/field.js';
import { fdGradient, loopIntegral, maxAbs, maxAbsDiff, polygonIntegral, randomUnit, rng } from './helpers.js';

const unitOf = (v: Vec3): Vec3 => scale(v, 1 / norm(v));
/** A unit vector perpendicular to u. */
function perp(u: Vec3, r: () => number): Vec3 {
  const w = randomUnit(r);
  const p = sub(w, scale(u, dot(w, u) / dot(u, u)));
  return unitOf(p);
}
const vecClose = (a: ArrayLike<number>, b: ArrayLike<number>, tol: number): boolean => maxAbsDiff(a, b) <= tol;

interface Case {
  name: string;
  b: Vec3;
  u: Vec3;
  P: Vec3;
  nu: number;
  cut?: Vec3;
}

/** Screw, edge, mixed, and random orientations (random b, u, point, cut). */
function cases(): Case[] {
  const r = rng(12345);
  const a = 0.3615; // nm, fcc Cu-like cell (any length scale would do)
  const bPerfect: Vec3 = [a / 2, -a / 2, 0];
  const out: Case[] = [
    { name: 'pure screw along [1-10]', b: bPerfect, u: [1, -1, 0], P: [0.3, -0.2, 0.1], nu: 0.34 },
    { name: 'pure edge, u = [11-2]', b: bPerfect, u: [1, 1, -2], P: [1, 2, 3], nu: 0.3 },
    { name: 'mixed 60 deg, u = [10-1]', b: bPerfect, u: [1, 0, -1], P: [-2, 0.5, 4], nu: 0.25 },
    { name: 'mixed with explicit cut', b: bPerfect, u: [1, 0, -1], P: [0, 0, 0], nu: 0.45, cut: [1, -2, 1] },
    { name: 'edge with nu = 0.5', b: [0, 0, 0.25], u: [1, 0, 0], P: [0, 0, 0], nu: 0.5 },
  ];
  for (let i = 0; i < 6; i++) {
    const u = scale(randomUnit(r), 0.5 + 2 * r()); // any length
    const b = scale(randomUnit(r), 0.15 + 0.2 * r());
    const P: Vec3 = [10 * r() - 5, 10 * r() - 5, 10 * r() - 5];
    const c: Case = { name: `random orientation ${i}`, b, u, P, nu: 0.1 + 0.35 * r() };
    if (i % 2 === 1) c.cut = add(scale(perp(u, r), 1 + r()), scale(u, r() - 0.5)); // not unit, with a component along u
    out.push(c);
  }
  return out;
}

const build = (c: Case): DisplacementField =>
  straightDislocation({ b_nm: c.b, line: c.u, point_nm: c.P, poissonRatio: c.nu, ...(c.cut ? { cutDirection: c.cut } : {}) });

describe('straight dislocation: Burgers circuit (Hirth & Lothe 1982, FS/RH: closed integral of dR about u = b)', () => {
  for (const c of cases()) {
    it(`${c.name}: circles, off-centre and tilted circuits, square circuit give b to 1e-9`, () => {
      const f = build(c);
      const u = unitOf(c.u);
      const r = rng(99);
      const bLen = norm(c.b);
      const check = (got: Vec3, want: Vec3): void => {
        // Hirth & Lothe 1982 ch. 1/3: the closure failure of a right-handed circuit is b (relative 1e-9)
        expect(norm(sub(got, want)) / bLen).toBeLessThan(1e-9);
      };
      // every circuit stays outside the modified core (2 rc < 0.7 nm)
      for (const R of [3, 8, 40]) {
        const a1 = perp(u, r);
        const a2 = cross(u, a1); // (a1, a2, u) right-handed
        const z = 20 * r() - 10;
        // centred circle, then an off-centre one (line at 0.6 R from the centre)
        for (const off of [0, 0.6]) {
          const o = perp(u, r);
          const C = add(add(c.P, scale(u, z)), scale(o, off * R));
          const curve = (s: number): { p: Vec3; t: Vec3 } => {
            const ph = 2 * Math.PI * s;
            return {
              p: add(C, add(scale(a1, R * Math.cos(ph)), scale(a2, R * Math.sin(ph)))),
              t: add(scale(a1, -2 * Math.PI * R * Math.sin(ph)), scale(a2, 2 * Math.PI * R * Math.cos(ph))),
            };
          };
          check(loopIntegral(f, curve, 1500), c.b);
        }
        // ellipse in a plane tilted 50 deg from the normal to u, right-handed about u
        const nt = unitOf(add(scale(u, Math.cos(0.87)), scale(perp(u, r), Math.sin(0.87))));
        const v1 = unitOf(cross(u, nt));
        const v2 = cross(nt, v1);
        const Q = add(add(c.P, scale(u, z)), add(scale(v1, 0.2 * R), scale(v2, -0.15 * R)));
        const ell = (s: number): { p: Vec3; t: Vec3 } => {
          const ph = 2 * Math.PI * s;
          return {
            p: add(Q, add(scale(v1, R * Math.cos(ph)), scale(v2, 0.7 * R * Math.sin(ph)))),
            t: add(scale(v1, -2 * Math.PI * R * Math.sin(ph)), scale(v2, 2 * Math.PI * 0.7 * R * Math.cos(ph))),
          };
        };
        check(loopIntegral(f, ell, 3000), c.b);
        // a square circuit (straight segments, like a lattice circuit), line off-centre
        const S = add(add(c.P, scale(u, z)), add(scale(a1, 0.3 * R), scale(a2, 0.25 * R)));
        const sq: Vec3[] = [
          add(S, add(scale(a1, R), scale(a2, R))),
          add(S, add(scale(a1, -R), scale(a2, R))),
          add(S, add(scale(a1, -R), scale(a2, -R))),
          add(S, add(scale(a1, R), scale(a2, -R))),
        ];
        check(polygonIntegral(f, sq, 12, 16), c.b);
        // the reversed (left-handed) square gives -b
        check(polygonIntegral(f, sq.slice().reverse(), 12, 16), scale(c.b, -1));
      }
      // a circuit that does not enclose the line gives 0
      const a1 = perp(u, r);
      const a2 = cross(u, a1);
      const C = add(c.P, scale(a1, 30));
      const far = (s: number): { p: Vec3; t: Vec3 } => {
        const ph = 2 * Math.PI * s;
        return {
          p: add(C, add(scale(a1, 10 * Math.cos(ph)), scale(a2, 10 * Math.sin(ph)))),
          t: add(scale(a1, -20 * Math.PI * Math.sin(ph)), scale(a2, 20 * Math.PI * Math.cos(ph))),
        };
      };
      check(loopIntegral(f, far, 1500), [0, 0, 0]);
    });
  }
});

/** Hirth & Lothe 1982 ch. 3 formulas written out literally (physics.md section 5), singular, theta = atan2(y, x). */
function hirthLothe(b: Vec3, uIn: Vec3, P: Vec3, nu: number, e1Screw: Vec3 | null, p: Vec3): Vec3 {
  const e3 = unitOf(uIn);
  const bu = dot(b, e3);
  const be = sub(b, scale(e3, bu));
  const beLen = norm(be);
  const e1 = e1Screw ?? unitOf(be);
  const e2 = cross(e3, e1);
  const d = sub(p, P);
  const x = dot(d, e1);
  const y = dot(d, e2);
  const th = Math.atan2(y, x);
  const r2 = x * x + y * y;
  const R1 = (beLen / (2 * Math.PI)) * (th + (x * y) / (2 * (1 - nu) * r2));
  const R2 =
    -(beLen / (2 * Math.PI)) * (((1 - 2 * nu) / (4 * (1 - nu))) * Math.log(r2) + (x * x - y * y) / (4 * (1 - nu) * r2));
  const R3 = (bu / (2 * Math.PI)) * th;
  return add(add(scale(e1, R1), scale(e2, R2)), scale(e3, R3));
}

describe('straight dislocation: displacement equals Hirth & Lothe (1982) ch. 3 outside the core', () => {
  it('default cut (-e1, atan2 branch): equal to 1e-12 beyond 2 rc; explicit cut: differs by 0 or +-b only', () => {
    const r = rng(7);
    for (const c of cases()) {
      const u = unitOf(c.u);
      const fr = dislocationFrame(c.b, c.u);
      const screw = fr.edge_nm === 0;
      const rc = norm(c.b);
      const fDefault = straightDislocation({ b_nm: c.b, line: c.u, point_nm: c.P, poissonRatio: c.nu });
      const fCut = build(c);
      const out = new Float64Array(3);
      for (let i = 0; i < 200; i++) {
        const rho = 2 * rc * Math.exp(Math.log(50) * r()) * 1.0000001;
        const p = add(add(c.P, scale(perp(u, r), rho)), scale(u, 10 * r() - 5));
        const want = hirthLothe(c.b, c.u, c.P, c.nu, screw ? fr.e1 : null, p);
        const scaleR = norm(c.b) * (1 + Math.abs(Math.log(rho * rho)));
        fDefault.displacement(out, p[0], p[1], p[2]);
        // Hirth & Lothe 1982 eqs. for the mixed dislocation (physics.md section 5): exact outside rm = 2 rc
        expect(maxAbsDiff(out, want) / scaleR).toBeLessThan(1e-12);
        fCut.displacement(out, p[0], p[1], p[2]);
        const diff = sub([out[0], out[1], out[2]], want);
        const best = Math.min(norm(diff), norm(sub(diff, c.b)), norm(add(diff, c.b)));
        // another branch of theta changes R by a multiple of b only (Hirth & Lothe 1982 ch. 3)
        expect(best / scaleR).toBeLessThan(1e-12);
      }
    }
  });

  it('the default frame follows physics.md: e1 along the edge component, e2 = e3 x e1', () => {
    const b: Vec3 = [0.1, 0.2, -0.05];
    const u: Vec3 = [0, 0, 3];
    const fr = dislocationFrame(b, u);
    expect(vecClose(fr.e3, [0, 0, 1], 1e-15)).toBe(true);
    expect(vecClose(fr.e1, unitOf([0.1, 0.2, 0]), 1e-15)).toBe(true);
    expect(vecClose(fr.e2, cross(fr.e3, fr.e1), 1e-15)).toBe(true);
    expect(fr.screw_nm).toBeCloseTo(-0.05, 15);
    expect(fr.edge_nm).toBeCloseTo(Math.hypot(0.1, 0.2), 15);
  });
});

describe('straight dislocation: the branch cut lies on the given half-plane', () => {
  for (const c of cases()) {
    it(`${c.name}: R jumps by b across {P + s u + t c, t > 0} and nowhere else`, () => {
      const f = build(c);
      const u = unitOf(c.u);
      const fr = dislocationFrame(c.b, c.u);
      const cDir = c.cut ? unitOf(sub(c.cut, scale(u, dot(c.cut, u)))) : scale(fr.e1, -1);
      const m = cross(u, cDir); // the sense of a right-handed circuit where it crosses the cut
      const A = new Float64Array(3);
      const B = new Float64Array(3);
      const rc = norm(c.b);
      for (const t of [2.5 * rc, 3, 25]) {
        for (const s of [-7, 0, 4.2]) {
          const base = add(add(c.P, scale(u, s)), scale(cDir, t));
          const eps = 1e-9 * t;
          const pm = sub(base, scale(m, eps));
          const pp = add(base, scale(m, eps));
          f.displacement(A, pm[0], pm[1], pm[2]);
          f.displacement(B, pp[0], pp[1], pp[2]);
          // Hirth & Lothe 1982 (FS/RH): going round u, R drops by b where the circuit crosses the cut
          expect(norm(sub([A[0] - B[0], A[1] - B[1], A[2] - B[2]], c.b)) / rc).toBeLessThan(1e-7);
          // no jump across the other half-planes (opposite and perpendicular directions)
          for (const other of [scale(cDir, -1), m, scale(m, -1)]) {
            const n2 = cross(u, other);
            const o = add(add(c.P, scale(u, s)), scale(other, t));
            const q1 = sub(o, scale(n2, eps));
            const q2 = add(o, scale(n2, eps));
            f.displacement(A, q1[0], q1[1], q1[2]);
            f.displacement(B, q2[0], q2[1], q2[2]);
            expect(maxAbsDiff(A, B) / rc).toBeLessThan(1e-7);
          }
        }
      }
    });
  }
});

describe('straight dislocation: analytic gradient against central finite differences of the displacement', () => {
  for (const c of cases()) {
    it(`${c.name}: 300 random points from 2 rc (the core edge) to 50 nm, away from the cut, relative 1e-6`, () => {
      const f = build(c);
      const u = unitOf(c.u);
      const fr = dislocationFrame(c.b, c.u);
      const cDir = c.cut ? unitOf(sub(c.cut, scale(u, dot(c.cut, u)))) : scale(fr.e1, -1);
      const m = cross(u, cDir);
      const rc = norm(c.b);
      const r = rng(2024);
      const g = new Float64Array(9);
      let worst = 0;
      for (let i = 0; i < 300; i++) {
        const rho = 2.0001 * rc * Math.exp(Math.log(50 / (2.0001 * rc)) * r());
        const psi = 0.05 + (2 * Math.PI - 0.1) * r(); // angle from the cut, at least 0.05 rad away
        const p = add(add(c.P, scale(u, 20 * r() - 10)), add(scale(cDir, rho * Math.cos(psi)), scale(m, rho * Math.sin(psi))));
        f.gradient(g, p[0], p[1], p[2]);
        const fd = fdGradient(f, p, 1e-4 * Math.min(rho, rc));
        worst = Math.max(worst, maxAbsDiff(g, fd) / maxAbs(g));
      }
      // central differences, O(h^2) ~ 1e-8: common practice
      expect(worst).toBeLessThan(1e-6);
    });
  }
});

describe('straight dislocation: isotropic elastic equilibrium (Navier: (1-2nu) lap R + grad div R = 0)', () => {
  for (const c of cases()) {
    it(`${c.name}: Navier residual vanishes outside the core; dilatation matches Hirth & Lothe`, () => {
      const f = build(c);
      const u = unitOf(c.u);
      const fr = dislocationFrame(c.b, c.u);
      const rc = norm(c.b);
      const r = rng(31);
      const g0 = new Float64Array(9);
      const gp = new Float64Array(9);
      const gm = new Float64Array(9);
      for (let i = 0; i < 60; i++) {
        const rho = 2.5 * rc * Math.exp(Math.log(20) * r());
        const p = add(add(c.P, scale(u, 5 * r())), scale(perp(u, r), rho));
        const h = 1e-4 * rho;
        const lap = [0, 0, 0];
        const gdiv = [0, 0, 0];
        for (let j = 0; j < 3; j++) {
          const pp = p.slice() as number[];
          const pm = p.slice() as number[];
          pp[j] += h;
          pm[j] -= h;
          f.gradient(gp, pp[0], pp[1], pp[2]);
          f.gradient(gm, pm[0], pm[1], pm[2]);
          for (let k = 0; k < 3; k++) lap[k] += (gp[3 * k + j] - gm[3 * k + j]) / (2 * h);
          gdiv[j] = (gp[0] + gp[4] + gp[8] - gm[0] - gm[4] - gm[8]) / (2 * h);
        }
        const res = lap.map((l, k) => (1 - 2 * c.nu) * l + gdiv[k]);
        const sc = norm(c.b) / (2 * Math.PI * rho * rho);
        // Navier-Cauchy equation of isotropic elastostatics without body force (e.g. Hirth & Lothe 1982 ch. 2)
        expect(Math.max(...res.map(Math.abs)) / sc).toBeLessThan(1e-5);
        // dilatation of the edge component: -(|b_e|/2pi) (1-2nu)/(1-nu) y/rho^2 (Hirth & Lothe 1982 ch. 3)
        f.gradient(g0, p[0], p[1], p[2]);
        const d = sub(p, c.P);
        const y = dot(d, fr.e2);
        const x = dot(d, fr.e1);
        const want = (-(fr.edge_nm / (2 * Math.PI)) * ((1 - 2 * c.nu) / (1 - c.nu)) * y) / (x * x + y * y);
        expect(Math.abs(g0[0] + g0[4] + g0[8] - want) / sc).toBeLessThan(1e-10);
      }
    });
  }
});

describe('straight dislocation: regularised core', () => {
  it('exactly on the line (and extremely close to it) displacement and gradient are finite', () => {
    for (const c of cases()) {
      const f = build(c);
      const u = unitOf(c.u);
      const d = new Float64Array(3);
      const g = new Float64Array(9);
      const pts: Vec3[] = [c.P, add(c.P, scale(u, 7.3)), add(c.P, scale(u, -1e6)), add(c.P, scale(perp(u, rng(1)), 1e-300))];
      for (const p of pts) {
        f.displacement(d, p[0], p[1], p[2]);
        f.gradient(g, p[0], p[1], p[2]);
        expect([...d, ...g].every(Number.isFinite)).toBe(true);
      }
      // on the line: grad R = 0 and R = -(|b_e|/2pi)(1-2nu)/(4(1-nu)) ln(rc^2) e2 (the documented regularisation)
      const fr = dislocationFrame(c.b, c.u);
      const rc = norm(c.b);
      f.displacement(d, c.P[0], c.P[1], c.P[2]);
      f.gradient(g, c.P[0], c.P[1], c.P[2]);
      expect(maxAbs(g)).toBe(0);
      const want = scale(fr.e2, (-(fr.edge_nm / (2 * Math.PI)) * (1 - 2 * c.nu) * Math.log(rc * rc)) / (4 * (1 - c.nu)));
      expect(maxAbsDiff(d, want)).toBeLessThan(1e-15);
    }
  });

  it('gradient is continuous across rho = 2 rc and bounded inside the core', () => {
    for (const c of cases()) {
      const f = build(c);
      const u = unitOf(c.u);
      const rc = norm(c.b);
      const r = rng(5);
      const gi = new Float64Array(9);
      const go = new Float64Array(9);
      for (let i = 0; i < 20; i++) {
        const dir = perp(u, r);
        const pi = add(c.P, scale(dir, 2 * rc * (1 - 1e-10)));
        const po = add(c.P, scale(dir, 2 * rc * (1 + 1e-10)));
        f.gradient(gi, pi[0], pi[1], pi[2]);
        f.gradient(go, po[0], po[1], po[2]);
        expect(maxAbsDiff(gi, go) / maxAbs(go)).toBeLessThan(1e-7);
      }
      // inside the core every component stays below |b| / rc (the singular field reaches that at rho ~ rc/2pi)
      for (let i = 0; i < 200; i++) {
        const p = add(c.P, scale(perp(u, r), 2 * rc * r()));
        f.gradient(gi, p[0], p[1], p[2]);
        expect(maxAbs(gi)).toBeLessThan(1);
      }
    }
  });

  it('inside the core the gradient is continuous across the cut (smooth beta\' for columns through the core)', () => {
    const b: Vec3 = [0.2, 0.05, 0.1];
    const f = straightDislocation({ b_nm: b, line: [0, 0, 1], point_nm: [0, 0, 0], poissonRatio: 0.3, cutDirection: [1, 0, 0] });
    const rc = norm(b);
    const A = new Float64Array(9);
    const B = new Float64Array(9);
    for (const rho of [0.1 * rc, 0.5 * rc, rc, 1.9 * rc]) {
      f.gradient(A, rho, -1e-12, 0);
      f.gradient(B, rho, 1e-12, 0);
      expect(maxAbsDiff(A, B)).toBeLessThan(1e-9);
    }
  });

  it('inside the core the jump across the cut is b f(rho) (f(rc) = 64/91), so the Burgers vector spreads over 2 rc', () => {
    const b: Vec3 = [0.2, 0.05, 0.1];
    const u: Vec3 = [0, 0, 1];
    const f = straightDislocation({ b_nm: b, line: u, point_nm: [0, 0, 0], poissonRatio: 0.3, cutDirection: [1, 0, 0] });
    const rc = norm(b);
    const A = new Float64Array(3);
    const B = new Float64Array(3);
    f.displacement(A, rc, -1e-12, 0);
    f.displacement(B, rc, 1e-12, 0);
    // q(rc) = rc^2 + rc^2 (1 - 1/4)^3 = rc^2 (91/64): documented in straightDislocation.ts
    expect(maxAbsDiff([A[0] - B[0], A[1] - B[1], A[2] - B[2]], scale(b, 64 / 91))).toBeLessThan(1e-10);
  });

  it('coreRadius_nm moves the modified zone: beyond 2 rc nothing changes', () => {
    const b: Vec3 = [0.2, 0, 0.1];
    const base = { b_nm: b, line: [0, 0, 1] as Vec3, point_nm: [0, 0, 0] as Vec3, poissonRatio: 0.33 };
    const f1 = straightDislocation(base);
    const f2 = straightDislocation({ ...base, coreRadius_nm: 0.05 });
    const g1 = new Float64Array(9);
    const g2 = new Float64Array(9);
    f1.gradient(g1, 0.3, 0.4, 1); // rho = 0.5 > 2 |b| = 0.447
    f2.gradient(g2, 0.3, 0.4, 1);
    expect(maxAbsDiff(g1, g2)).toBe(0);
    f1.gradient(g1, 0.03, 0.04, 1); // rho = 0.05: inside both modified zones (0.447 and 0.1), which differ
    f2.gradient(g2, 0.03, 0.04, 1);
    expect(maxAbsDiff(g1, g2)).toBeGreaterThan(0.01);
  });
});

describe('straight dislocation: input errors', () => {
  const ok = { b_nm: [0.2, 0, 0] as Vec3, line: [0, 0, 1] as Vec3, point_nm: [0, 0, 0] as Vec3, poissonRatio: 0.3 };
  it('rejects a zero Burgers vector, zero line, bad Poisson ratio, bad core radius, cut along the line', () => {
    expect(() => straightDislocation({ ...ok, b_nm: [0, 0, 0] })).toThrow(InputError);
    expect(() => straightDislocation({ ...ok, line: [0, 0, 0] })).toThrow(InputError);
    expect(() => straightDislocation({ ...ok, poissonRatio: 0.6 })).toThrow(InputError);
    expect(() => straightDislocation({ ...ok, poissonRatio: Number.NaN })).toThrow(InputError);
    expect(() => straightDislocation({ ...ok, coreRadius_nm: 0 })).toThrow(InputError);
    expect(() => straightDislocation({ ...ok, cutDirection: [0, 0, -2] })).toThrow(InputError);
    expect(() => straightDislocation({ ...ok, point_nm: [0, Number.POSITIVE_INFINITY, 0] })).toThrow(InputError);
  });
});
