import { PNG } from 'pngjs';
import type { Mesh } from '../mesh/Mesh.ts';
import { colorizeField, colormapTable, type ColormapName } from './colormap.ts';
import { projectSurface, fitScale, niceTicks, tickLabel } from './surfaceView.ts';
import { drawText, textWidth, GLYPH_HEIGHT } from './bitmapFont.ts';

export interface FigurePanel {
  /** the surface and its values; without them the cell is left blank (a sweep's unfinished run) */
  mesh?: Mesh;
  values?: ArrayLike<number>;
  /** caption under the panel (time, parameter value) */
  label?: string;
}

export interface FigureSpec {
  panels: FigurePanel[];
  /** grid columns for several panels (a contact sheet) */
  columns?: number;
  species: string;
  colormap: ColormapName;
  /** colour range; default: over all panels */
  range?: [number, number];
  view: { azimuth: number; elevation: number };
  title?: string;
  width: number;
  height: number;
}

interface Layout {
  cells: { left: number; top: number; width: number; height: number }[];
  /** one scale for every panel (pixels per unit), so a growing surface is seen growing */
  scale: number;
  bar: { left: number; top: number; width: number; height: number };
  titleY: number;
  range: [number, number];
}

const BAR_SPACE = 120;

function layout(spec: FigureSpec, unit = 1): Layout {
  let lo = Infinity, hi = -Infinity;
  for (const p of spec.panels) if (p.values) for (let i = 0; i < p.values.length; i++) { lo = Math.min(lo, p.values[i]); hi = Math.max(hi, p.values[i]); }
  if (!(lo <= hi)) lo = hi = 0;
  const range: [number, number] = spec.range ?? (hi > lo ? [lo, hi] : [lo - 0.5, lo + 0.5]);
  const u = unit;
  const top = (spec.title ? 40 : 12) * u;
  const cols = Math.max(1, Math.min(spec.columns ?? Math.ceil(Math.sqrt(spec.panels.length)), spec.panels.length));
  const rows = Math.ceil(spec.panels.length / cols);
  const labelSpace = (spec.panels.some((p) => p.label) ? 22 : 0) * u;
  const cw = (spec.width - (BAR_SPACE + 12) * u) / cols, ch = (spec.height - top - 12 * u) / rows;
  const cells = spec.panels.map((_, k) => ({ left: 12 * u + (k % cols) * cw, top: top + Math.floor(k / cols) * ch, width: cw, height: ch - labelSpace }));
  const barH = Math.min(spec.height - top - 60 * u, 320 * u);
  const scale = Math.min(...spec.panels.map((p, k) => (p.mesh ? fitScale(p.mesh, spec.view, cells[k]) : Infinity)));
  return { scale: Number.isFinite(scale) ? scale : 1, cells, bar: { left: spec.width - (BAR_SPACE - 20) * u, top: top + (spec.height - top - barH) / 2, width: 18 * u, height: barH }, titleY: 26 * u, range };
}

const esc = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;');

/**
 * The coloured surface as true vector SVG: triangles depth-sorted back to front
 * (painter's algorithm), each filled with the mean of its vertex colours times
 * a headlight shade; a colour bar with labelled ticks and the species name;
 * an optional title; several panels make a contact sheet with captions.
 */
