/**
 * `thinfoil ribbon <scenario.json> --micrograph <file>`: the width of a
 * dissociated dislocation from a weak-beam micrograph and the stacking-fault
 * energy it implies. The profile across the line (src/analysis/ribbonProfile.ts)
 * gives the two peak positions; simulated strips of ribbons of several widths
 * (src/analysis/ribbonWidth.ts) turn the peak separation into the true
 * partial separation; src/elasticity/ribbonEnergy.ts turns that into gamma
 * (isotropic and anisotropic energy factors, Hirth & Lothe 1982).
 */
import type { Vec3 } from '../math/vec3.js';
import { decodeImage } from '../imageio/readImage.js';
import { MAX_FILE_BYTES } from '../imageio/types.js';
import { InputError } from '../errors.js';
import { parseScenario } from '../scenario/parse.js';
import { screenAngle_deg } from '../geometry/conditionGeometry.js';
import { materialStiffness } from '../elasticity/stiffness.js';
import { anisotropicSfeFromWidth_mJ_per_m2, isotropicSfeFromWidth_mJ_per_m2 } from '../elasticity/ribbonEnergy.js';
import { dissociationPair } from '../defects/dissociated.js';
import { formatDirectionIn } from '../crystal/formatIndices.js';
import { checkProfileOptions, lineProfile, removeBackground, twoPeaks } from '../analysis/ribbonProfile.js';
import { profileAgreement, ribbonDefect, ribbonStripGeometry, scenarioRibbonWidth_nm, widthFromSeparation, type RibbonTarget } from '../analysis/ribbonWidth.js';
import { parseMicrographSettings, usableTagPixel } from '../analysis/identifySettings.js';
import { readScenarioJson } from './loadScenario.js';
import { readInputFile } from './readInput.js';
import { numberOption, parseBlurNm } from './options.js';
import { printJson, sig, table } from './run.js';

/** Shape agreement (R^2) below which the read-out is flagged (our choice). */
const AGREEMENT = 0.5;

export interface RibbonOptions {
  micrograph?: string;
  condition?: string;
  defect?: string;
  pixelNm?: string;
  lineAngle?: string;
  gAngle?: string;
  centre?: string;
  halfWidth?: string;
  window?: string;
  binNm?: string;
  blurNm?: string;
  backgroundNm?: string;
  field?: string;
  json?: boolean;
}

function pair(text: string, name: string): [number, number] {
  const parts = text.split(/[,\s]+/).filter((t) => t !== '');
  if (parts.length !== 2) throw new InputError(`${name}: "${text}" is not two numbers; give x,y in pixels from the top-left corner, e.g. ${name} 120,64`);
  const f = numberOption(name, -1e6, 1e6, 'pixel coordinates');
  return [f(parts[0]), f(parts[1])];
}

