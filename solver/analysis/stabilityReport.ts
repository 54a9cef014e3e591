import type { Mesh } from '../mesh/Mesh.ts';
import type { CompiledKinetics } from '../kinetics/compileKinetics.ts';
import type { KineticsModel } from '../kinetics/KineticsModel.ts';
import type { Eigenpairs } from '../fem/laplaceBeltramiEigenpairs.ts';
import { laplaceBeltramiEigenpairs } from '../fem/laplaceBeltramiEigenpairs.ts';
import { lumpedMass } from '../fem/lumpedMass.ts';
import { classifyState, numericalSteadyStates, type SteadyState } from './steadyStates.ts';
import { growthRate, turingAnalysis, type TuringAnalysis } from './dispersion.ts';
import type { CsrMatrix } from '../linalg/CsrMatrix.ts';
import { surfaceModeRates, type PredictedPattern, type SurfaceModeRate } from './surfaceModeRates.ts';

export interface StabilityReport {
  /** parameter and diffusion values the analysis used (surface means of fields) */
  parameters: Record<string, number>;
  diffusion: Record<string, number>;
  notes: string[];
  steadyStates: { values: Record<string, number>; stableWithoutDiffusion: boolean; eigenvalues: [number, number][]; source: SteadyState['source'] }[];
  /** index of the state analysed (the scenario's initial.steadyState) */
  state: number;
  jacobian: number[][] | null;
  turing: TuringAnalysis | null;
  /** the dispersion relation λ(k²) sampled from 0 to beyond the band */
  dispersion: { k2: number[]; rate: number[] };
  /** surface modes in the unstable band, with their growth rates */
  modes: SurfaceModeRate[];
  predicted: PredictedPattern | null;
  surface: { vertices: number; area: number; modesComputed: number; largestEigenvalue: number; coversBand: boolean } | null;
}

/** What the stability analysis needs of a scenario (a resolved scenario is one). */
export interface StabilityProblem {
  readonly mesh: Mesh;
  /** a stiffness and lumped mass to use instead of the mesh's cotangent ones (an intrinsic Delaunay Laplacian) */
  readonly laplacianOperators?: { stiffness: CsrMatrix; mass: Float64Array };
  readonly species: readonly string[];
  readonly kinetics: CompiledKinetics;
  /** parameter and diffusion values, constants or per-vertex fields, in the kinetics' order */
  readonly system: { readonly parameters: readonly (number | Float64Array)[]; readonly diffusion: readonly (number | Float64Array)[] };
  /** a built-in model, whose closed-form steady states are used when it has them */
  readonly kineticsModel?: Pick<KineticsModel, 'steadyStates'>;
  /** seed of the Newton starts when the steady states are found numerically */
  readonly seed: number;
  /** the homogeneous steady state analysed by default */
  readonly steadyStateIndex: number;
}

/** Surface-mean value of a constant-or-field quantity (lumped-mass weights). */
function meanOf(v: number | Float64Array, mass: Float64Array, area: number): number {
  if (typeof v === 'number') return v;
  let s = 0;
  for (let i = 0; i < mass.length; i++) s += mass[i] * v[i];
  return s / area;
}

/** The constant parameter and diffusion values of a scenario (fields by their surface mean). */
export function constantValues(r: StabilityProblem, mass = lumpedMass(r.mesh)): { parameters: number[]; diffusion: number[]; notes: string[] } {
  let area = 0;
  for (const m of mass) area += m;
  const notes: string[] = [];
  const names = r.kinetics.parameters;
  const parameters = r.system.parameters.map((v, i) => {
    if (typeof v !== 'number') notes.push(`parameter ${names[i]} varies over the surface; the analysis uses its surface mean ${meanOf(v, mass, area).toPrecision(4)}`);
    return meanOf(v, mass, area);
  });
  const diffusion = r.system.diffusion.map((v, i) => {
    if (typeof v !== 'number') notes.push(`diffusion of ${r.species[i]} varies over the surface; the analysis uses its surface mean ${meanOf(v, mass, area).toPrecision(4)}`);
    return meanOf(v, mass, area);
  });
  return { parameters, diffusion, notes };
}

/** Homogeneous steady states: the model's closed form if it has one, else Newton from many starts. */
export function steadyStatesOf(r: StabilityProblem, parameters: number[], seed = 1): SteadyState[] {
  const model = r.kineticsModel;
  if (model?.steadyStates) {
    const p = Object.fromEntries(r.kinetics.parameters.map((name, i) => [name, parameters[i]]));
    return model.steadyStates(p).map((v) => classifyState(r.kinetics, parameters, v, 'closed form'));
  }
  return numericalSteadyStates(r.kinetics, parameters, seed).map((v) => classifyState(r.kinetics, parameters, v, 'numerical'));
}

