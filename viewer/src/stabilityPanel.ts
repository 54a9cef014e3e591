/** The Stability tab: the dispersion plot with the surface's eigenvalues, the band in words, the growing modes as buttons. */
import { el, byId, fmt } from './dom.ts';
import { drawDispersion } from './stabilityPlot.ts';
import type { StabilityView } from './protocol.ts';

export function showStability(v: StabilityView, askMode: (index: number) => void): void {
  drawDispersion(byId('dispersion'), v, askMode);
  const lines: string[] = [];
  if (v.steadyState) lines.push(`steady state ${Object.entries(v.steadyState).map(([k, x]) => `${k} = ${fmt(x)}`).join(', ')}`);
  const per = v.units ? ` 1/${v.units}²` : '';
  lines.push(v.band ? `unstable band k² ∈ [${fmt(v.band[0])}, ${fmt(v.band[1])}]${per}, fastest k² = ${fmt(v.fastest!.k2)}${per} (wavelength 2π/k = ${fmt((2 * Math.PI) / Math.sqrt(v.fastest!.k2))}${v.units ? ` ${v.units}` : ''}; perturbations grow at rate σ = ${fmt(v.fastest!.rate)})` : 'no Turing band: the steady state is stable to every spatial mode (or unstable without diffusion)');
  lines.push(v.predicted ? `predicted: mode ${v.predicted.index}, λ = ${fmt(v.predicted.eigenvalue)}, multiplicity ${v.predicted.multiplicity}` : v.band ? 'no surface mode falls in the band: this surface has no eigenvalue there (a larger or finer surface would)' : 'no surface mode grows from small disturbances');
  if (!v.predicted) lines.push('A pattern can still form: linear analysis speaks of small disturbances only, and mechanisms such as Gray–Scott make spots from large local ones (the seeds of Induce) — finite-amplitude patterns this tab cannot predict.');
  byId('stability-summary').replaceChildren(...[...lines, ...v.notes].map((t) => el('p', { text: t })));
  byId('mode-list').replaceChildren(...v.unstable.slice(0, 40).map((m) => {
    const b = el('button', { type: 'button', class: 'mode', 'data-mode': m.index, text: `${m.index}: λ ${fmt(m.eigenvalue)}, σ ${fmt(m.rate)}`, title: `paint mode ${m.index} (perturbation growth rate σ = ${fmt(m.rate)})` });
    b.addEventListener('click', () => askMode(m.index));
    return b;
  }));
}
