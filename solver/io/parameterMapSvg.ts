import { colormapTable } from './colormap.ts';
import { niceTicks } from './surfaceView.ts';
import { axisValues, MAP_CLASS_LABELS, type MapAxis, type MapCell, type MapClass } from '../analysis/parameterMap.ts';

const CLASS_FILL: Record<Exclude<MapClass, 'turing'>, string> = {
  stable: '#d9d9d9',
  oscillatory: '#e8a0a0',
  unstable: '#6b6b6b',
  'no-state': '#ffffff',
};

const esc = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;');

/**
 * The parameter-plane map as SVG: one cell per grid point, Turing-unstable
 * cells coloured (viridis) by the number of surface modes in the band (or, with
 * no surface, by log₁₀(k²max/k²min)), the other classes in greys and a muted
 * red; labelled axes with ticks, a legend and a colour bar.
 */
export function parameterMapSvg(cells: MapCell[], xAxis: MapAxis, yAxis: MapAxis, title: string): string {
  const W = 640, H = 520, left = 80, right = 200, top = 50, bottom = 70;
  const pw = W - left - right, ph = H - top - bottom;
  const xs = axisValues(xAxis), ys = axisValues(yAxis);
  const cw = pw / xs.length, ch = ph / ys.length;
  const measure = (c: MapCell) => (c.modesInBand !== null ? c.modesInBand : c.band ? Math.log10(c.band[1] / c.band[0]) : 0);
  const turing = cells.filter((c) => c.cls === 'turing');
  const vmax = Math.max(1e-12, ...turing.map(measure));
  const lut = colormapTable('viridis');
  const colour = (v: number) => {
    const k = Math.max(0, Math.min(255, Math.round((v / vmax) * 255)));
    return `rgb(${lut[3 * k]},${lut[3 * k + 1]},${lut[3 * k + 2]})`;
  };
  const px = (x: number) => left + ((x - xAxis.from) / (xAxis.to - xAxis.from || 1)) * (pw - cw) + cw / 2;
  const py = (y: number) => top + ph - (((y - yAxis.from) / (yAxis.to - yAxis.from || 1)) * (ph - ch) + ch / 2);
  const parts: string[] = [];
  parts.push(`<svg xmlns="http://www.w3.org/2000/svg" width="${W}" height="${H}" viewBox="0 0 ${W} ${H}" font-family="Helvetica, Arial, sans-serif" font-size="12">`);
  parts.push(`<rect width="${W}" height="${H}" fill="white"/>`);
  parts.push(`<text x="${left + pw / 2}" y="28" text-anchor="middle" font-size="15">${esc(title)}</text>`);
  cells.forEach((c, k) => {
    const i = k % xs.length, j = Math.floor(k / xs.length);
    const fill = c.cls === 'turing' ? colour(measure(c)) : CLASS_FILL[c.cls];
    parts.push(`<rect class="cell ${c.cls}" x="${(left + i * cw).toFixed(2)}" y="${(top + ph - (j + 1) * ch).toFixed(2)}" width="${(cw + 0.3).toFixed(2)}" height="${(ch + 0.3).toFixed(2)}" fill="${fill}"/>`);
  });
  parts.push(`<rect x="${left}" y="${top}" width="${pw}" height="${ph}" fill="none" stroke="black"/>`);
  for (const t of niceTicks(Math.min(xAxis.from, xAxis.to), Math.max(xAxis.from, xAxis.to))) {
    const x = px(t);
    parts.push(`<line x1="${x.toFixed(2)}" y1="${top + ph}" x2="${x.toFixed(2)}" y2="${top + ph + 5}" stroke="black"/><text class="xtick" x="${x.toFixed(2)}" y="${top + ph + 19}" text-anchor="middle">${t}</text>`);
  }
  for (const t of niceTicks(Math.min(yAxis.from, yAxis.to), Math.max(yAxis.from, yAxis.to))) {
    const y = py(t);
    parts.push(`<line x1="${left - 5}" y1="${y.toFixed(2)}" x2="${left}" y2="${y.toFixed(2)}" stroke="black"/><text class="ytick" x="${left - 8}" y="${(y + 4).toFixed(2)}" text-anchor="end">${t}</text>`);
  }
  parts.push(`<text class="xlabel" x="${left + pw / 2}" y="${H - 25}" text-anchor="middle" font-size="14">${esc(xAxis.name)}</text>`);
  parts.push(`<text class="ylabel" x="22" y="${top + ph / 2}" text-anchor="middle" font-size="14" transform="rotate(-90 22 ${top + ph / 2})">${esc(yAxis.name)}</text>`);
  // legend
  const lx = left + pw + 20;
  let ly = top + 10;
  for (const cls of ['stable', 'oscillatory', 'unstable', 'no-state'] as const) {
    parts.push(`<rect x="${lx}" y="${ly - 10}" width="14" height="14" fill="${CLASS_FILL[cls]}" stroke="#888"/><text x="${lx + 20}" y="${ly + 1}">${esc(MAP_CLASS_LABELS[cls])}</text>`);
    ly += 22;
  }
  ly += 10;
  parts.push(`<text x="${lx}" y="${ly}">${esc(MAP_CLASS_LABELS.turing)}:</text>`);
  parts.push(`<text x="${lx}" y="${ly + 15}" font-size="11">${turing.some((c) => c.modesInBand !== null) ? 'surface modes in band' : 'log₁₀(k²max/k²min)'}</text>`);
  const barTop = ly + 25, barH = 150;
  for (let s = 0; s < 50; s++) {
    const v = vmax * (1 - s / 49);
    parts.push(`<rect x="${lx}" y="${(barTop + (s * barH) / 50).toFixed(2)}" width="18" height="${(barH / 50 + 0.3).toFixed(2)}" fill="${colour(v)}"/>`);
  }
  parts.push(`<rect x="${lx}" y="${barTop}" width="18" height="${barH}" fill="none" stroke="black"/>`);
  parts.push(`<text x="${lx + 24}" y="${barTop + 8}">${Number(vmax.toPrecision(3))}</text><text x="${lx + 24}" y="${barTop + barH}">0</text>`);
  parts.push('</svg>');
  return parts.join('\n') + '\n';
}