/**
 * Eigenpairs needed to reach the upper edge k²max of an unstable band on a
 * surface of this area (Weyl's law: about area·k²/(4π) eigenvalues lie below
 * k², with a 25 % margin and a dozen more), or undefined without a finite band.
 */
export function modesToCoverBand(area: number, band: [number, number] | null | undefined): number | undefined {
  return band && Number.isFinite(band[1]) ? Math.ceil((1.25 * area * band[1]) / (4 * Math.PI)) + 12 : undefined;
}

/** The unstable band of the analysed steady state (no surface needed), or null. */
export function scenarioBand(r: StabilityProblem): [number, number] | null {
  return scenarioTuring(r)?.band ?? null;
}

/** The Turing analysis of the analysed steady state (no surface needed), or null without one. */
export function scenarioTuring(r: StabilityProblem): TuringAnalysis | null {
  const values = constantValues(r);
  const state = steadyStatesOf(r, values.parameters, r.seed)[r.steadyStateIndex];
  return state ? turingAnalysis(state.jacobian, values.diffusion) : null;
}

/**
 * Linear stability of a scenario's kinetics and its consequence on the
 * scenario's surface: steady states, the Turing analysis of the chosen one, the
 * dispersion relation, and every computed surface mode in the unstable band
 * with the fastest one named as the predicted initial pattern. Eigenpairs
 * (lumped mass, as the time stepping uses) are computed up to the band's upper
 * edge — by Weyl's law about area·k²/(4π) modes — at most `maxModes`. `raise`
 * names the setting that computes more modes, for the note when they fall short.
 */
export function stabilityReport(r: StabilityProblem, options: { maxModes?: number; eigenpairs?: Eigenpairs; stateIndex?: number; raise?: string } = {}): StabilityReport & { eigenpairs: Eigenpairs | null } {
  const mass = lumpedMass(r.mesh);
  let area = 0;
  for (const m of mass) area += m;
  const { parameters, diffusion, notes } = constantValues(r, mass);
  const nS = r.species.length;
  const states = steadyStatesOf(r, parameters, r.seed);
  const stateIndex = options.stateIndex ?? r.steadyStateIndex;
  const chosen = states[stateIndex];
  const named = (values: number[]) => Object.fromEntries(r.species.map((s, i) => [s, values[i]]));
  const report: StabilityReport & { eigenpairs: Eigenpairs | null } = {
    parameters: Object.fromEntries(r.kinetics.parameters.map((n, i) => [n, parameters[i]])),
    diffusion: named(diffusion),
    notes,
    steadyStates: states.map((s) => ({ values: named(s.values), stableWithoutDiffusion: s.stableWithoutDiffusion, eigenvalues: s.eigenvalues, source: s.source })),
    state: stateIndex,
    jacobian: null,
    turing: null,
    dispersion: { k2: [], rate: [] },
    modes: [],
    predicted: null,
    surface: null,
    eigenpairs: null,
  };
  if (!chosen) {
    notes.push(states.length ? `steady state ${stateIndex} does not exist (there are ${states.length})` : 'no homogeneous steady state found');
    return report;
  }
  const J = chosen.jacobian;
  report.jacobian = Array.from({ length: nS }, (_, i) => J.slice(i * nS, (i + 1) * nS));
  const turing = turingAnalysis(J, diffusion);
  report.turing = turing;
  const top = turing.band ? (Number.isFinite(turing.band[1]) ? 1.5 * turing.band[1] : 10 * turing.band[0]) : 1 / Math.max(...diffusion.filter((d) => d > 0), 1e-12);
  for (let s = 0; s <= 200; s++) {
    const k2 = (top * s) / 200;
    report.dispersion.k2.push(k2);
    report.dispersion.rate.push(growthRate(J, diffusion, k2));
  }
  const maxModes = options.maxModes ?? 200;
  const wanted = modesToCoverBand(area, turing.band) ?? 20;
  const count = Math.min(maxModes, wanted, r.mesh.positions.length / 3 - 1);
  const eig = options.eigenpairs ?? laplaceBeltramiEigenpairs(r.mesh, { count, mass: 'lumped', operators: r.laplacianOperators });
  report.eigenpairs = eig;
  const largest = eig.values[eig.values.length - 1];
  const coversBand = !turing.band || largest >= turing.band[1];
  if (!coversBand) notes.push(`the ${eig.values.length} computed surface modes reach λ = ${largest.toPrecision(4)}, below the band's upper edge ${turing.band![1].toPrecision(4)}: modes above are not listed (raise ${options.raise ?? '--max-modes'})`);
  report.surface = { vertices: r.mesh.positions.length / 3, area, modesComputed: eig.values.length, largestEigenvalue: largest, coversBand };
  const surface = surfaceModeRates(J, diffusion, eig);
  report.modes = surface.unstable;
  report.predicted = surface.predicted;
  return report;
}
