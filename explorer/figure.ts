/**
 * The explorer's figure as a list of drawing primitives, drawn once into a
 * canvas (what the page shows and the PNG export) and once as SVG text (the
 * SVG export), so both exports show the same figure.
 */
export interface GreyImage {
  readonly width: number;
  readonly height: number;
  /** 8-bit grey levels, row-major, top row first. */
  readonly grey: Uint8Array;
}

export type Shape =
  | { kind: 'image'; x: number; y: number; w: number; h: number; image: GreyImage }
  | { kind: 'rect'; x: number; y: number; w: number; h: number; fill?: string; stroke?: string }
  | { kind: 'line'; points: readonly number[]; stroke: string; width: number; dash?: readonly number[] }
  | { kind: 'polygon'; points: readonly number[]; fill: string; stroke?: string }
  | { kind: 'text'; x: number; y: number; text: string; size: number; fill: string; anchor?: 'start' | 'middle' | 'end'; halo?: string; bold?: boolean };

export interface Figure {
  readonly width: number;
  readonly height: number;
  readonly shapes: readonly Shape[];
}

const FONT = 'DejaVu Sans, Verdana, Arial, sans-serif';

function greyCanvas(img: GreyImage): HTMLCanvasElement {
  const c = document.createElement('canvas');
  c.width = img.width;
  c.height = img.height;
  const ctx = c.getContext('2d')!;
  const data = ctx.createImageData(img.width, img.height);
  for (let i = 0, n = img.width * img.height; i < n; i++) {
    const v = img.grey[i];
    data.data[4 * i] = v;
    data.data[4 * i + 1] = v;
    data.data[4 * i + 2] = v;
    data.data[4 * i + 3] = 255;
  }
  ctx.putImageData(data, 0, 0);
  return c;
}

export function drawFigure(canvas: HTMLCanvasElement, fig: Figure): void {
  canvas.width = fig.width;
  canvas.height = fig.height;
  const ctx = canvas.getContext('2d')!;
  ctx.fillStyle = '#ffffff';
  ctx.fillRect(0, 0, fig.width, fig.height);
  for (const s of fig.shapes) {
    switch (s.kind) {
      case 'image':
        ctx.imageSmoothingEnabled = false;
        ctx.drawImage(greyCanvas(s.image), s.x, s.y, s.w, s.h);
        break;
      case 'rect':
        if (s.fill) {
          ctx.fillStyle = s.fill;
          ctx.fillRect(s.x, s.y, s.w, s.h);
        }
        if (s.stroke) {
          ctx.strokeStyle = s.stroke;
          ctx.lineWidth = 1;
          ctx.strokeRect(s.x + 0.5, s.y + 0.5, s.w - 1, s.h - 1);
        }
        break;
      case 'line':
        ctx.strokeStyle = s.stroke;
        ctx.lineWidth = s.width;
        ctx.setLineDash(s.dash ? [...s.dash] : []);
        ctx.beginPath();
        for (let i = 0; i < s.points.length; i += 2) {
          if (i === 0) ctx.moveTo(s.points[0], s.points[1]);
          else ctx.lineTo(s.points[i], s.points[i + 1]);
        }
        ctx.stroke();
        ctx.setLineDash([]);
        break;
      case 'polygon':
        ctx.fillStyle = s.fill;
        ctx.beginPath();
        for (let i = 0; i < s.points.length; i += 2) {
          if (i === 0) ctx.moveTo(s.points[0], s.points[1]);
          else ctx.lineTo(s.points[i], s.points[i + 1]);
        }
        ctx.closePath();
        ctx.fill();
        if (s.stroke) {
          ctx.strokeStyle = s.stroke;
          ctx.lineWidth = 1;
          ctx.stroke();
        }
        break;
      case 'text':
        ctx.font = `${s.bold ? 'bold ' : ''}${s.size}px ${FONT}`;
        ctx.textAlign = s.anchor === 'middle' ? 'center' : s.anchor === 'end' ? 'right' : 'left';
        ctx.textBaseline = 'alphabetic';
        if (s.halo) {
          ctx.strokeStyle = s.halo;
          ctx.lineWidth = 3;
          ctx.lineJoin = 'round';
          ctx.strokeText(s.text, s.x, s.y);
        }
        ctx.fillStyle = s.fill;
        ctx.fillText(s.text, s.x, s.y);
        break;
    }
  }
}

function esc(t: string): string {
  return t.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
}

const f = (x: number) => String(Math.round(x * 100) / 100);

export function figureSvg(fig: Figure): string {
  const out: string[] = [
    `<svg xmlns="http://www.w3.org/2000/svg" width="${fig.width}" height="${fig.height}" viewBox="0 0 ${fig.width} ${fig.height}">`,
    `<rect x="0" y="0" width="${fig.width}" height="${fig.height}" fill="#ffffff"/>`,
  ];
  for (const s of fig.shapes) {
    switch (s.kind) {
      case 'image':
        out.push(
          `<image x="${f(s.x)}" y="${f(s.y)}" width="${f(s.w)}" height="${f(s.h)}" preserveAspectRatio="none" style="image-rendering:pixelated" href="${greyCanvas(s.image).toDataURL('image/png')}"/>`,
        );
        break;
      case 'rect':
        out.push(`<rect x="${f(s.x)}" y="${f(s.y)}" width="${f(s.w)}" height="${f(s.h)}" fill="${s.fill ?? 'none'}"${s.stroke ? ` stroke="${s.stroke}"` : ''}/>`);
        break;
      case 'line': {
        const pts: string[] = [];
        for (let i = 0; i < s.points.length; i += 2) pts.push(`${f(s.points[i])},${f(s.points[i + 1])}`);
        out.push(`<polyline points="${pts.join(' ')}" fill="none" stroke="${s.stroke}" stroke-width="${s.width}"${s.dash ? ` stroke-dasharray="${s.dash.join(' ')}"` : ''}/>`);
        break;
      }
      case 'polygon': {
        const pts: string[] = [];
        for (let i = 0; i < s.points.length; i += 2) pts.push(`${f(s.points[i])},${f(s.points[i + 1])}`);
        out.push(`<polygon points="${pts.join(' ')}" fill="${s.fill}"${s.stroke ? ` stroke="${s.stroke}"` : ''}/>`);
        break;
      }
      case 'text': {
        const anchor = s.anchor ?? 'start';
        const halo = s.halo ? ` stroke="${s.halo}" stroke-width="3" stroke-linejoin="round" paint-order="stroke"` : '';
        out.push(
          `<text x="${f(s.x)}" y="${f(s.y)}" font-family="${FONT}" font-size="${s.size}"${s.bold ? ' font-weight="bold"' : ''} text-anchor="${anchor}" fill="${s.fill}"${halo}>${esc(s.text)}</text>`,
        );
        break;
      }
    }
  }
  out.push('</svg>');
  return `${out.join('\n')}\n`;
}
