/** The colour bar beside the surface: the colormap, its range and the species, drawn on a canvas. */
import { colormapTable, type ColormapName } from '../../solver/io/colormap.ts';
import { niceTicks, tickLabel } from '../../solver/io/surfaceView.ts';

/** `background`: an opaque fill behind bar and labels (an exported picture), else transparent. `scale`: whole pixels per unit. */
export function drawColorBar(canvas: HTMLCanvasElement, colormap: ColormapName, range: [number, number], species: string, scale = 1, background?: string): void {
  const w = 86 * scale, h = 260 * scale;
  canvas.width = w;
  canvas.height = h;
  const g = canvas.getContext('2d')!;
  g.clearRect(0, 0, w, h);
  if (background) { g.fillStyle = background; g.fillRect(0, 0, w, h); }
  const lut = colormapTable(colormap);
  const top = 26 * scale, bottom = h - 12 * scale, left = 8 * scale, barW = 16 * scale;
  for (let y = top; y < bottom; y++) {
    const k = Math.round((1 - (y - top) / (bottom - top)) * 255);
    g.fillStyle = `rgb(${lut[3 * k]},${lut[3 * k + 1]},${lut[3 * k + 2]})`;
    g.fillRect(left, y, barW, 1);
  }
  g.strokeStyle = '#222';
  g.lineWidth = scale;
  g.strokeRect(left, top, barW, bottom - top);
  g.fillStyle = '#222';
  g.font = `${12 * scale}px "DejaVu Sans", system-ui, sans-serif`;
  g.fillText(species, left, 16 * scale);
  const [lo, hi] = range;
  if (!(hi > lo)) return;
  for (const t of niceTicks(lo, hi)) {
    const y = bottom - ((t - lo) / (hi - lo)) * (bottom - top);
    g.fillRect(left + barW, y, 5 * scale, scale);
    g.fillText(tickLabel(t), left + barW + 8 * scale, y + 4 * scale);
  }
}
