/**
 * Figures of rendered images that can go beside a micrograph: per condition a
 * figure with its bright- and dark-field images, and one contact sheet of all
 * conditions. Every image carries a scale bar, the direction of g, and the
 * word SIMULATED; the header says the condition (g, beam, w or s, thickness,
 * field) and the caption says how grey levels map to intensity.
 *
 * Contrast. "shared" (default): grey levels show the contrast relative to the
 * perfect-crystal background, c = I / I_background - 1, on one symmetric scale
 * [-c_max, +c_max] for all images of the same field (bright field, dark field),
 * so that a weak residual image looks as weak as it is beside a strong one;
 * c_max is the largest 99.5th percentile of |c| over those images. Dark-field
 * images with a background below 1 % of the incident beam (weak beam, or a
 * reflection far from the Bragg condition) have no meaningful relative
 * contrast: they get their own linear scale from 0 to their 99.5th percentile,
 * and the figure says so. "each": every image stretched on its own (0.5 % of
 * the pixels clipped at each end), as the plain PNGs are.
 *
 * The float TIFFs are not touched by any of this.
 */
import { sig } from '../format.js';
import { beamCount } from '../scenario/types.js';
import type { ConditionImages } from '../imaging/renderScenario.js';
import type { ConditionGeometry } from '../geometry/conditionGeometry.js';
import { drawFigure, type Figure } from './graphics/figure.js';
import { textAdvance } from './graphics/font.js';
import type { RGB, Surface } from './graphics/types.js';
import { autoStretch, stretchToBytes } from './png.js';
import { wrap } from './comparisonFigure.js';
import { gArrow, plateText, scaleBar } from './imageMarks.js';

export type ContrastMode = 'shared' | 'each';

/** How one image's intensities map to grey 0..255: linear between lo and hi (intensity, fraction of the incident beam). */
export interface DisplayWindow {
  readonly lo: number;
  readonly hi: number;
  /** 'relative': symmetric about the background on the shared scale; 'own': this image's own scale. */
  readonly kind: 'relative' | 'own';
}

/** Below this background (fraction of the incident beam) a dark-field image gets its own scale. */
export const FAINT_BACKGROUND = 0.01;

/** Upper percentile used for the shared scale (0.5 % of the pixels may saturate). */
const PERCENTILE = 0.995;

function percentile(values: Float32Array, p: number): number {
  const a = Float32Array.from(values).sort();
  return a[Math.min(a.length - 1, Math.floor(p * (a.length - 1)))];
}

/** The shared scale of one field: relative contrast c = I / I_background - 1 from lo to hi (lo >= -1). */
export interface SharedScale {
  readonly lo: number;
  readonly hi: number;
}

/** The display windows of every image ([condition][0 = bf, 1 = df]) and the shared scales behind them. */
export function displayWindows(images: readonly ConditionImages[], mode: ContrastMode): { windows: DisplayWindow[][]; scales: { bf: SharedScale; df: SharedScale } | null } {
  if (mode === 'each') {
    return { windows: images.map((ci) => [ci.bf, ci.df].map((img) => ({ ...autoStretch(img), kind: 'own' as const }))), scales: null };
  }
  const relative = (ci: ConditionImages, f: 'bf' | 'df') => f === 'bf' || ci.background.df >= FAINT_BACKGROUND;
  const scales = { bf: { lo: 0, hi: 0 }, df: { lo: 0, hi: 0 } };
  for (const ci of images) {
    for (const f of ['bf', 'df'] as const) {
      if (!relative(ci, f)) continue;
      const img = ci[f];
      const bg = ci.background[f];
      const c = new Float32Array(img.length);
      for (let i = 0; i < img.length; i++) c[i] = img[i] / bg - 1;
      c.sort();
      const k = Math.floor((1 - PERCENTILE) * (c.length - 1));
      scales[f].lo = Math.min(scales[f].lo, c[k]);
      scales[f].hi = Math.max(scales[f].hi, c[c.length - 1 - k]);
    }
  }
  for (const f of ['bf', 'df'] as const) {
    scales[f].lo = Math.max(-1, scales[f].lo);
    // a perfect crystal everywhere: any positive range shows it as flat grey
    if (!(scales[f].hi - scales[f].lo > 1e-6)) scales[f] = { lo: -0.01, hi: 0.01 };
  }
  const windows = images.map((ci) =>
    (['bf', 'df'] as const).map((f): DisplayWindow => {
      if (!relative(ci, f)) {
        const hi = percentile(ci[f], PERCENTILE);
        return { lo: 0, hi: hi > 0 ? hi : 1, kind: 'own' };
      }
      const bg = ci.background[f];
      return { lo: bg * (1 + scales[f].lo), hi: bg * (1 + scales[f].hi), kind: 'relative' };
    }),
  );
  return { windows, scales };
}

