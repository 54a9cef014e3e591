/**
 * The dispersion relation of the analysed steady state, growth rate against
 * k² (the Laplace–Beltrami eigenvalue), as SVG: the curve, zero line, the
 * unstable band shaded, and the surface's own eigenvalues as marks on the
 * curve (filled when they grow). Clicking a mark asks to paint that mode.
 */
import type { StabilityView } from './protocol.ts';
import { fmt } from './dom.ts';

const NS = 'http://www.w3.org/2000/svg';

function svg<K extends keyof SVGElementTagNameMap>(tag: K, attrs: Record<string, string | number>): SVGElementTagNameMap[K] {
  const e = document.createElementNS(NS, tag);
  for (const [k, v] of Object.entries(attrs)) e.setAttribute(k, String(v));
  return e;
}

export function drawDispersion(target: HTMLElement, view: StabilityView, onMode: (index: number) => void): void {
  const W = 520, H = 210, L = 74, R = 16, T = 12, B = 38;
  const root = svg('svg', { viewBox: `0 0 ${W} ${H}`, preserveAspectRatio: 'xMinYMin meet', id: 'dispersion-plot', role: 'img', 'aria-label': 'dispersion relation with surface eigenvalues' });
  const k2 = view.dispersion.k2, rate = view.dispersion.rate;
  if (!k2.length) {
    target.replaceChildren(root);
    return;
  }
  const kMax = Math.max(k2[k2.length - 1], ...view.eigenvalues.filter((l) => l <= k2[k2.length - 1] * 1.0001));
  const finite = rate.filter(Number.isFinite);
  let lo = Math.min(...finite, 0), hi = Math.max(...finite, 0);
  if (hi - lo < 1e-12) { lo -= 1; hi += 1; }
  const pad = 0.08 * (hi - lo);
  lo -= pad; hi += pad;
  const x = (v: number) => L + ((W - L - R) * v) / kMax;
  const y = (v: number) => T + ((H - T - B) * (hi - v)) / (hi - lo);
  if (view.band) {
    const b1 = Math.min(view.band[1], kMax);
    root.append(svg('rect', { x: x(view.band[0]), y: T, width: Math.max(1, x(b1) - x(view.band[0])), height: H - T - B, fill: '#f3dccb', class: 'band' }));
  }
  root.append(svg('line', { x1: L, x2: W - R, y1: y(0), y2: y(0), stroke: '#777', 'stroke-dasharray': '4 3' }));
  root.append(svg('line', { x1: L, x2: L, y1: T, y2: H - B, stroke: '#333' }));
  root.append(svg('line', { x1: L, x2: W - R, y1: H - B, y2: H - B, stroke: '#333' }));
  const path = k2.map((k, i) => `${i ? 'L' : 'M'}${x(k).toFixed(1)},${y(Math.max(lo, Math.min(hi, rate[i]))).toFixed(1)}`).join('');
  root.append(svg('path', { d: path, fill: 'none', stroke: '#8a3b12', 'stroke-width': 2, class: 'curve' }));
  view.eigenvalues.forEach((l, i) => {
    if (l > kMax || i === 0) return;
    const r = view.rates[i];
    const growing = r > 0;
    const mark = svg('circle', { cx: x(l), cy: y(Math.max(lo, Math.min(hi, r))), r: growing ? 4 : 2.5, fill: growing ? '#1d5a8c' : '#fff', stroke: '#1d5a8c', class: 'mode-mark', 'data-mode': i, tabindex: 0 });
    const title = svg('title', {});
    title.textContent = `mode ${i}: λ = ${fmt(l)}, perturbation growth rate ${fmt(r)} — click or press Enter to paint`;
    mark.append(title);
    mark.addEventListener('click', () => onMode(i));
    mark.addEventListener('keydown', (e) => { if (e.key === 'Enter' || e.key === ' ') { e.preventDefault(); onMode(i); } });
    root.append(mark);
  });
  const label = (text: string, attrs: Record<string, string | number>) => {
    const t = svg('text', { 'font-size': 11, fill: '#333', ...attrs });
    t.textContent = text;
    root.append(t);
  };
  label(`k² (surface eigenvalue λ${view.units ? `, 1/${view.units}²` : ''})`, { x: (L + W - R) / 2, y: H - 6, 'text-anchor': 'middle', class: 'axis-title' });
  label('σ (growth of a perturbation)', { x: 14, y: (T + H - B) / 2, transform: `rotate(-90 14 ${(T + H - B) / 2})`, 'text-anchor': 'middle', class: 'axis-title' });
  label(fmt(hi - pad), { x: L - 4, y: y(hi - pad) + 4, 'text-anchor': 'end' });
  label('0', { x: L - 4, y: y(0) + 4, 'text-anchor': 'end' });
  label(fmt(lo + pad), { x: L - 4, y: y(lo + pad) + 4, 'text-anchor': 'end' });
  label(fmt(kMax), { x: W - R, y: H - B + 14, 'text-anchor': 'end' });
  label('0', { x: L, y: H - B + 14, 'text-anchor': 'middle' });
  target.replaceChildren(root);
}
