/**
 * `thinfoil measure <material>`: numbers a micrograph series needs, from
 * what one measures on the patterns and images: the deviation s and w from
 * the Kikuchi line, the thickness (and xi_g) from two-beam convergent-beam
 * fringes, the thickness from the projected width of an inclined fault or the
 * projected length of a dislocation crossing the foil.
 */
import { getMaterial } from '../crystal/materials.js';
import { directionToCartesian, planeNormalToCartesian } from '../crystal/lattice.js';
import { readDirection, readPlane } from '../scenario/parse.js';
import { reflectionParameters } from '../scattering/reflection.js';
import { InputError } from '../errors.js';
import { deviationFromAngle, deviationFromKikuchi } from '../planning/kikuchi.js';
import { fitFringes, fringeDeviations } from '../planning/convergentBeam.js';
import { thicknessFromFaultWidth, thicknessFromLineLength } from '../planning/projectedWidth.js';
import { numberOption } from './options.js';
import { printJson, sig, table } from './run.js';
import type { AbsorptionSetting } from '../scattering/absorptionSetting.js';

export interface MeasureOptions {
  kv: number;
  absorption: AbsorptionSetting;
  g?: string;
  kikuchi?: string;
  angle?: string;
  fringes?: string;
  spacing?: string;
  error?: string;
  faultWidth?: string;
  plane?: string;
  lineLength?: string;
  line?: string;
  normal?: string;
  beam?: string;
  json?: boolean;
}

const distance = (name: string) => numberOption(name, -1e9, 1e9, 'a distance');
const positive = (name: string) => numberOption(name, 1e-12, 1e9, 'a positive length');

