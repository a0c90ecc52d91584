/**
 * The comparison figure: micrographs in the first row, one row per leading
 * candidate below, one column per condition. Each column carries its g (the
 * arrow shows its direction in the micrograph), a scale bar, and per
 * candidate the g.b (or g.R) of that condition. Drawn once through the
 * Surface interface, written as PNG (publication resolution: 2000 px wide,
 * about 170 mm at 300 dpi, a two-column journal figure) and SVG.
 *
 * Every image is contrast-stretched on its own (percentile clip, stretch.ts);
 * the caption says so, and says which micrographs are synthetic.
 */
import { sig } from '../format.js';
import { DEFAULT_MAX_ROTATION_DEG, DEFAULT_MAX_SCALE } from '../analysis/registration.js';
import type { Vec3 } from '../math/vec3.js';
import type { IdentifyResult } from '../analysis/identify.js';
import { fitText } from '../analysis/identifyText.js';
import { drawFigure, type Figure } from './graphics/figure.js';
import { textAdvance } from './graphics/font.js';
import type { RGB, Surface } from './graphics/types.js';
import { autoStretch, stretchToBytes } from './png.js';
import { gArrow, plateText, scaleBar } from './imageMarks.js';

export interface FigureColumn {
  readonly id: string;
  readonly g: Vec3;
  readonly field: 'bf' | 'df';
  /** Deviation, e.g. "w = 0.5" or "s = 0.012 /nm". */
  readonly deviation: string;
  readonly gAngle_deg: number;
  readonly pixel_nm: number;
  readonly width: number;
  readonly height: number;
  readonly micrograph: ArrayLike<number>;
  readonly synthetic: boolean;
}

export interface FigureCell {
  readonly image: ArrayLike<number>;
  /** Short note for the cell, e.g. "g.b = 1". */
  readonly note: string;
  /** Fraction of the micrograph's contrast variance explained. */
  readonly r2: number;
}

export interface FigureRow {
  readonly label: string;
  readonly score: number;
  /** "best": identified; "tie": not excluded by the best (cannot tell); "none". */
  readonly mark: 'best' | 'tie' | 'none';
  readonly cells: readonly FigureCell[];
}

export interface ComparisonFigureData {
  readonly title: string;
  readonly subtitle: string;
  readonly columns: readonly FigureColumn[];
  readonly rows: readonly FigureRow[];
  readonly caption: string;
}

/** Our colours (not taken from any other program): ink, a teal frame for the identified candidate, amber for candidates it cannot exclude. */
const INK: RGB = [28, 28, 32];
const SOFT: RGB = [95, 95, 105];
const TEAL: RGB = [0, 122, 112];
const AMBER: RGB = [205, 125, 0];
const PAPER: RGB = [255, 255, 255];

export const FIGURE_PX = 2000;

export interface FigureLayout {
  readonly width: number;
  readonly height: number;
  readonly margin: number;
  readonly labelWidth: number;
  readonly cellW: number;
  readonly cellH: number;
  readonly gap: number;
  readonly titleH: number;
  readonly headerH: number;
  readonly captionTop: number;
  readonly captionLines: readonly string[];
  /** Top-left of the image cell (row 0 = micrographs). */
  cell(row: number, col: number): { x: number; y: number };
}

const CAPTION_SIZE = 22;
const CAPTION_LEAD = 30;

export function figureLayout(data: ComparisonFigureData, width = FIGURE_PX, measure: (s: string, size: number) => number): FigureLayout {
  const n = Math.max(1, data.columns.length);
  const margin = 40;
  const labelWidth = 330;
  const gap = 18;
  const cellW = Math.max(60, Math.min(560, Math.floor((width - 2 * margin - labelWidth - (n - 1) * gap) / n)));
  const aspect = Math.max(...data.columns.map((c) => c.height / c.width), 0.25);
  const cellH = Math.round(cellW * Math.min(aspect, 1.5));
  const titleH = 110;
  const headerH = 110;
  const rowsTop = margin + titleH + headerH;
  const nRows = 1 + data.rows.length;
  const captionTop = rowsTop + nRows * cellH + (nRows - 1) * gap + 36;
  const captionLines = wrap(data.caption, width - 2 * margin, CAPTION_SIZE, measure);
  const height = Math.ceil(captionTop + captionLines.length * CAPTION_LEAD + margin);
  return {
    width,
    height,
    margin,
    labelWidth,
    cellW,
    cellH,
    gap,
    titleH,
    headerH,
    captionTop,
    captionLines,
    cell: (row, col) => ({ x: margin + labelWidth + col * (cellW + gap), y: rowsTop + row * (cellH + gap) }),
  };
}

/** Greedy word wrap to a width in px. */
export function wrap(text: string, maxWidth: number, size: number, measure: (s: string, size: number) => number): string[] {
  const out: string[] = [];
  for (const para of text.split('\n')) {
    let line = '';
    for (const word of para.split(/\s+/).filter((w) => w !== '')) {
      const trial = line === '' ? word : `${line} ${word}`;
      if (line !== '' && measure(trial, size) > maxWidth) {
        out.push(line);
        line = word;
      } else line = trial;
    }
    out.push(line);
  }
  return out;
}

