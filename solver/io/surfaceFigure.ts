import type { Mesh } from '../mesh/Mesh.ts';
import { colorizeField, colormapTable, type ColormapName } from './colormap.ts';
import { projectSurface, fitScale, niceTicks, tickLabel } from './surfaceView.ts';
import { rasterSurfaces, SHADING_AMBIENT, type Shading } from './surfaceRaster.ts';
import { encodePng, base64 } from './encodePng.ts';
import { FIGURE_FONT_FAMILY, FIGURE_TYPE, textWidthEm, svgText, typeset } from './figureType.ts';

export interface FigurePanel {
  /** the surface and its values; without them the cell is left blank (a sweep's unfinished run) */
  mesh?: Mesh;
  values?: ArrayLike<number>;
  /** caption under the panel (time, parameter value, eigenvalue) */
  label?: string;
}

export interface FigureSpec {
  panels: FigurePanel[];
  /** grid columns for several panels (a contact sheet) */
  columns?: number;
  /** what the colour bar is titled with (the species or field) */
  species: string;
  colormap: ColormapName;
  /** colour range; default: over all panels */
  range?: [number, number];
  view: { azimuth: number; elevation: number };
  title?: string;
  /** size in pixels; the text is sized in points, so `dpi` (default 150) sets its size in pixels */
  width: number;
  height: number;
  dpi?: number;
  /** lighting of the surface (default soft) */
  shading?: Shading;
  /** the surface as an embedded image under vector text (default), or as vector triangles */
  surface?: 'image' | 'vector';
}

interface Box { left: number; top: number; width: number; height: number }

interface Layout {
  /** pixels per point */
  pt: number;
  cells: Box[];
  /** one scale for every panel (pixels per unit), so a growing surface is seen growing */
  scale: number;
  bar: Box;
  range: [number, number];
  ticks: { value: number; label: string; end: boolean }[];
}

/** Colour range over the panels (or the given one), widened when flat. */
function panelRange(spec: FigureSpec): [number, number] {
  if (spec.range) return spec.range;
  let lo = Infinity, hi = -Infinity;
  for (const p of spec.panels) if (p.values) for (let i = 0; i < p.values.length; i++) { lo = Math.min(lo, p.values[i]); hi = Math.max(hi, p.values[i]); }
  if (!(lo <= hi)) lo = hi = 0;
  return hi > lo ? [lo, hi] : [lo - 0.5, lo + 0.5];
}

/** An end value of the colour bar: four significant figures. */
function endLabel(v: number): string {
  if (v === 0) return '0';
  const a = Math.abs(v);
  return typeset(a >= 1e4 || a < 1e-3 ? v.toExponential(2) : String(Number(v.toPrecision(4))));
}

