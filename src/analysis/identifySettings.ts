/**
 * Per-micrograph settings for identification, from the scenario's optional
 * top-level "micrographs" object (keyed by condition id):
 *
 *   "micrographs": {
 *     "g200": {
 *       "field": "bf",            // "bf" or "df": which image the micrograph is
 *       "pixel_nm": 0.5,          // pixel size; else taken from the file's resolution tags
 *       "gAngle_deg": 30,         // direction of g in the micrograph, counter-clockwise from +x (screen, +y down);
 *                                 //   default: as in the simulation (no rotation)
 *       "crop": [x, y, w, h],     // pixels from the top-left corner; default the whole image
 *       "mirrored": false,        // the micrograph is the mirror image of the view along the beam
 *       "intensity": "linear",    // "linear": pixel value proportional to intensity after "offset";
 *                                 //   "display": unknown grey mapping (contrast is then fitted freely)
 *       "offset": 0,              // dark level subtracted from linear pixel values
 *       "blur_nm": 0,             // Gaussian blur (standard deviation) applied to the simulations
 *       "bin": 2,                 // average bin x bin pixels before comparing; default: crop side <= 256 px
 *       "maxShift_nm": 10,        // largest shift searched; default 20 % of the crop side
 *       "w": 0.62, "wError": 0.05, // measured w = s xi_g and its uncertainty (as `thinfoil measure --json` reports them):
 *                                 //   the fit of w is centred on it and ranges over +- 2 wError
 *       "view": "A"               // micrographs with the same view name show the same field of view in the same
 *                                 //   beam direction and share one registration (rotation, scale and shift)
 *     }
 *   }
 *
 * The micrograph files themselves are named on the command line.
 */
import { InputError } from '../errors.js';
import { array, fail, joinPath, number, object, onlyKeys, string } from '../scenario/check.js';

export interface MicrographSettings {
  readonly field: 'bf' | 'df';
  readonly pixel_nm?: number;
  readonly gAngle_deg?: number;
  readonly crop?: readonly [number, number, number, number];
  readonly mirrored: boolean;
  readonly intensity: 'linear' | 'display';
  readonly offset: number;
  readonly blur_nm: number;
  readonly bin?: number;
  readonly maxShift_nm?: number;
  /** Measured w of this micrograph and its uncertainty (centre and half-range / 2 of the fitted w). */
  readonly w?: number;
  readonly wError?: number;
  /** Name of the shared field of view (micrographs with the same name share one registration). */
  readonly view?: string;
}

export const MICROGRAPH_KEYS = ['field', 'pixel_nm', 'gAngle_deg', 'crop', 'mirrored', 'intensity', 'offset', 'blur_nm', 'bin', 'maxShift_nm', 'w', 'wError', 'view'] as const;

export const DEFAULT_SETTINGS: MicrographSettings = { field: 'bf', mirrored: false, intensity: 'linear', offset: 0, blur_nm: 0 };

/** Parse the raw "micrographs" value (undefined: no settings). conditionIds: the scenario's condition ids. */
export function parseMicrographSettings(raw: unknown, conditionIds: readonly string[]): Map<string, MicrographSettings> {
  const out = new Map<string, MicrographSettings>();
  if (raw === undefined) return out;
  const o = object(raw, 'micrographs');
  for (const [id, v] of Object.entries(o)) {
    const path = joinPath('micrographs', id);
    if (!conditionIds.includes(id)) fail(path, `names no condition of the scenario; use one of ${conditionIds.join(', ')}`);
    out.set(id, readSettings(v, path));
  }
  return out;
}