/** Draw the whole figure on a surface of layout.width x layout.height. */
export function drawComparison(s: Surface, data: ComparisonFigureData, L: FigureLayout): void {
  const { margin } = L;
  // shrink a long title or subtitle to the figure width
  const fit = (text: string, size: number, bold: boolean) => {
    const wText = s.measureText(text, size, bold);
    const avail = s.width - 2 * margin;
    return wText > avail ? Math.max(12, (size * avail) / wText) : size;
  };
  s.text(data.title, margin, margin + 34, { size: fit(data.title, 34, true), bold: true, color: INK });
  s.text(data.subtitle, margin, margin + 80, { size: fit(data.subtitle, 25, false), color: INK });

  data.columns.forEach((c, j) => {
    const { x } = L.cell(0, j);
    const top = margin + L.titleH;
    s.text(c.id, x, top + 30, { size: 28, bold: true, color: INK });
    // a header line longer than the cell is drawn smaller, not into the next column's header
    const within = (text: string, size: number) => Math.min(size, (size * L.cellW) / Math.max(1, s.measureText(text, size, false)));
    const gLine = `g = (${c.g.map(fmtIndex).join(' ')})   ${c.field === 'bf' ? 'bright field' : 'dark field'}`;
    s.text(gLine, x, top + 64, { size: within(gLine, 22), color: INK });
    s.text(c.deviation, x, top + 94, { size: within(c.deviation, 22), color: SOFT });
  });

  // row 0: micrographs
  const anySynthetic = data.columns.some((c) => c.synthetic);
  rowLabel(s, L, 0, ['micrographs', anySynthetic ? '(SYNTHETIC)' : ''], 'none');
  data.columns.forEach((c, j) => {
    const { x, y } = L.cell(0, j);
    const box = drawImage(s, c.micrograph, c.width, c.height, x, y, L.cellW, L.cellH);
    if (c.synthetic) plateText(s, 'synthetic', box.x + 10, box.y + box.h - 14, 20);
    gArrow(s, c.gAngle_deg, box.x + box.w - 58, box.y + 58, 70, 1.3);
    scaleBar(s, c.pixel_nm * c.width, box, 1 / 4, 1.25);
  });

  data.rows.forEach((r, i) => {
    const row = i + 1;
    rowLabel(s, L, row, [`${i + 1}. ${r.label}`, `score ${fmtScore(r.score)}`], r.mark);
    r.cells.forEach((cell, j) => {
      const c = data.columns[j];
      const { x, y } = L.cell(row, j);
      const box = drawImage(s, cell.image, c.width, c.height, x, y, L.cellW, L.cellH);
      if (cell.note !== '') plateText(s, cell.note, box.x + 10, box.y + 34, 24);
      plateText(s, `R² ${fmtScore(cell.r2)}`, box.x + 10, box.y + box.h - 14, 20);
      if (r.mark !== 'none') s.strokeRect(box.x - 4, box.y - 4, box.w + 8, box.h + 8, r.mark === 'best' ? TEAL : AMBER, 6);
    });
  });

  L.captionLines.forEach((line, k) => s.text(line, margin, L.captionTop + k * CAPTION_LEAD, { size: CAPTION_SIZE, color: INK }));
}

function rowLabel(s: Surface, L: FigureLayout, row: number, lines: readonly string[], mark: FigureRow['mark']): void {
  const { y } = L.cell(row, 0);
  const x = L.margin;
  const maxW = L.labelWidth - 24;
  let yy = y + 36;
  const main = wrap(lines[0], maxW, 26, (t, z) => s.measureText(t, z, true));
  for (const t of main) {
    s.text(t, x, yy, { size: 26, bold: true, color: INK });
    yy += 34;
  }
  if (lines[1]) {
    s.text(lines[1], x, yy, { size: 23, color: INK });
    yy += 32;
  }
  if (mark === 'best') s.text('identified', x, yy, { size: 23, bold: true, color: TEAL });
  if (mark === 'tie') s.text('not excluded', x, yy, { size: 23, bold: true, color: AMBER });
}

/** Image fitted into the cell (aspect kept, centred), own contrast stretch; returns where it went. */
function drawImage(s: Surface, img: ArrayLike<number>, w: number, h: number, x: number, y: number, cw: number, ch: number) {
  const k = Math.min(cw / w, ch / h);
  const dw = w * k;
  const dh = h * k;
  const bx = x + (cw - dw) / 2;
  const by = y + (ch - dh) / 2;
  const f = Float32Array.from(img);
  const win = autoStretch(f);
  s.greyImage(stretchToBytes(f, win.lo, win.hi), w, h, bx, by, dw, dh);
  return { x: bx, y: by, w: dw, h: dh };
}

export { niceLength } from './imageMarks.js';