export function measureCommand(materialName: string, opts: MeasureOptions): void {
  const m = getMaterial(materialName);
  const l = m.lattice;
  const result: Record<string, unknown> = { material: m.name, kV: opts.kv };
  const rows: string[][] = [];
  const needG = () => {
    if (opts.g === undefined) throw new InputError('--g is missing; give the reflection g of the pattern, e.g. --g 2,0,0');
    if (opts.spacing === undefined) throw new InputError('--spacing is missing; give the distance from 000 to the g spot (or between the disc centres), in the units of the other distances');
    const g = readPlane(opts.g, '--g', m);
    return { g, r: reflectionParameters(m, g, opts.kv, { absorption: opts.absorption }), R: positive('--spacing')(opts.spacing) };
  };
  const err = opts.error === undefined ? undefined : numberOption('--error', 0, 1e9, 'the uncertainty of a distance measured on the pattern, same units')(opts.error);
  let any = false;
  if (opts.kikuchi !== undefined) {
    any = true;
    const { g, r, R } = needG();
    const x = distance('--kikuchi')(opts.kikuchi);
    const d = deviationFromKikuchi(x, R, r.lambda_nm, r.g_per_nm);
    const sErr = err === undefined ? undefined : (r.lambda_nm * r.g_per_nm ** 2 * err) / R;
    result.deviation = {
      g,
      s_per_nm: d.s_per_nm,
      ...(sErr === undefined ? {} : { sError_per_nm: sErr, wError: sErr * r.xi_nm }),
      w: d.s_per_nm * r.xi_nm,
      xi_nm: r.xi_nm,
      deltaTheta_mrad: d.deltaTheta_rad * 1000,
      formula: 's = lambda g^2 x / R (Williams & Carter 2009; Edington 1975)',
    };
    const pm = (v: number, e: number | undefined, p: number) => (e === undefined ? sig(v, p) : `${sig(v, p)} +- ${sig(e, 2)}`);
    rows.push(['s (Kikuchi line)', `${pm(d.s_per_nm, sErr, 4)} nm^-1 (${x >= 0 ? 'line outside the spot: g inside the Ewald sphere' : 'line between 000 and the spot: s < 0'})`]);
    rows.push(['w = s xi_g', `${pm(d.s_per_nm * r.xi_nm, sErr === undefined ? undefined : sErr * r.xi_nm, 3)} (xi_g = ${sig(r.xi_nm, 4)} nm at ${opts.kv} kV)`]);
  }
  if (opts.angle !== undefined) {
    any = true;
    if (opts.g === undefined) throw new InputError('--g is missing; give the reflection g, e.g. --g 2,0,0');
    const g = readPlane(opts.g, '--g', m);
    const r = reflectionParameters(m, g, opts.kv, { absorption: opts.absorption });
    const a = numberOption('--angle', -200, 200, 'the tilt from the Bragg position in mrad')(opts.angle) / 1000;
    const s = deviationFromAngle(a, r.lambda_nm, r.g_per_nm);
    result.deviationFromAngle = { g, deltaTheta_mrad: a * 1000, s_per_nm: s, w: s * r.xi_nm, xi_nm: r.xi_nm };
    rows.push(['s (tilt from Bragg)', `${sig(s, 4)} nm^-1`]);
    rows.push(['w = s xi_g', `${sig(s * r.xi_nm, 3)} (xi_g = ${sig(r.xi_nm, 4)} nm at ${opts.kv} kV)`]);
  }
  if (opts.fringes !== undefined) {
    any = true;
    const { g, r, R } = needG();
    const xs = opts.fringes.split(/[,\s]+/).filter((t) => t !== '').map((t, i) => positive(`--fringes (value ${i + 1})`)(t));
    const s = fringeDeviations(xs, R, r.lambda_nm, r.g_per_nm);
    const f = fitFringes(s);
    result.convergentBeam = {
      g,
      deviations_per_nm: s,
      firstFringeInteger: f.n1,
      thickness_nm: f.thickness_nm,
      thicknessError_nm: f.thicknessError_nm,
      xi_nm: f.xi_nm ?? null,
      xiError_nm: f.xiError_nm ?? null,
      xiComputed_nm: r.xi_nm,
      rms_per_nm2: f.rms,
      method: 'Kelly et al. 1975: (s_i/n_i)^2 = 1/t^2 - (1/xi_g^2)(1/n_i^2)',
    };
    rows.push(['thickness (convergent beam)', `${sig(f.thickness_nm, 4)} +- ${sig(f.thicknessError_nm, 2)} nm (first fringe n = ${f.n1}, ${xs.length} fringes)`]);
    rows.push(['xi_g (convergent beam)', f.xi_nm === undefined ? 'not determined (the slope is not negative)' : `${sig(f.xi_nm, 4)} +- ${sig(f.xiError_nm!, 2)} nm (computed from the tables: ${sig(r.xi_nm, 4)} nm)`]);
  }
  const foilGeometry = () => {
    if (opts.normal === undefined || opts.beam === undefined) throw new InputError('--normal and --beam are needed for a projected width: give the foil normal and the beam direction as crystal directions, e.g. --normal 0,0,1 --beam 0,0,1');
    return { N: directionToCartesian(l, readDirection(opts.normal, '--normal', m)), k: directionToCartesian(l, readDirection(opts.beam, '--beam', m)) };
  };
  if (opts.faultWidth !== undefined) {
    any = true;
    if (opts.plane === undefined) throw new InputError('--plane is missing; give the fault plane, e.g. --plane 1,1,1');
    const W = positive('--fault-width')(opts.faultWidth);
    const { N, k } = foilGeometry();
    const t = thicknessFromFaultWidth(W, planeNormalToCartesian(l, readPlane(opts.plane, '--plane', m)), N, k);
    const tErr = err === undefined ? undefined : (t / W) * err;
    result.faultWidth = { width_nm: W, thickness_nm: t, ...(tErr === undefined ? {} : { thicknessError_nm: tErr }) };
    rows.push(['thickness (fault width)', `${sig(t, 4)}${tErr === undefined ? '' : ` +- ${sig(tErr, 2)}`} nm`]);
  }
  if (opts.lineLength !== undefined) {
    any = true;
    if (opts.line === undefined) throw new InputError('--line is missing; give the dislocation line direction, e.g. --line 1,1,0');
    const L = positive('--line-length')(opts.lineLength);
    const { N, k } = foilGeometry();
    const t = thicknessFromLineLength(L, directionToCartesian(l, readDirection(opts.line, '--line', m)), N, k);
    const tErr = err === undefined ? undefined : (t / L) * err;
    result.lineLength = { length_nm: L, thickness_nm: t, ...(tErr === undefined ? {} : { thicknessError_nm: tErr }) };
    rows.push(['thickness (line length)', `${sig(t, 4)}${tErr === undefined ? '' : ` +- ${sig(tErr, 2)}`} nm`]);
  }
  if (!any) throw new InputError('nothing to measure; give --kikuchi, --angle, --fringes, --fault-width or --line-length (see thinfoil measure --help)');
  if (opts.json) {
    printJson(result);
    return;
  }
  process.stdout.write(table(['quantity', 'value'], rows));
}