function layout(spec: FigureSpec): Layout {
  const pt = (spec.dpi ?? 150) / 72;
  const T = FIGURE_TYPE;
  const range = panelRange(spec);
  const margin = T.margin * pt;
  const top = margin + (spec.title ? T.title * 1.7 * pt : 0);
  // colour bar: its ticks' labels decide the space it takes
  const tickPx = T.tick * pt;
  const nice = niceTicks(range[0], range[1]);
  const labels = [endLabel(range[0]), endLabel(range[1]), ...nice.map((v) => typeset(tickLabel(v)))];
  const labelWidth = Math.max(...labels.map((l) => textWidthEm(l))) * tickPx;
  const speciesWidth = textWidthEm(spec.species) * T.barTitle * pt;
  const barSpace = Math.max(margin + T.barWidth * pt + T.tickLength * pt + T.tickGap * pt + labelWidth + margin, speciesWidth + 2 * margin);
  const cols = Math.max(1, Math.min(spec.columns ?? Math.ceil(Math.sqrt(spec.panels.length)), spec.panels.length));
  const rows = Math.ceil(spec.panels.length / cols);
  const captionSpace = (spec.panels.some((p) => p.label) ? T.caption * 1.8 : 0) * pt;
  const cw = (spec.width - barSpace - margin) / cols, ch = (spec.height - top - margin) / rows;
  const cells = spec.panels.map((_, k) => ({ left: margin + (k % cols) * cw, top: top + Math.floor(k / cols) * ch, width: cw, height: Math.max(1, ch - captionSpace) }));
  const barTitleSpace = T.barTitle * 2 * pt;
  const available = spec.height - top - margin - barTitleSpace - tickPx;
  const barH = Math.max(20 * pt, Math.min(available, 0.75 * (spec.height - top - margin)));
  const bar = { left: spec.width - barSpace + margin, top: top + barTitleSpace + (available - barH) / 2, width: T.barWidth * pt, height: barH };
  const yOf = (v: number) => bar.top + bar.height * (1 - (v - range[0]) / (range[1] - range[0]));
  // the end values always; a round tick only where its label stays clear of the ends' labels
  const ticks = [{ value: range[0], label: endLabel(range[0]), end: true }, { value: range[1], label: endLabel(range[1]), end: true }];
  for (const v of nice) {
    if (Math.abs(yOf(v) - yOf(range[0])) > 1.5 * tickPx && Math.abs(yOf(v) - yOf(range[1])) > 1.5 * tickPx) ticks.push({ value: v, label: typeset(tickLabel(v)), end: false });
  }
  const scale = Math.min(...spec.panels.map((p, k) => (p.mesh ? fitScale(p.mesh, spec.view, cells[k]) : Infinity)));
  return { pt, cells, scale: Number.isFinite(scale) ? scale : 1, bar, range, ticks };
}

/**
 * A figure of the coloured surface (or a sheet of several, with captions) as
 * SVG: by default the surfaces as one embedded PNG (z-buffered, antialiased,
 * at the figure's pixel size) under vector text, so a sheet of many frames
 * stays small; with `surface: 'vector'` as depth-sorted triangles (painter's
 * algorithm). A colour bar with its end values and round ticks clear of their
 * labels, the species (or field) above it, an optional title. Text is sized in
 * points: the SVG's physical size is width × height pixels at `dpi`.
 */
export function surfaceFigureSvg(spec: FigureSpec): string {
  const L = layout(spec);
  const T = FIGURE_TYPE, pt = L.pt;
  const dpi = spec.dpi ?? 150;
  const shading = spec.shading ?? 'soft';
  const W = spec.width, H = spec.height;
  const out: string[] = [
    `<svg xmlns="http://www.w3.org/2000/svg" width="${((W * 72) / dpi).toFixed(2)}pt" height="${((H * 72) / dpi).toFixed(2)}pt" viewBox="0 0 ${W} ${H}" font-family="${FIGURE_FONT_FAMILY}">`,
    `<rect width="${W}" height="${H}" fill="white"/>`,
  ];
  const drawn = spec.panels.flatMap((p, k) => (p.mesh && p.values ? [{ mesh: p.mesh, values: p.values, box: L.cells[k] }] : []));
  if ((spec.surface ?? 'image') === 'image') {
    if (drawn.length) {
      const image = rasterSurfaces(drawn, W, H, { colormap: spec.colormap, range: L.range, view: spec.view, scale: L.scale, shading });
      out.push(`<image class="surface" x="0" y="0" width="${W}" height="${H}" href="data:image/png;base64,${base64(encodePng(image))}"/>`);
    }
  } else {
    for (const panel of drawn) out.push(...vectorSurface(panel, spec, L, SHADING_AMBIENT[shading]));
  }
  if (spec.title) out.push(svgText(spec.title, L.bar.left / 2, T.margin * pt + T.title * pt, T.title * pt, { anchor: 'middle', cls: 'title' }));
  spec.panels.forEach((panel, k) => {
    const cell = L.cells[k];
    if (panel.label) out.push(svgText(panel.label, cell.left + cell.width / 2, cell.top + cell.height + T.caption * 1.3 * pt, T.caption * pt, { anchor: 'middle', cls: 'label' }));
  });
  out.push(...colourBar(spec, L));
  out.push('</svg>');
  return out.join('\n') + '\n';
}

