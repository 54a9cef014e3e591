import { constantValues, steadyStatesOf, type StabilityProblem } from './stabilityReport.ts';
import { turingAnalysis } from './dispersion.ts';
import { evaluateSurfaceFormula } from '../kinetics/surfaceField.ts';

export type MapClass = 'turing' | 'stable' | 'oscillatory' | 'unstable' | 'no-state';

export const MAP_CLASS_LABELS: Record<MapClass, string> = {
  turing: 'Turing unstable',
  stable: 'stable (no pattern)',
  oscillatory: 'oscillatory (Hopf)',
  unstable: 'unstable without diffusion',
  'no-state': 'no such steady state',
};

export interface MapAxis {
  name: string;
  from: number;
  to: number;
  steps: number;
}

export interface MapCell {
  x: number;
  y: number;
  cls: MapClass;
  band: [number, number] | null;
  fastest: { k2: number; rate: number } | null;
  /** surface eigenvalues inside the band (when eigenvalues are given) */
  modesInBand: number | null;
}

export function axisValues(a: MapAxis): number[] {
  return Array.from({ length: a.steps }, (_, i) => (a.steps === 1 ? a.from : a.from + ((a.to - a.from) * i) / (a.steps - 1)));
}

/**
 * Classify every point of a grid over two parameters of a scenario's kinetics:
 * Turing unstable (with the band and, given the surface's eigenvalues, how many
 * modes fall in it), stable, oscillatory, unstable without diffusion, or no
 * such steady state. Other parameters keep the scenario's values.
 */
export function parameterMap(r: StabilityProblem & { readonly diffusion: Readonly<Record<string, unknown>> }, xAxis: MapAxis, yAxis: MapAxis, stateIndex: number, eigenvalues?: Float64Array): MapCell[] {
  const names = r.kinetics.parameters;
  const base = constantValues(r);
  const xi = names.indexOf(xAxis.name), yi = names.indexOf(yAxis.name);
  if (xi < 0 || yi < 0) throw new Error(`the kinetics has no parameter "${xi < 0 ? xAxis.name : yAxis.name}" (it has ${names.join(', ')})`);
  if (xi === yi) throw new Error('the two map axes must be different parameters');
  // diffusion written as formulas in the parameters (Schnakenberg's d) follows the map's values
  const diffusionAt = (p: number[]): number[] => {
    if (!dependsOnParameters) return base.diffusion;
    const constants = Object.fromEntries(names.map((n, i) => [n, p[i]]));
    return r.species.map((s, i) => {
      const spec = r.diffusion[s];
      if (typeof spec !== 'string') return base.diffusion[i];
      const v = evaluateSurfaceFormula(spec, r.mesh, constants);
      return typeof v === 'number' ? v : base.diffusion[i];
    });
  };
  const dependsOnParameters = r.species.some((s) => typeof r.diffusion[s] === 'string');
  const cells: MapCell[] = [];
  for (const y of axisValues(yAxis)) {
    for (const x of axisValues(xAxis)) {
      const p = base.parameters.slice();
      p[xi] = x;
      p[yi] = y;
      const state = steadyStatesOf(r, p, r.seed)[stateIndex];
      if (!state) { cells.push({ x, y, cls: 'no-state', band: null, fastest: null, modesInBand: null }); continue; }
      const t = turingAnalysis(state.jacobian, diffusionAt(p));
      const cls: MapClass = t.unstableWithoutDiffusion ? (t.oscillatory ? 'oscillatory' : 'unstable') : t.unstable ? 'turing' : 'stable';
      let modesInBand: number | null = null;
      if (eigenvalues && t.band) {
        modesInBand = 0;
        for (let j = 1; j < eigenvalues.length; j++) if (eigenvalues[j] > t.band[0] && eigenvalues[j] < t.band[1]) modesInBand++;
      }
      cells.push({ x, y, cls, band: t.band, fastest: t.fastest, modesInBand });
    }
  }
  return cells;
}

export function parameterMapCsv(cells: MapCell[], xName: string, yName: string): string {
  const rows = [`${xName},${yName},class,k2_min,k2_max,fastest_k2,fastest_rate,modes_in_band`];
  for (const c of cells) {
    rows.push([c.x, c.y, c.cls, c.band?.[0] ?? '', c.band?.[1] ?? '', c.fastest?.k2 ?? '', c.fastest?.rate ?? '', c.modesInBand ?? ''].join(','));
  }
  return rows.join('\n') + '\n';
}