function fmtIndex(x: number): string {
  const r = Math.round(x * 1e6) / 1e6;
  return Number.isInteger(r) ? String(r + 0) : String(r);
}

function fmtScore(x: number): string {
  return Number(x.toFixed(3)).toString();
}

/** A value such as g.b: whole numbers plainly, thirds and halves as fractions. */
export function fmtFraction(x: number): string {
  for (const d of [1, 2, 3, 6]) {
    const n = x * d;
    if (Math.abs(n - Math.round(n)) < 1e-6) return d === 1 ? String(Math.round(n) + 0) : `${Math.round(n)}/${d}`;
  }
  return Number(x.toPrecision(3)).toString();
}

/** The figure's content from an identification result. */
export function comparisonFigureData(res: IdentifyResult): ComparisonFigureData {
  const v = res.verdict;
  const columns: FigureColumn[] = res.micrographs.map((m) => ({
    id: m.conditionId,
    g: m.condition.g,
    field: m.settings.field,
    deviation: `${m.resolved.deviationSource === 'w' ? `w = ${sig(m.resolved.w, 3)}` : m.resolved.deviationSource === 's' ? `s = ${sig(m.resolved.s_per_nm, 3)} /nm` : `${m.resolved.deviationSource}, s = ${sig(m.resolved.s_per_nm, 3)} /nm`}, t = ${sig(m.resolved.frame.thickness_nm, 3)} nm${Math.abs(m.resolved.frame.columnLength_nm - m.resolved.frame.thickness_nm) > 0.01 * m.resolved.frame.thickness_nm ? ` (column ${sig(m.resolved.frame.columnLength_nm, 3)} nm)` : ''}`,
    gAngle_deg: m.gAngle_deg,
    pixel_nm: m.pixel_nm,
    width: m.width,
    height: m.height,
    micrograph: m.image.data,
    synthetic: m.synthetic,
  }));
  const rows: FigureRow[] = res.leaderImages.map((imgs, r) => {
    const rc = res.ranking[r];
    const mark: FigureRow['mark'] = v.decision === 'identified' ? (r === 0 ? 'best' : 'none') : v.indistinguishable.includes(rc.candidate) ? 'tie' : 'none';
    return {
      label: rc.candidate,
      score: rc.score,
      mark,
      cells: imgs.map((image, j) => {
        const pc = rc.perCondition[j];
        const note = pc.visibility.quantity === '' || pc.visibility.value === undefined ? '' : `${pc.visibility.quantity} = ${fmtFraction(pc.visibility.value)}`;
        return { image, note, r2: pc.r2 };
      }),
    };
  });
  const synth = res.micrographs.filter((m) => m.synthetic).map((m) => m.conditionId);
  const micrographNote =
    synth.length === 0
      ? 'Top row: the micrographs as given (cropped, binned).'
      : synth.length === res.micrographs.length
        ? 'Top row: SYNTHETIC micrographs, made by thinfoil from a hidden candidate with added blur, background gradient and noise; they are not measurements.'
        : `Top row: the micrographs as given; ${synth.join(', ')} ${synth.length === 1 ? 'is' : 'are'} SYNTHETIC (made by thinfoil, not measured).`;
  const caption = [
    micrographNote,
    `Rows below: simulated images of the ${rows.length} leading candidates (two-beam Howie-Whelan equations, column approximation, ${res.elasticity.startsWith('anisotropic') ? 'anisotropic' : 'isotropic'} elasticity, ${res.surfaces.startsWith('relaxed') ? 'relaxed foil surfaces' : 'infinite medium'}: a model, not a measurement), each registered to its micrograph (shift, rotation up to ${DEFAULT_MAX_ROTATION_DEG} degrees, scale up to ${100 * DEFAULT_MAX_SCALE} %). ` +
      'Every image is contrast-stretched on its own (0.5 % of the pixels clipped at each end). Arrow: direction of g in the micrograph. ' +
      "R²: fraction of the micrograph's contrast variance explained by the simulation; score: its mean over the micrographs, with one contrast scale shared by the micrographs.",
    ...(res.ranking[0]?.fit ? [`Fitted for ${res.ranking[0].candidate}: ${fitText(res.ranking[0].fit)}.`] : []),
    `Verdict: ${v.statement}`,
  ].join('\n');
  return {
    title: `${res.scenario}: which candidate explains the micrographs?`,
    subtitle: `defect ${res.defectLabel}: ${res.candidates.length} candidates compared over ${res.micrographs.length} micrograph${res.micrographs.length === 1 ? '' : 's'}; verdict: ${v.decision === 'identified' ? `identified ${v.best}` : v.decision}`,
    columns,
    rows,
    caption,
  };
}

/** The figure as PNG bytes and SVG text, drawn once per surface. */
export function comparisonFigure(data: ComparisonFigureData, width = FIGURE_PX): Figure & { layout: FigureLayout } {
  const layout = figureLayout(data, width, (t, z) => textAdvance(t, z));
  return { ...drawFigure(layout.width, layout.height, (s) => drawComparison(s, data, layout), PAPER), layout };
}
