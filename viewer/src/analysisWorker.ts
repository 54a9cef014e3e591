/// <reference lib="webworker" />
/**
 * The analysis worker: linear stability of a scenario on its surface (the
 * dispersion relation and the surface's eigenpairs), apart from the
 * simulation worker so that a run starts at once, however long the
 * eigen-solve takes; the page replaces this worker to cancel an analysis.
 */
import type { ResolvedScenario } from '../../solver/scenario/resolveScenario.ts';
import { stabilityReport } from '../../solver/analysis/stabilityReport.ts';
import { growthRate } from '../../solver/analysis/dispersion.ts';
import type { Eigenpairs } from '../../solver/fem/laplaceBeltramiEigenpairs.ts';
import { resolveInViewer } from './resolveInViewer.ts';
import type { FromAnalysis, ToAnalysis, StabilityView } from './protocol.ts';

declare const self: DedicatedWorkerGlobalScope;

let eigenpairs: Eigenpairs | null = null;
const post = (m: FromAnalysis, transfer: Transferable[] = []) => self.postMessage(m, transfer);

/** Up to 150 surface modes (30 above 60k vertices): the band's modes on most tissue-sized surfaces. */
function stability(r: ResolvedScenario): StabilityView {
  try {
    const rep = stabilityReport(r, { maxModes: r.mesh.positions.length / 3 > 60_000 ? 30 : 150 });
    eigenpairs = rep.eigenpairs;
    const state = rep.steadyStates[rep.state];
    const J = rep.jacobian ? rep.jacobian.flat() : null;
    const D = r.species.map((s) => rep.diffusion[s]);
    const eigenvalues = eigenpairs ? Array.from(eigenpairs.values) : [];
    return {
      species: r.species,
      notes: rep.notes,
      steadyState: state ? state.values : null,
      band: rep.turing?.band ?? null,
      fastest: rep.turing?.fastest ?? null,
      dispersion: rep.dispersion,
      eigenvalues,
      rates: J ? eigenvalues.map((l) => growthRate(J, D, l)) : [],
      unstable: rep.modes.map((m) => ({ index: m.index, eigenvalue: m.eigenvalue, rate: m.rate })),
      predicted: rep.predicted,
      units: r.units,
    };
  } catch (e) {
    return { species: r.species, notes: [`stability analysis failed: ${(e as Error).message}`], steadyState: null, band: null, fastest: null, dispersion: { k2: [], rate: [] }, eigenvalues: [], rates: [], unstable: [], predicted: null };
  }
}

self.onmessage = (event: MessageEvent<ToAnalysis>) => {
  const m = event.data;
  try {
    if (m.type === 'analyse') {
      eigenpairs = null;
      post({ type: 'stability', view: stability(resolveInViewer(m.text, m.files)) });
    } else if (m.type === 'mode') {
      if (!eigenpairs || m.index >= eigenpairs.values.length) {
        post({ type: 'error', message: `mode ${m.index} has not been computed` });
        return;
      }
      const values = eigenpairs.vectors[m.index].slice();
      post({ type: 'mode', index: m.index, eigenvalue: eigenpairs.values[m.index], values }, [values.buffer]);
    }
  } catch (e) {
    post({ type: 'error', message: `stability analysis: ${(e as Error).message}` });
  }
};