export function ribbonCommand(scenarioPath: string, opts: RibbonOptions): void {
  const raw = readScenarioJson(scenarioPath);
  const sc = parseScenario(raw);
  // the scenario's "micrographs" settings, validated as identify validates them (a bad value names its JSON path)
  const micrographs = parseMicrographSettings(raw.micrographs, sc.conditions.map((c) => c.id));
  if (opts.micrograph === undefined) throw new InputError('--micrograph is missing; give the weak-beam micrograph (PNG or TIFF) of the dissociated dislocation');
  // the condition: --condition, else the only weak-beam (or the only) condition
  let ci: number;
  if (opts.condition !== undefined) {
    ci = sc.conditions.findIndex((c) => c.id === opts.condition);
    if (ci < 0) throw new InputError(`--condition: "${opts.condition}" is not a condition of the scenario; use one of ${sc.conditions.map((c) => c.id).join(', ')}`);
  } else {
    const wb = sc.conditions.map((c, i) => (c.deviation.kind === 'weakBeam' ? i : -1)).filter((i) => i >= 0);
    if (wb.length === 1) ci = wb[0];
    else if (sc.conditions.length === 1) ci = 0;
    else throw new InputError(`--condition is missing; the scenario has ${sc.conditions.length} conditions (${sc.conditions.map((c) => c.id).join(', ')}); name the one the micrograph was taken under`);
  }
  const cond = sc.conditions[ci];
  const defectIndex = opts.defect === undefined ? sc.defects.findIndex((d) => d.type === 'dissociated') : numberOption('--defect', 0, 99, 'a defect index')(opts.defect);
  if (defectIndex < 0) throw new InputError('defects: the scenario has no "dissociated" defect; describe the ribbon (b, plane, line, point_nm) as one');
  if (!Number.isInteger(defectIndex)) throw new InputError('--defect: give a whole defect index');
  const target: RibbonTarget = { sc, conditionIndex: ci, defectIndex };
  const d = ribbonDefect(target);

  const settings = micrographs.get(cond.id);
  const bytes = readInputFile(opts.micrograph, 'micrograph file', MAX_FILE_BYTES);
  const img = decodeImage(bytes, opts.micrograph);
  const pixel_nm =
    opts.pixelNm !== undefined ? numberOption('--pixel-nm', 0.001, 1000, 'the pixel size in nm')(opts.pixelNm) : settings?.pixel_nm ?? usableTagPixel(img.pixel_nm);
  if (pixel_nm === undefined) {
    throw new InputError(`--pixel-nm is missing; give the pixel size of the micrograph in nm (the file carries none, or a 72/96 dpi placeholder), or set "micrographs": {"${cond.id}": {"pixel_nm": ...}} in the scenario`);
  }

  const geo = ribbonStripGeometry(target);
  const simGAngle = screenAngle_deg(geo.c.frame, geo.c.g_cart);
  let lineAngle: number;
  let lineAngleFrom: string;
  if (opts.lineAngle !== undefined && opts.gAngle !== undefined) throw new InputError('--line-angle and --g-angle: give one of the two (the line direction on the micrograph, or the direction of g, from which the scenario\'s line gives the line direction)');
  if (opts.lineAngle !== undefined) {
    lineAngle = numberOption('--line-angle', -360, 360, 'the direction of the line on the micrograph in degrees')(opts.lineAngle);
    lineAngleFrom = '--line-angle';
  } else {
    const gA = opts.gAngle !== undefined ? numberOption('--g-angle', -360, 360, 'the direction of g on the micrograph in degrees')(opts.gAngle) : settings?.gAngle_deg;
    if (gA === undefined) throw new InputError('--line-angle is missing; give the direction of the line on the micrograph (degrees counter-clockwise from +x, +y down), or --g-angle for the direction of g');
    lineAngle = gA + (geo.lineAngle_deg - simGAngle);
    lineAngleFrom = `g at ${sig(gA, 4)} degrees and the scenario's line`;
  }
  const halfWidth = opts.halfWidth === undefined ? 15 : numberOption('--half-width', 0.01, 1e4, 'the half-width of the profile in nm')(opts.halfWidth);
  const window = opts.window === undefined ? undefined : numberOption('--window', 0.01, 1e4, 'the largest distance of a peak from the centre in nm')(opts.window);
  const bin = opts.binNm === undefined ? pixel_nm : numberOption('--bin-nm', pixel_nm / 8, 1e3, 'the bin width of the profile in nm')(opts.binNm);
  const blur = opts.blurNm === undefined ? 0 : parseBlurNm(opts.blurNm);
  const field = opts.field ?? 'df';
  if (field !== 'df' && field !== 'bf') throw new InputError(`--field: "${field}" is not a field; give "df" (weak-beam dark field, bright peaks; default) or "bf"`);
  const profileOptions = {
    lineAngle_deg: lineAngle,
    pixel_nm,
    ...(opts.centre === undefined ? {} : { centre_px: pair(opts.centre, '--centre') }),
    halfWidth_nm: halfWidth,
    binWidth_nm: bin,
  };
  checkProfileOptions(img, profileOptions);
  const full = lineProfile(img, profileOptions);
  // bins beyond the micrograph's edge stay empty: keep the filled range symmetric about the centre
  let lo = 0, hi = full.count.length - 1;
  while (lo < hi && full.count[lo] === 0) lo++;
  while (hi > lo && full.count[hi] === 0) hi--;
  const reach = Math.min(-full.x_nm[lo], full.x_nm[hi]);
  if (!(reach > 2 * bin) && opts.binNm !== undefined && bin > pixel_nm) throw new InputError(`--bin-nm: bins of ${sig(bin, 3)} nm leave fewer than two bins on one side of the centre (within --half-width ${sig(halfWidth, 3)} nm and the micrograph); give a smaller --bin-nm or a centre farther from the edge`);
  if (!(reach > 2 * bin)) throw new InputError('--centre: the profile reaches the micrograph\'s edge on one side within two bins; give a point on the ribbon farther from the edge');
  const keep = (k: number) => Math.abs(full.x_nm[k]) <= reach;
  const idx = [...full.x_nm.keys()].filter(keep);
  const prof = {
    x_nm: Float64Array.from(idx, (k) => full.x_nm[k]),
    mean: Float64Array.from(idx, (k) => full.mean[k]),
    sem: Float64Array.from(idx, (k) => full.sem[k]),
    count: Int32Array.from(idx, (k) => full.count[k]),
  };
  const filled = prof.count.filter((c) => c > 0).length;
  if (filled < prof.count.length) throw new InputError(`--bin-nm: only ${filled} of ${prof.count.length} bins of the profile hold pixels (the line runs nearly along a pixel axis); give a bin of at least one pixel`);
  const stripHalfWidth = reach + bin / 2;
  const sign = field === 'df' ? 1 : -1;
  const background = opts.backgroundNm === undefined ? 3 : numberOption('--background-nm', 0, 1e4, 'the width (standard deviation, nm) of the smooth background to remove, or 0')(opts.backgroundNm);
  const y = removeBackground(prof.x_nm, prof.mean.map((v) => sign * v), background);
  const peaks = twoPeaks(prof.x_nm, y, prof.sem, Math.max(bin, 0.2), window ?? Infinity);
  if (peaks === null) throw new InputError('the profile across the line has fewer than two peaks: the partials are not resolved (check --line-angle and --centre, or widen --half-width / --window)');
  // a peak read off a sampled profile: add a uniform sampling error of one bin per peak (bin / sqrt 12)
  const sepError = Math.hypot(peaks.sigma_nm, (Math.SQRT2 * bin) / Math.sqrt(12));
  const w = widthFromSeparation(target, peaks.separation_nm, sepError, { binWidth_nm: bin, blur_nm: blur, field, halfWidth_nm: stripHalfWidth, background_nm: background, ...(window === undefined ? {} : { window_nm: window }) });

  const agreement = profileAgreement(target, w.width_nm, { binWidth_nm: bin, blur_nm: blur, field, halfWidth_nm: stripHalfWidth, background_nm: background }, prof.x_nm, y);
  const m = sc.material;
  const pairP = dissociationPair(m, d);
  const gIso = isotropicSfeFromWidth_mJ_per_m2(pairP.b1_nm, pairP.b2_nm, pairP.line, m.elastic.shearModulus_GPa, m.elastic.poissonRatio, w.width_nm);
  const gAni = anisotropicSfeFromWidth_mJ_per_m2(pairP.b1_nm, pairP.b2_nm, pairP.line, materialStiffness(m), w.width_nm);
  const rel = w.widthError_nm / w.width_nm;
  const bText = (b: Vec3) => formatDirectionIn(m.lattice, b);
  const tabulated = m.stackingFaultEnergy_mJ_per_m2;
  const result = {
    condition: cond.id,
    defect: defectIndex,
    partials: [bText(pairP.b1), bText(pairP.b2)],
    pixel_nm,
    lineAngle_deg: lineAngle,
    binWidth_nm: bin,
    background_nm: background,
    peaks: peaks.peaks.map((p) => ({ x_nm: p.x_nm, sigma_nm: p.sigma_nm })),
    measuredSeparation_nm: peaks.separation_nm,
    measuredSeparationError_nm: sepError,
    projection: w.projection,
    width_nm: w.width_nm,
    widthError_nm: w.widthError_nm,
    slope: w.slope,
    shapeAgreement_R2: Number.isFinite(agreement) ? agreement : 'none',
    shapeAgrees: agreement >= AGREEMENT,
    simulated: w.simulated,
    sfe: {
      isotropic_mJ_per_m2: gIso,
      isotropicError_mJ_per_m2: gIso * rel,
      anisotropic_mJ_per_m2: gAni,
      anisotropicError_mJ_per_m2: gAni * rel,
      tabulated_mJ_per_m2: tabulated ?? 'none',
      formula: 'gamma = A / d, A the repulsion of the two parallel partials per unit length times d (Hirth & Lothe 1982, ch. 10 isotropic with the Voigt-Reuss-Hill G and nu, ch. 13 anisotropic with the Cij)',
    },
    scenarioWidth_nm: scenarioRibbonWidth_nm(target),
  };
  if (opts.json) {
    printJson(result);
    return;
  }
  const o: string[] = [];
  o.push(`ribbon ${d.label} under ${cond.id}: partials ${bText(pairP.b1)} and ${bText(pairP.b2)}; line on the micrograph at ${sig(lineAngle, 4)} degrees (${lineAngleFrom})`);
  o.push(`peaks across the line at ${peaks.peaks.map((p) => `${sig(p.x_nm, 4)} nm`).join(' and ')} (profile bins ${sig(bin, 3)} nm)`);
  o.push(`measured peak separation ${sig(peaks.separation_nm, 4)} +- ${sig(sepError, 2)} nm (profile noise and one bin of sampling)`);
  o.push('');
  o.push(`simulated peak separation for ribbon widths (the correction for each partial's image shift; ${sc.surfaces === 'relaxed' ? 'relaxed foil surfaces' : 'infinite medium'}):`);
  o.push(
    table(
      ['width (nm)', 'peak separation (nm)'],
      [...w.simulated]
        .sort((a, b) => a.width_nm - b.width_nm)
        .map((s) => [sig(s.width_nm, 4), s.separation_nm === null ? 'not resolved' : sig(s.separation_nm, 4)])
        .filter((r, i, all) => i === 0 || r[0] !== all[i - 1][0]),
    ).trimEnd(),
  );
  o.push('');
  o.push(`true partial separation ${sig(w.width_nm, 4)} +- ${sig(w.widthError_nm, 2)} nm in the glide plane (projected across the line: x ${sig(w.projection, 3)})`);
  o.push(
    agreement >= AGREEMENT
      ? `the simulated profile at this width explains the measured one: R^2 = ${sig(agreement, 3)} (background removed)`
      : `WARNING: the simulated profile at this width does not look like the measured one (R^2 = ${sig(agreement, 3)}, below ${AGREEMENT}): the two peaks are probably not the two partials (ribbon not resolved, another defect, or another condition); do not trust the numbers below`,
  );
  o.push(`stacking-fault energy: isotropic ${sig(gIso, 3)} +- ${sig(gIso * rel, 2)} mJ/m^2, anisotropic ${sig(gAni, 3)} +- ${sig(gAni * rel, 2)} mJ/m^2 (Hirth & Lothe 1982)${tabulated === undefined ? '' : `; the material library has ${tabulated} mJ/m^2`}`);
  process.stdout.write(o.join('\n') + '\n');
}
