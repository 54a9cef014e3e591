/**
 * Messages between the page and the simulation worker. Fields travel as
 * typed arrays whose buffers are transferred (never copied through JSON).
 */
import type { ScenarioProblem } from '../../solver/scenario/ScenarioError.ts';
import type { MeshFileContents } from '../../solver/scenario/scenarioMesh.ts';
import type { MeshStatistics } from '../../solver/mesh/meshStatistics.ts';

export type ToSimulation =
  | { type: 'load'; text: string; files: Record<string, MeshFileContents> }
  | { type: 'run' }
  | { type: 'pause' }
  | { type: 'step'; steps: number }
  | { type: 'reset' }
  | { type: 'ack' }
  | { type: 'brush'; vertices: Uint32Array; weights: Float32Array; mode: 'seed' | 'erase'; values: (number | null)[] };

/** To the analysis worker: analyse a scenario (the text the simulation accepted), or send one of its eigenmodes. */
export type ToAnalysis =
  | { type: 'analyse'; text: string; files: Record<string, MeshFileContents> }
  | { type: 'mode'; index: number };

export type FromAnalysis =
  | { type: 'stability'; view: StabilityView }
  | { type: 'mode'; index: number; eigenvalue: number; values: Float64Array }
  | { type: 'error'; message: string };

/** What the page shows of a surface: `placode mesh`'s statistics and the mean edge length. */
export type SurfaceStats = Pick<MeshStatistics, 'vertices' | 'triangles' | 'area' | 'genus' | 'boundaryLoops' | 'components'> & { meanEdge: number; units?: string };

export interface StabilityView {
  species: string[];
  notes: string[];
  steadyState: Record<string, number> | null;
  band: [number, number] | null;
  fastest: { k2: number; rate: number } | null;
  dispersion: { k2: number[]; rate: number[] };
  /** surface eigenvalues computed, and the growth rate of each */
  eigenvalues: number[];
  rates: number[];
  unstable: { index: number; eigenvalue: number; rate: number }[];
  predicted: { index: number; eigenvalue: number; rate: number; multiplicity: number } | null;
  /** the mesh's length unit, when stated */
  units?: string;
}

export type FromSimulation =
  | {
      type: 'loaded';
      positions: Float64Array;
      triangles: Uint32Array;
      species: string[];
      state: Float64Array;
      dt: number;
      end: number;
      every: number;
      scheme: string;
      solver: string;
      growing: boolean;
      /** threads stepping the run, and why not more where it matters */
      threads: { used: number; note?: string };
      warnings: string[];
      notes: string[];
      stats: SurfaceStats;
      /** homogeneous steady state (the erase brush's value), per species */
      rest: (number | null)[];
      /** the scenario's painting: species, colormap, range */
      colour: string;
      colormap: string;
      range: [number, number] | 'frame';
    }
  | { type: 'problems'; message: string; problems: ScenarioProblem[] }
  | {
      type: 'frame';
      time: number;
      step: number;
      state: Float64Array;
      /** a moved surface (growing runs) */
      positions?: Float64Array;
      /** a refined surface */
      triangles?: Uint32Array;
      stepsPerSecond: number;
      growthFactor: number;
      running: boolean;
      /** a frame to keep on the timeline (at the scenario's output times) */
      keep: boolean;
    }
  | { type: 'stopped'; reason: 'end' | 'steady-state' | 'blow-up' | 'degenerate'; message: string }
  | { type: 'error'; message: string };
