/**
 * Plain fixed-step classical Runge-Kutta (RK4) integration of the two-beam
 * Howie-Whelan equations in the beta form (physics.md section 3). Used only
 * as a benchmark baseline and as an independent check of the slab
 * integrator; it shares no code with it.
 *
 *   dphi0/dz = -(pi/xi'0) phi0 + pi i q phig
 *   dphig/dz =  pi i q phi0 + [-(pi/xi'0) + 2 pi i (s + beta'(z))] phig
 *   q = 1/xi_g + i/xi'_g
 */
import { checkThickness, checkTwoBeamParams } from './twoBeamParams.js';
/**
 * Integrates 0 <= z <= t_nm with nSteps equal RK4 steps from phi0 = 1,
 * phig = 0; writes (re phi0, im phi0, re phig, im phig) to out[0..3].
 */
export function rk4Column(out, p, t_nm, betaPrime, nSteps) {
    checkTwoBeamParams(p);
    checkThickness(t_nm);
    if (!(Number.isInteger(nSteps) && nSteps >= 1)) {
        throw new RangeError(`rk4Column: nSteps must be an integer >= 1, got ${nSteps}`);
    }
    const pi = Math.PI;
    // pi i q = pi i (qr + i qi) = -pi qi + i pi qr
    const cr = -pi / p.xiAbs_nm;
    const ci = pi / p.xi_nm;
    const damp = -pi / p.xiAbs0_nm;
    const s = p.s_per_nm;
    const h = t_nm / nSteps;
    let ar = 1;
    let ai = 0;
    let gr = 0;
    let gi = 0;
    // derivative of (ar, ai, gr, gi) with s_e = s + beta'
    let k0r = 0;
    let k0i = 0;
    let kgr = 0;
    let kgi = 0;
    const deriv = (xr, xi, yr, yi, se) => {
        const w = 2 * pi * se;
        k0r = damp * xr + cr * yr - ci * yi;
        k0i = damp * xi + cr * yi + ci * yr;
        kgr = cr * xr - ci * xi + damp * yr - w * yi;
        kgi = cr * xi + ci * xr + damp * yi + w * yr;
    };
    for (let n = 0; n < nSteps; n++) {
        const z = n * h;
        const sa = s + betaPrime(z);
        const sm = s + betaPrime(z + 0.5 * h);
        const sb = s + betaPrime(z + h);
        deriv(ar, ai, gr, gi, sa);
        const a1r = k0r, a1i = k0i, g1r = kgr, g1i = kgi;
        deriv(ar + 0.5 * h * a1r, ai + 0.5 * h * a1i, gr + 0.5 * h * g1r, gi + 0.5 * h * g1i, sm);
        const a2r = k0r, a2i = k0i, g2r = kgr, g2i = kgi;
        deriv(ar + 0.5 * h * a2r, ai + 0.5 * h * a2i, gr + 0.5 * h * g2r, gi + 0.5 * h * g2i, sm);
        const a3r = k0r, a3i = k0i, g3r = kgr, g3i = kgi;
        deriv(ar + h * a3r, ai + h * a3i, gr + h * g3r, gi + h * g3i, sb);
        ar += (h / 6) * (a1r + 2 * a2r + 2 * a3r + k0r);
        ai += (h / 6) * (a1i + 2 * a2i + 2 * a3i + k0i);
        gr += (h / 6) * (g1r + 2 * g2r + 2 * g3r + kgr);
        gi += (h / 6) * (g1i + 2 * g2i + 2 * g3i + kgi);
    }
    out[0] = ar;
    out[1] = ai;
    out[2] = gr;
    out[3] = gi;
    if (!Number.isFinite(ar + ai + gr + gi)) {
        throw new RangeError('rk4Column: the amplitudes are not finite (too few steps for this beta\'?)');
    }
}