export function surfaceFigureSvg(spec: FigureSpec): string {
  const L = layout(spec);
  const out: string[] = [`<svg xmlns="http://www.w3.org/2000/svg" width="${spec.width}" height="${spec.height}" viewBox="0 0 ${spec.width} ${spec.height}" font-family="Helvetica, Arial, sans-serif" font-size="13">`, `<rect width="${spec.width}" height="${spec.height}" fill="white"/>`];
  if (spec.title) out.push(`<text class="title" x="${(spec.width - BAR_SPACE) / 2}" y="${L.titleY}" text-anchor="middle" font-size="17">${esc(spec.title)}</text>`);
  spec.panels.forEach((panel, k) => {
    const cell = L.cells[k];
    if (panel.label) out.push(`<text class="label" x="${cell.left + cell.width / 2}" y="${cell.top + cell.height + 16}" text-anchor="middle">${esc(panel.label)}</text>`);
    if (!panel.mesh || !panel.values) return;
    const v = projectSurface(panel.mesh, spec.view, cell, undefined, L.scale);
    const colors = colorizeField(panel.values, spec.colormap, L.range);
    const tri = panel.mesh.triangles;
    const order = Array.from({ length: tri.length / 3 }, (_, t) => t);
    const depth = (t: number) => v.depth[tri[3 * t]] + v.depth[tri[3 * t + 1]] + v.depth[tri[3 * t + 2]];
    order.sort((a, b) => depth(a) - depth(b));
    out.push(`<g class="surface">`);
    for (const t of order) {
      const a = tri[3 * t], b = tri[3 * t + 1], c = tri[3 * t + 2];
      const s = (v.shade[a] + v.shade[b] + v.shade[c]) / 3;
      const rgb = [0, 1, 2].map((d) => Math.round(((colors[3 * a + d] + colors[3 * b + d] + colors[3 * c + d]) / 3) * s));
      const fill = `rgb(${rgb.join(',')})`;
      out.push(`<polygon points="${v.x[a].toFixed(1)},${v.y[a].toFixed(1)} ${v.x[b].toFixed(1)},${v.y[b].toFixed(1)} ${v.x[c].toFixed(1)},${v.y[c].toFixed(1)}" fill="${fill}" stroke="${fill}" stroke-width="0.4"/>`);
    }
    out.push('</g>');
  });
  const lut = colormapTable(spec.colormap);
  const B = L.bar, steps = 64;
  out.push(`<g class="colorbar">`);
  for (let s = 0; s < steps; s++) {
    const k = Math.round(((steps - 1 - s) / (steps - 1)) * 255);
    out.push(`<rect x="${B.left}" y="${(B.top + (s * B.height) / steps).toFixed(2)}" width="${B.width}" height="${(B.height / steps + 0.4).toFixed(2)}" fill="rgb(${lut[3 * k]},${lut[3 * k + 1]},${lut[3 * k + 2]})"/>`);
  }
  out.push(`<rect x="${B.left}" y="${B.top}" width="${B.width}" height="${B.height}" fill="none" stroke="black"/>`);
  for (const t of niceTicks(L.range[0], L.range[1])) {
    const y = B.top + B.height * (1 - (t - L.range[0]) / (L.range[1] - L.range[0]));
    out.push(`<line x1="${B.left + B.width}" y1="${y.toFixed(2)}" x2="${B.left + B.width + 5}" y2="${y.toFixed(2)}" stroke="black"/><text class="tick" x="${B.left + B.width + 8}" y="${(y + 4).toFixed(2)}">${tickLabel(t)}</text>`);
  }
  out.push(`<text class="species" x="${B.left + B.width / 2}" y="${B.top - 10}" text-anchor="middle" font-size="15">${esc(spec.species)}</text>`);
  out.push('</g>', '</svg>');
  return out.join('\n') + '\n';
}

/**
 * The same figure rasterised (z-buffer, Gouraud-interpolated colours, 2×2
 * supersampling) into a PNG of `width`×`height` pixels, with the DPI recorded
 * in a pHYs chunk. Labels use the built-in 5×7 pixel font.
 */