/** What the header of one condition says. */
export interface ConditionLabel {
  readonly id: string;
  readonly g: string;
  readonly beam: string;
  /** "w = 0.3", "s = 0.01 /nm", "weak beam g(3g), s = ... /nm" */
  readonly deviation: string;
  readonly thickness: string;
  /** "two-beam" or "5-beam row" ... */
  readonly beams: string;
  /** true for g(ng) conditions: the dark field is a weak-beam image */
  readonly weakBeam: boolean;
}

export function conditionLabel(ci: ConditionImages): ConditionLabel {
  const c = ci.condition;
  const dev =
    c.deviationSource === 'w'
      ? `w = ${sig(c.w, 3)}`
      : c.deviationSource === 's'
        ? `s = ${sig(c.s_per_nm, 3)} /nm (w = ${sig(c.w, 3)})`
        : `weak beam ${c.deviationSource}, s = ${sig(c.s_per_nm, 3)} /nm`;
  const beams = c.beams.kind === 'row' ? `${beamCount(c.beams)}-beam row (${c.beams.nMin}g .. ${c.beams.nMax}g)` : c.beams.kind === 'set' ? `${beamCount(c.beams)}-beam set` : 'two-beam';
  const t = c.frame.thickness_nm;
  const L = c.frame.columnLength_nm;
  return {
    id: c.id,
    g: `g = (${c.g.map((x) => String(x + 0)).join(' ')})`,
    beam: `beam [${c.beamDirection.map((x) => String(x + 0)).join(' ')}]`,
    deviation: dev,
    thickness: `t = ${sig(t, 3)} nm${Math.abs(L - t) > 0.01 * t ? ` (column ${sig(L, 3)} nm)` : ''}`,
    beams,
    weakBeam: c.deviationSource.startsWith('g('),
  };
}

/** Where the parts of one image panel went on the figure (for checks and for readers of the SVG). */
export interface PanelLayout {
  readonly condition: string;
  readonly field: 'bf' | 'df';
  /** The image's box on the figure, px. */
  readonly box: { x: number; y: number; w: number; h: number };
  /** Figure px per image pixel. */
  readonly scale: number;
  readonly scaleBar: { readonly x0: number; readonly x1: number; readonly y: number; readonly length_nm: number };
  /** The g arrow from tail to head, px. */
  readonly arrow: { readonly x0: number; readonly y0: number; readonly x1: number; readonly y1: number };
}

const INK: RGB = [28, 28, 32];
const SOFT: RGB = [95, 95, 105];
const MARK: RGB = [150, 30, 30];

interface PanelSpec {
  readonly ci: ConditionImages;
  readonly field: 'bf' | 'df';
  readonly window: DisplayWindow;
  readonly geometry: ConditionGeometry;
}

/** Draws one image with its scale bar, g arrow, field label and SIMULATED mark into a square cell. */
function drawPanel(s: Surface, p: PanelSpec, x: number, y: number, cell: number): PanelLayout {
  const { ci, field, window } = p;
  const k = Math.min(cell / ci.width, cell / ci.height);
  const w = ci.width * k;
  const h = ci.height * k;
  const bx = x + (cell - w) / 2;
  const by = y + (cell - h) / 2;
  const img = field === 'bf' ? ci.bf : ci.df;
  s.greyImage(stretchToBytes(img, window.lo, window.hi), ci.width, ci.height, bx, by, w, h);
  s.strokeRect(bx, by, w, h, INK, 1);
  const box = { x: bx, y: by, w, h };
  const fieldName = field === 'bf' ? 'bright field' : conditionLabel(ci).weakBeam ? 'weak-beam dark field' : 'dark field';
  plateText(s, fieldName, bx + 8, by + 24, 18, { bold: true });
  plateText(s, 'SIMULATED', bx + 8, by + h - 12, 16, { bold: true, color: MARK });
  const bar = scaleBar(s, ci.pixel_nm * ci.width, box, 1 / 5);
  const arrow = gArrow(s, p.geometry.gAngle_deg, bx + w - 44, by + 44, 54);
  return { condition: ci.condition.id, field, box, scale: k, scaleBar: bar, arrow };
}

/** One sentence per field on how grey maps to intensity. */
export function contrastNote(scales: { bf: SharedScale; df: SharedScale } | null, windows: readonly DisplayWindow[][]): string {
  if (scales === null) return 'Grey levels: every image stretched on its own (0.5 % of the pixels clipped at each end); compare contrast between images with the float TIFFs, not by eye.';
  const own = windows.some((w) => w[1].kind === 'own');
  const range = (s: SharedScale) => `${sig(1 + s.lo, 3)} to ${sig(1 + s.hi, 3)} times the perfect-crystal background`;
  return (
    `Grey levels: one contrast scale shared by all bright-field images, black to white = ${range(scales.bf)}` +
    (windows.some((w) => w[1].kind === 'relative') ? `, and one shared by the dark-field images, ${range(scales.df)}` : '') +
    (own ? `; dark-field images whose background is below ${FAINT_BACKGROUND * 100} % of the incident beam (weak beam) each on their own scale from zero intensity.` : '.')
  );
}