/** A panel's triangles, back to front, each filled with the mean of its vertex colours times the shade. */
function vectorSurface(panel: { mesh: Mesh; values: ArrayLike<number>; box: Box }, spec: FigureSpec, L: Layout, ambient: number): string[] {
  const v = projectSurface(panel.mesh, spec.view, panel.box, ambient, L.scale);
  const colors = colorizeField(panel.values, spec.colormap, L.range);
  const tri = panel.mesh.triangles;
  const order = Array.from({ length: tri.length / 3 }, (_, t) => t);
  const depth = (t: number) => v.depth[tri[3 * t]] + v.depth[tri[3 * t + 1]] + v.depth[tri[3 * t + 2]];
  order.sort((a, b) => depth(a) - depth(b));
  const out = ['<g class="surface">'];
  for (const t of order) {
    const a = tri[3 * t], b = tri[3 * t + 1], c = tri[3 * t + 2];
    const s = (v.shade[a] + v.shade[b] + v.shade[c]) / 3;
    const rgb = [0, 1, 2].map((d) => Math.round(((colors[3 * a + d] + colors[3 * b + d] + colors[3 * c + d]) / 3) * s));
    const fill = `rgb(${rgb.join(',')})`;
    out.push(`<polygon points="${v.x[a].toFixed(1)},${v.y[a].toFixed(1)} ${v.x[b].toFixed(1)},${v.y[b].toFixed(1)} ${v.x[c].toFixed(1)},${v.y[c].toFixed(1)}" fill="${fill}" stroke="${fill}" stroke-width="0.4"/>`);
  }
  out.push('</g>');
  return out;
}

/** The colour bar: the colormap as a gradient, framed, with ticks and labels to its right and the species above. */
function colourBar(spec: FigureSpec, L: Layout): string[] {
  const T = FIGURE_TYPE, pt = L.pt, B = L.bar;
  const lut = colormapTable(spec.colormap);
  const stops: string[] = [];
  for (let s = 0; s <= 32; s++) {
    const k = Math.round((s / 32) * 255);
    stops.push(`<stop offset="${(s / 32).toFixed(4)}" stop-color="rgb(${lut[3 * k]},${lut[3 * k + 1]},${lut[3 * k + 2]})"/>`);
  }
  const out = [
    '<g class="colorbar">',
    `<defs><linearGradient id="bar" x1="0" y1="1" x2="0" y2="0">${stops.join('')}</linearGradient></defs>`,
    `<rect x="${B.left.toFixed(2)}" y="${B.top.toFixed(2)}" width="${B.width.toFixed(2)}" height="${B.height.toFixed(2)}" fill="url(#bar)" stroke="black" stroke-width="${(0.5 * pt).toFixed(2)}"/>`,
  ];
  const x0 = B.left + B.width, x1 = x0 + T.tickLength * pt, tx = x1 + T.tickGap * pt;
  for (const t of L.ticks) {
    const y = B.top + B.height * (1 - (t.value - L.range[0]) / (L.range[1] - L.range[0]));
    out.push(`<line class="${t.end ? 'end' : 'tick'}" x1="${x0.toFixed(2)}" y1="${y.toFixed(2)}" x2="${x1.toFixed(2)}" y2="${y.toFixed(2)}" stroke="black" stroke-width="${(0.5 * pt).toFixed(2)}"/>`);
    out.push(svgText(t.label, tx, y + 0.36 * T.tick * pt, T.tick * pt, { cls: t.end ? 'end' : 'tick' }));
  }
  out.push(svgText(spec.species, B.left + B.width / 2, B.top - T.barTitle * 0.8 * pt, T.barTitle * pt, { anchor: 'middle', cls: 'species' }));
  out.push('</g>');
  return out;
}