export function surfaceFigurePng(spec: FigureSpec, dpi = 150): Uint8Array {
  const ss = 2;
  const W = spec.width * ss, H = spec.height * ss;
  const L = layout({ ...spec, width: W, height: H }, ss);
  const rgb = new Float32Array(W * H * 3).fill(255);
  const zbuf = new Float64Array(W * H).fill(-Infinity);
  spec.panels.forEach((panel, k) => {
    if (!panel.mesh || !panel.values) return;
    const v = projectSurface(panel.mesh, spec.view, L.cells[k], undefined, L.scale);
    const colors = colorizeField(panel.values, spec.colormap, L.range);
    const tri = panel.mesh.triangles;
    for (let t = 0; t < tri.length; t += 3) {
      const a = tri[t], b = tri[t + 1], c = tri[t + 2];
      const x0 = v.x[a], y0 = v.y[a], x1 = v.x[b], y1 = v.y[b], x2 = v.x[c], y2 = v.y[c];
      const den = (y1 - y2) * (x0 - x2) + (x2 - x1) * (y0 - y2);
      if (den === 0) continue;
      const minX = Math.max(0, Math.floor(Math.min(x0, x1, x2))), maxX = Math.min(W - 1, Math.ceil(Math.max(x0, x1, x2)));
      const minY = Math.max(0, Math.floor(Math.min(y0, y1, y2))), maxY = Math.min(H - 1, Math.ceil(Math.max(y0, y1, y2)));
      for (let py = minY; py <= maxY; py++) {
        for (let px = minX; px <= maxX; px++) {
          const qx = px + 0.5, qy = py + 0.5;
          const w0 = ((y1 - y2) * (qx - x2) + (x2 - x1) * (qy - y2)) / den;
          const w1 = ((y2 - y0) * (qx - x2) + (x0 - x2) * (qy - y2)) / den;
          const w2 = 1 - w0 - w1;
          if (w0 < -1e-9 || w1 < -1e-9 || w2 < -1e-9) continue;
          const z = w0 * v.depth[a] + w1 * v.depth[b] + w2 * v.depth[c];
          const o = py * W + px;
          if (z <= zbuf[o]) continue;
          zbuf[o] = z;
          const s = w0 * v.shade[a] + w1 * v.shade[b] + w2 * v.shade[c];
          for (let d = 0; d < 3; d++) rgb[3 * o + d] = (w0 * colors[3 * a + d] + w1 * colors[3 * b + d] + w2 * colors[3 * c + d]) * s;
        }
      }
    }
  });
  const ink = (r: number, g: number, b: number) => (px: number, py: number) => {
    if (px < 0 || py < 0 || px >= W || py >= H) return;
    const o = 3 * (py * W + px);
    rgb[o] = r; rgb[o + 1] = g; rgb[o + 2] = b;
  };
  const black = ink(0, 0, 0);
  const lut = colormapTable(spec.colormap);
  const B = L.bar;
  for (let py = Math.round(B.top); py < Math.round(B.top + B.height); py++) {
    const k = Math.round((1 - (py - B.top) / B.height) * 255);
    for (let px = Math.round(B.left); px < Math.round(B.left + B.width); px++) ink(lut[3 * k], lut[3 * k + 1], lut[3 * k + 2])(px, py);
  }
  for (let px = Math.round(B.left); px <= Math.round(B.left + B.width); px++) { black(px, Math.round(B.top)); black(px, Math.round(B.top + B.height)); }
  for (let py = Math.round(B.top); py <= Math.round(B.top + B.height); py++) { black(Math.round(B.left), py); black(Math.round(B.left + B.width), py); }
  const scale = 2 * ss;
  for (const t of niceTicks(L.range[0], L.range[1])) {
    const y = Math.round(B.top + B.height * (1 - (t - L.range[0]) / (L.range[1] - L.range[0])));
    for (let dx = 0; dx < 5 * ss; dx++) for (let w = 0; w < ss; w++) black(Math.round(B.left + B.width) + dx, y + w);
    drawText(tickLabel(t), Math.round(B.left + B.width + 8 * ss), y - Math.round((GLYPH_HEIGHT * scale) / 2), scale, black);
  }
  drawText(spec.species, Math.round(B.left + B.width / 2 - textWidth(spec.species, scale) / 2), Math.round(B.top - 12 * ss - GLYPH_HEIGHT * scale), scale, black);
  if (spec.title) drawText(spec.title, Math.round((W - BAR_SPACE * ss) / 2 - textWidth(spec.title, scale) / 2), 8 * ss, scale, black);
  spec.panels.forEach((panel, k) => {
    if (!panel.label) return;
    const cell = L.cells[k];
    drawText(panel.label, Math.round(cell.left + cell.width / 2 - textWidth(panel.label, scale) / 2), Math.round(cell.top + cell.height + 4 * ss), scale, black);
  });
  // 2×2 box filter down to the figure size
  const png = new PNG({ width: spec.width, height: spec.height });
  for (let y = 0; y < spec.height; y++) {
    for (let x = 0; x < spec.width; x++) {
      for (let d = 0; d < 3; d++) {
        let s = 0;
        for (let a = 0; a < ss; a++) for (let b = 0; b < ss; b++) s += rgb[3 * ((y * ss + a) * W + x * ss + b) + d];
        png.data[4 * (y * spec.width + x) + d] = Math.round(s / (ss * ss));
      }
      png.data[4 * (y * spec.width + x) + 3] = 255;
    }
  }
  return withPhys(new Uint8Array(PNG.sync.write(png)), dpi);
}

/** Insert a pHYs chunk (pixels per metre) after IHDR: the PNG standard's way to record DPI. */
function withPhys(png: Uint8Array, dpi: number): Uint8Array {
  const ppm = Math.round(dpi / 0.0254);
  const chunk = new Uint8Array(4 + 4 + 9 + 4);
  const view = new DataView(chunk.buffer);
  view.setUint32(0, 9);
  chunk.set([0x70, 0x48, 0x59, 0x73], 4); // "pHYs"
  view.setUint32(8, ppm);
  view.setUint32(12, ppm);
  chunk[16] = 1; // unit: metre
  view.setUint32(17, crc32(chunk.subarray(4, 17)));
  const ihdrEnd = 8 + 4 + 4 + 13 + 4;
  const out = new Uint8Array(png.length + chunk.length);
  out.set(png.subarray(0, ihdrEnd), 0);
  out.set(chunk, ihdrEnd);
  out.set(png.subarray(ihdrEnd), ihdrEnd + chunk.length);
  return out;
}

function crc32(bytes: Uint8Array): number {
  let c = 0xffffffff;
  for (const b of bytes) {
    c ^= b;
    for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
  }
  return (c ^ 0xffffffff) >>> 0;
}