function readSettings(v: unknown, path: string): MicrographSettings {
  const o = object(v, path);
  onlyKeys(o, MICROGRAPH_KEYS, path);
  const at = (k: string) => joinPath(path, k);
  let field: 'bf' | 'df' = 'bf';
  if (o.field !== undefined) {
    const f = string(o.field, at('field'));
    if (f !== 'bf' && f !== 'df') fail(at('field'), `must be "bf" (bright field) or "df" (dark field), got "${f}"`);
    field = f;
  }
  let intensity: 'linear' | 'display' = 'linear';
  if (o.intensity !== undefined) {
    const f = string(o.intensity, at('intensity'));
    if (f !== 'linear' && f !== 'display') fail(at('intensity'), `must be "linear" (pixel values proportional to intensity) or "display" (unknown grey mapping), got "${f}"`);
    intensity = f;
  }
  let mirrored = false;
  if (o.mirrored !== undefined) {
    if (typeof o.mirrored !== 'boolean') fail(at('mirrored'), 'must be true or false');
    mirrored = o.mirrored;
  }
  const s: { -readonly [K in keyof MicrographSettings]: MicrographSettings[K] } = {
    field,
    mirrored,
    intensity,
    offset: o.offset === undefined ? 0 : number(o.offset, at('offset'), { unit: 'grey levels' }),
    blur_nm: o.blur_nm === undefined ? 0 : number(o.blur_nm, at('blur_nm'), { min: 0, max: 1000, unit: 'nm' }),
  };
  if (o.pixel_nm !== undefined) s.pixel_nm = number(o.pixel_nm, at('pixel_nm'), { above: 0, max: 10000, unit: 'nm' });
  if (o.gAngle_deg !== undefined) s.gAngle_deg = number(o.gAngle_deg, at('gAngle_deg'), { min: -360, max: 360, unit: 'degrees' });
  if (o.bin !== undefined) s.bin = number(o.bin, at('bin'), { integer: true, min: 1, max: 64 });
  if (o.maxShift_nm !== undefined) s.maxShift_nm = number(o.maxShift_nm, at('maxShift_nm'), { min: 0, max: 1e5, unit: 'nm' });
  if (o.w !== undefined) s.w = number(o.w, at('w'), { min: -1000, max: 1000 });
  if (o.wError !== undefined) {
    if (o.w === undefined) fail(at('wError'), 'needs the measured "w" beside it');
    s.wError = number(o.wError, at('wError'), { above: 0, max: 100 });
  }
  if (o.view !== undefined) s.view = string(o.view, at('view'));
  if (o.crop !== undefined) {
    const a = array(o.crop, at('crop'));
    if (a.length !== 4) fail(at('crop'), 'must be [x, y, width, height] in pixels from the top-left corner');
    const c = a.map((x, i) => number(x, joinPath(at('crop'), i), { integer: true, min: 0, unit: 'pixels' }));
    if (c[2] < 1 || c[3] < 1) fail(at('crop'), `must have a positive width and height, got ${c[2]} x ${c[3]}`);
    s.crop = [c[0], c[1], c[2], c[3]];
  }
  return s;
}

/**
 * Pixel sizes from resolution tags that are placeholders written by image
 * programs (72 and 96 dots per inch), or too coarse for a TEM micrograph of
 * defects (above 100 nm per pixel), are not used.
 */
export function usableTagPixel(pixel_nm: number | undefined): number | undefined {
  if (pixel_nm === undefined || !(pixel_nm > 0) || !Number.isFinite(pixel_nm)) return undefined;
  const dpi = 25.4e6 / pixel_nm;
  if (Math.abs(dpi - 72) < 0.1 || Math.abs(dpi - 96) < 0.1) return undefined;
  if (pixel_nm > 100) return undefined;
  return pixel_nm;
}

/** One "--micrograph <conditionId>=<file>" argument. */
export function parseMicrographArgument(arg: string): { conditionId: string; file: string } {
  const i = arg.indexOf('=');
  if (i <= 0 || i === arg.length - 1) {
    throw new InputError(`--micrograph "${arg}" must be <conditionId>=<file>, e.g. --micrograph g200=g200.tif`);
  }
  return { conditionId: arg.slice(0, i), file: arg.slice(i + 1) };
}
