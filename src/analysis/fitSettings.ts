/**
 * The ranges of the nuisance parameters that identification fits for every
 * candidate, from the scenario's optional top-level "fit" object:
 *
 *   "fit": {
 *     "enabled": true,             // false: every parameter stays as stated (the old behaviour)
 *     "wRange": 0.3,               // w of each micrograph within +- this (default 0.3), unless the
 *                                  //   micrograph states a measured w with wError (then +- 2 wError)
 *     "thicknessRange": 0.15,      // foil thickness within +- this fraction (default 15 %)
 *     "thickness_nm": 81, "thicknessError_nm": 3,  // a measured thickness (as `thinfoil measure --json`
 *                                  //   reports it): the fit is centred on it and ranges over +- 2 errors
 *     "depthRange_nm": 20,         // depth of the defect's point within +- this (default a quarter of the thickness)
 *     "lineCone_deg": 5            // a dislocation's line direction within this cone (default 5 degrees)
 *   }
 *
 * Two standard uncertainties on each side of a measured value: about 95 % of
 * true values lie inside for a normal error (common practice).
 */
import { fail, joinPath, number, object, onlyKeys } from '../scenario/check.js';

export interface FitSettings {
  readonly enabled: boolean;
  readonly wRange: number;
  readonly thicknessRange: number;
  readonly thickness_nm?: number;
  readonly thicknessError_nm?: number;
  readonly depthRange_nm?: number;
  readonly lineCone_deg: number;
}

export const DEFAULT_FIT: FitSettings = { enabled: true, wRange: 0.3, thicknessRange: 0.15, lineCone_deg: 5 };
/** Measured values range over this many standard uncertainties on each side. */
export const MEASURED_SIGMAS = 2;

export const FIT_KEYS = ['enabled', 'wRange', 'thicknessRange', 'thickness_nm', 'thicknessError_nm', 'depthRange_nm', 'lineCone_deg'] as const;

export function parseFitSettings(raw: unknown): FitSettings {
  if (raw === undefined) return DEFAULT_FIT;
  const o = object(raw, 'fit');
  onlyKeys(o, FIT_KEYS, 'fit');
  const at = (k: string) => joinPath('fit', k);
  const s: { -readonly [K in keyof FitSettings]: FitSettings[K] } = { ...DEFAULT_FIT };
  if (o.enabled !== undefined) {
    if (typeof o.enabled !== 'boolean') fail(at('enabled'), 'must be true or false');
    s.enabled = o.enabled;
  }
  if (o.wRange !== undefined) s.wRange = number(o.wRange, at('wRange'), { min: 0, max: 5 });
  if (o.thicknessRange !== undefined) s.thicknessRange = number(o.thicknessRange, at('thicknessRange'), { min: 0, max: 0.9, unit: 'fraction of the thickness' });
  if (o.thickness_nm !== undefined) s.thickness_nm = number(o.thickness_nm, at('thickness_nm'), { above: 0, max: 100000, unit: 'nm' });
  if (o.thicknessError_nm !== undefined) {
    if (o.thickness_nm === undefined) fail(at('thicknessError_nm'), 'needs the measured "thickness_nm" beside it');
    s.thicknessError_nm = number(o.thicknessError_nm, at('thicknessError_nm'), { above: 0, max: 0.45 * (o.thickness_nm as number), unit: 'nm, below 45 % of the thickness' });
    if (o.thicknessRange !== undefined) fail(at('thicknessRange'), 'is not used beside a measured thickness with "thicknessError_nm" (that one is fitted within 2 of its uncertainties); remove one of the two');
  }
  if (o.depthRange_nm !== undefined) s.depthRange_nm = number(o.depthRange_nm, at('depthRange_nm'), { min: 0, max: 100000, unit: 'nm' });
  if (o.lineCone_deg !== undefined) s.lineCone_deg = number(o.lineCone_deg, at('lineCone_deg'), { min: 0, max: 30, unit: 'degrees' });
  return s;
}

/** The foil thickness identification fits: its centre, half-range (nm) and whether the centre is a measured thickness. */
export interface ThicknessRange {
  readonly nominal_nm: number;
  readonly half_nm: number;
  readonly measured: boolean;
}

/**
 * Centred on the measured fit.thickness_nm when given, else on the foil's
 * stated thickness; +- MEASURED_SIGMAS errors of a measured value with an
 * error, else +- thicknessRange of the centre.
 */
export function thicknessRange(foilThickness_nm: number, fit: FitSettings): ThicknessRange {
  const nominal_nm = fit.thickness_nm ?? foilThickness_nm;
  const half_nm = fit.thicknessError_nm !== undefined ? MEASURED_SIGMAS * fit.thicknessError_nm : fit.thicknessRange * nominal_nm;
  return { nominal_nm, half_nm, measured: fit.thickness_nm !== undefined };
}
