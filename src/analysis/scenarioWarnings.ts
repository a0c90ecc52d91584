/**
 * Plain-language warnings about a valid scenario that will probably not show
 * what the user expects: an implausible thickness or pixel size (a value typed
 * in the wrong unit), a defect outside the foil or the field of view, a
 * dislocation seen end-on, a fault seen edge-on. They do not stop a render.
 * (What is impossible, such as a defect wholly outside the crystal, is refused
 * by the scenario parser.)
 */
import type { Scenario } from '../scenario/types.js';
import { referenceFrame } from '../imaging/scenarioFrame.js';
import { defectTypeOf } from '../defects/registry.js';
import { sig } from '../format.js';
import { MEASURED_SIGMAS, thicknessRange, type FitSettings } from './fitSettings.js';

/**
 * Plausible ranges (common practice for diffraction-contrast work): foils
 * thinner than 5 nm are a few atomic planes and show almost no contrast
 * (0.15 is a thickness in micrometres); foils thicker than 1000 nm are opaque
 * to 100-400 kV electrons in metals; pixels larger than 10 nm put a whole
 * dislocation image (about xi_g / 3 wide) into one or two pixels; pixels
 * smaller than 0.05 nm are far below any atomic spacing, where the column
 * approximation says nothing (a size in Angstrom divided by 10 twice?); the
 * parser refuses pixels below 0.01 nm outright.
 */
export const PLAUSIBLE = {
  thicknessMin_nm: 5,
  thicknessMax_nm: 1000,
  pixelMax_nm: 10,
  pixelMin_nm: 0.05,
} as const;

export function scenarioWarnings(sc: Scenario): string[] {
  const out: string[] = [];
  const ref = referenceFrame(sc);
  const t = sc.thickness_nm;
  if (t < PLAUSIBLE.thicknessMin_nm) {
    out.push(`foil.thickness_nm is ${t} nm, thinner than ${PLAUSIBLE.thicknessMin_nm} nm (a few atomic planes, almost no contrast); was it meant in micrometres (${sig(t * 1000, 3)} nm)?`);
  } else if (t > PLAUSIBLE.thicknessMax_nm) {
    out.push(`foil.thickness_nm is ${t} nm, thicker than the ${PLAUSIBLE.thicknessMax_nm} nm through which 100-400 kV electrons pass a metal foil; check the unit (nm)`);
  }
  const px = sc.image.pixel_nm;
  if (px > PLAUSIBLE.pixelMax_nm) {
    out.push(`image.pixel_nm is ${px} nm, larger than ${PLAUSIBLE.pixelMax_nm} nm: a dislocation image (about xi_g / 3 wide) falls into one or two pixels; check the unit (nm)`);
  } else if (px < PLAUSIBLE.pixelMin_nm) {
    out.push(`image.pixel_nm is ${px} nm, far below any atomic spacing (smaller than ${PLAUSIBLE.pixelMin_nm} nm); check the unit (nm)`);
  }
  const hw = (sc.image.width_px * px) / 2;
  const hh = (sc.image.height_px * px) / 2;
  const ctx = { sc, ref, halfWidth_nm: hw, halfHeight_nm: hh };
  sc.defects.forEach((d, i) => {
    // each defect type judges its own (src/defects/<type>.ts)
    out.push(...defectTypeOf(d).warnings(d, { ...ctx, where: `defects[${i}] (${d.label})` }));
  });
  return out;
}

/**
 * Warnings about identify's "fit" settings against the rest of the scenario: a
 * measured thickness (fit.thickness_nm) whose range leaves out the foil's stated
 * thickness. Identification then simulates the measured thickness, while the
 * defect's depth was placed for the stated one; a thickness measured on another
 * area or typed in another unit makes every candidate's contrast wrong.
 */
export function fitWarnings(sc: Scenario, fit: FitSettings): string[] {
  const out: string[] = [];
  const r = thicknessRange(sc.thickness_nm, fit);
  const t = sc.thickness_nm;
  if (r.measured && (t < r.nominal_nm - r.half_nm || t > r.nominal_nm + r.half_nm)) {
    const measured = fit.thicknessError_nm === undefined ? `${sig(r.nominal_nm, 4)} nm` : `${sig(r.nominal_nm, 4)} +- ${sig(fit.thicknessError_nm, 3)} nm`;
    const range = r.half_nm > 0 ? `outside ${sig(r.nominal_nm - r.half_nm, 4)}-${sig(r.nominal_nm + r.half_nm, 4)} nm, ${fit.thicknessError_nm === undefined ? 'the range fit.thicknessRange gives it' : `${MEASURED_SIGMAS} standard errors of it`}` : 'which is used exactly (fit.thicknessRange 0)';
    out.push(
      `fit.thickness_nm: the measured foil thickness ${measured} is far from the scenario's foil.thickness_nm ${sig(t, 4)} nm (${range}); identify simulates the measured thickness, with the defect at the depth given for the stated foil: check both (measured on another area of the foil? a unit slip?) and the defect's depth`,
    );
  }
  return out;
}