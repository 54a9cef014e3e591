import { plotFrame, polyline } from './plotAxes.ts';
import { FIGURE_TYPE, svgText, typeset } from './figureType.ts';

export interface DispersionMark {
  /** a surface eigenvalue cluster: its mean, multiplicity and growth rate */
  eigenvalue: number;
  multiplicity: number;
  rate: number;
}

export interface DispersionFigureSpec {
  dispersion: { k2: readonly number[]; rate: readonly number[] };
  band: [number, number] | null;
  marks: readonly DispersionMark[];
  predicted: DispersionMark | null;
  /** the horizontal axis: k² (default) or the wavelength 2π/k */
  x?: 'k2' | 'wavelength';
  /** the length unit of the mesh, for the axes (else "length") */
  units?: string;
  title?: string;
  width: number;
  height: number;
  dpi: number;
}

const round = (v: number) => typeset(String(Number(v.toPrecision(4))));

/**
 * The dispersion relation as a figure: the growth rate Re σ(k²) of the
 * analysed steady state against k² (or the wavelength 2π/k), the unstable
 * band shaded, the surface's eigenvalues marked on the curve (λ = k² of each
 * cluster; filled where they grow), the predicted cluster labelled.
 * Axes in the scenario's own units of length and time.
 */
export function dispersionFigureSvg(spec: DispersionFigureSpec): string {
  const byWavelength = spec.x === 'wavelength';
  const wl = (k2: number) => (2 * Math.PI) / Math.sqrt(k2);
  const pairs = spec.dispersion.k2.map((k2, i) => [k2, spec.dispersion.rate[i]] as const).filter(([k2]) => !byWavelength || k2 > 0);
  const k2max = Math.max(...spec.dispersion.k2);
  const positive = Math.max(...pairs.map(([, r]) => r));
  const lowest = Math.min(...pairs.map(([, r]) => r));
  const [yMin, yMax] = positive > 0 ? [Math.max(lowest, -1.5 * positive), 1.25 * positive] : [1.05 * lowest, -0.15 * lowest];
  const xOf = (k2: number) => (byWavelength ? wl(k2) : k2);
  let xMin = 0, xMax = k2max;
  if (byWavelength) {
    xMin = wl(k2max);
    const reference = spec.band ? spec.band[0] : spec.predicted?.eigenvalue ?? k2max / 50;
    xMax = 1.6 * wl(reference);
  }
  const frame = plotFrame({
    width: spec.width, height: spec.height, dpi: spec.dpi, title: spec.title,
    x: { min: xMin, max: xMax, label: byWavelength ? `wavelength 2π/k (${spec.units ?? 'length'})` : `k^{2} (${spec.units ?? 'length'}^{−2})` },
    y: { min: yMin, max: yMax, label: 'growth rate Re σ (time^{−1})' },
  });
  const { X, Y, box, pt } = frame;
  const T = FIGURE_TYPE;
  const out = frame.open();
  if (spec.band) {
    const a = X(xOf(spec.band[0])), b = X(xOf(Math.min(spec.band[1], k2max)));
    const [l, r] = [Math.max(box.left, Math.min(a, b)), Math.min(box.left + box.width, Math.max(a, b))];
    out.push(`<rect class="band" data-from="${spec.band[0]}" data-to="${spec.band[1]}" x="${l.toFixed(2)}" y="${box.top.toFixed(2)}" width="${Math.max(0, r - l).toFixed(2)}" height="${box.height.toFixed(2)}" fill="#e6e6e6"/>`);
    out.push(svgText('unstable band', (l + r) / 2, box.top + T.tick * 1.5 * pt, T.tick * pt, { anchor: 'middle', cls: 'band-label' }));
  }
  if (yMin < 0 && yMax > 0) out.push(`<line x1="${box.left.toFixed(2)}" y1="${Y(0).toFixed(2)}" x2="${(box.left + box.width).toFixed(2)}" y2="${Y(0).toFixed(2)}" stroke="#888888" stroke-width="${(0.5 * pt).toFixed(2)}" stroke-dasharray="${(3 * pt).toFixed(1)},${(2 * pt).toFixed(1)}"/>`);
  const sorted = byWavelength ? pairs.slice().sort((p, q) => xOf(p[0]) - xOf(q[0])) : pairs;
  out.push(polyline(frame, sorted.map(([k2]) => xOf(k2)), sorted.map(([, r]) => r), { stroke: 'black', width: 1.2, cls: 'dispersion' }));
  const inside = (m: DispersionMark) => m.eigenvalue > 0 && m.eigenvalue <= k2max && xOf(m.eigenvalue) >= xMin && xOf(m.eigenvalue) <= xMax && m.rate >= yMin && m.rate <= yMax;
  // every surface eigenvalue in view as a tick along the bottom (its rate may lie below the plot)
  out.push('<g class="rug">');
  for (const m of spec.marks) {
    if (!(m.eigenvalue > 0 && m.eigenvalue <= k2max)) continue;
    const x = X(xOf(m.eigenvalue));
    if (x < box.left || x > box.left + box.width) continue;
    out.push(`<line x1="${x.toFixed(2)}" y1="${(box.top + box.height).toFixed(2)}" x2="${x.toFixed(2)}" y2="${(box.top + box.height - 4 * pt).toFixed(2)}" stroke="#1f4e9c" stroke-width="${(0.6 * pt).toFixed(2)}"/>`);
  }
  out.push('</g>');
  out.push('<g class="modes">');
  for (const m of spec.marks) {
    if (!inside(m)) continue;
    const grows = m.rate > 0;
    out.push(`<circle class="mode" data-eigenvalue="${m.eigenvalue}" data-multiplicity="${m.multiplicity}" data-rate="${m.rate}" cx="${X(xOf(m.eigenvalue)).toFixed(2)}" cy="${Y(m.rate).toFixed(2)}" r="${(2.2 * pt).toFixed(2)}" fill="${grows ? '#1f4e9c' : 'white'}" stroke="${grows ? '#1f4e9c' : '#666666'}" stroke-width="${(0.6 * pt).toFixed(2)}"/>`);
  }
  out.push('</g>');
  if (spec.predicted && inside(spec.predicted)) {
    const p = spec.predicted;
    const cx = X(xOf(p.eigenvalue)), cy = Y(p.rate);
    out.push(`<circle class="predicted" data-eigenvalue="${p.eigenvalue}" data-multiplicity="${p.multiplicity}" data-rate="${p.rate}" cx="${cx.toFixed(2)}" cy="${cy.toFixed(2)}" r="${(3.4 * pt).toFixed(2)}" fill="none" stroke="#c0392b" stroke-width="${(1.2 * pt).toFixed(2)}"/>`);
    const text = `predicted: λ = ${round(p.eigenvalue)}${p.multiplicity > 1 ? ` (×${p.multiplicity})` : ''}, σ = ${round(p.rate)}`;
    const ly = Math.max(box.top + T.tick * 3.2 * pt, cy - 8 * pt);
    const anchor = cx > box.left + 0.6 * box.width ? 'end' : 'start';
    out.push(svgText(text, cx + (anchor === 'end' ? -6 : 6) * pt, ly, T.tick * pt, { anchor, cls: 'predicted-label' }));
  }
  out.push(...frame.axes(), '</svg>');
  return out.join('\n') + '\n';
}