const HEADER = 128;
const MARGIN = 24;
const GAP = 16;

function header(s: Surface, ci: ConditionImages, geometry: ConditionGeometry, x: number, y: number, maxW: number): void {
  const L = conditionLabel(ci);
  const fit = (t: string, size: number, bold = false) => {
    const w = s.measureText(t, size, bold);
    return w > maxW ? Math.max(10, (size * maxW) / w) : size;
  };
  const l1 = `${L.id}   ${L.g}`;
  s.text(l1, x, y + 26, { size: fit(l1, 24, true), bold: true, color: INK });
  const l2 = `${L.beam} (near zone ${geometry.nearestZone.text}), ${L.beams}`;
  s.text(l2, x, y + 56, { size: fit(l2, 17), color: INK });
  const l3 = `${L.deviation}, ${L.thickness}`;
  s.text(l3, x, y + 82, { size: fit(l3, 17), color: INK });
  const l4 = `g at ${sig(geometry.gAngle_deg, 4)} deg from +x (counter-clockwise)`;
  s.text(l4, x, y + 106, { size: fit(l4, 15), color: SOFT });
}

export interface RenderFigure extends Figure {
  readonly panels: readonly PanelLayout[];
  readonly width: number;
  readonly height: number;
}

/** The figure of one condition: bright and dark field side by side. */
export function conditionFigure(
  ci: ConditionImages,
  geometry: ConditionGeometry,
  windows: readonly DisplayWindow[],
  note: string,
  scenarioName: string,
  cell = 420,
): RenderFigure {
  const width = 2 * MARGIN + 2 * cell + GAP;
  const captionLines = wrapAll([`${scenarioName}: simulated images (column approximation), a model, not a measurement.`, note], width - 2 * MARGIN, 15);
  const height = MARGIN + HEADER + cell + 16 + captionLines.length * 21 + MARGIN;
  const panels: PanelLayout[] = [];
  const fig = drawFigure(width, height, (s) => {
    panels.length = 0;
    header(s, ci, geometry, MARGIN, MARGIN, width - 2 * MARGIN);
    (['bf', 'df'] as const).forEach((f, j) => {
      panels.push(drawPanel(s, { ci, field: f, window: windows[j], geometry }, MARGIN + j * (cell + GAP), MARGIN + HEADER, cell));
    });
    captionLines.forEach((t, k) => s.text(t, MARGIN, MARGIN + HEADER + cell + 30 + k * 21, { size: 15, color: INK }));
  });
  return { ...fig, panels, width, height };
}

/** All conditions on one sheet: one column per condition, bright field above dark field. */
export function contactSheet(
  images: readonly ConditionImages[],
  geometries: readonly ConditionGeometry[],
  windows: readonly DisplayWindow[][],
  note: string,
  scenarioName: string,
): RenderFigure {
  const n = images.length;
  const cell = Math.max(200, Math.min(420, Math.floor((2400 - 2 * MARGIN - (n - 1) * GAP) / Math.max(1, n))));
  const width = 2 * MARGIN + n * cell + (n - 1) * GAP;
  const title = `${scenarioName}: simulated bright- and dark-field images (a model, not a measurement)`;
  const captionLines = wrapAll([note, 'Each image: scale bar bottom right, arrow = direction of g, SIMULATED = made by thinfoil, not measured.'], width - 2 * MARGIN, 15);
  const top = MARGIN + 44;
  const height = top + HEADER + 2 * cell + GAP + 16 + captionLines.length * 21 + MARGIN;
  const panels: PanelLayout[] = [];
  const fig = drawFigure(width, height, (s) => {
    panels.length = 0;
    const tsize = Math.min(24, (24 * (width - 2 * MARGIN)) / Math.max(1, s.measureText(title, 24, true)));
    s.text(title, MARGIN, MARGIN + 26, { size: tsize, bold: true, color: INK });
    images.forEach((ci, j) => {
      const x = MARGIN + j * (cell + GAP);
      header(s, ci, geometries[j], x, top, cell);
      (['bf', 'df'] as const).forEach((f, r) => {
        panels.push(drawPanel(s, { ci, field: f, window: windows[j][r], geometry: geometries[j] }, x, top + HEADER + r * (cell + GAP), cell));
      });
    });
    captionLines.forEach((t, k) => s.text(t, MARGIN, top + HEADER + 2 * cell + GAP + 30 + k * 21, { size: 15, color: INK }));
  });
  return { ...fig, panels, width, height };
}

function wrapAll(paragraphs: readonly string[], width: number, size: number): string[] {
  return paragraphs.flatMap((p) => wrap(p, width, size, (t, z) => textAdvance(t, z)));
}
