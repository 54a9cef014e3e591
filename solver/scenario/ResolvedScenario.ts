import type { StageMapReport } from '../growth/stageMapReport.ts';
import type { Mesh } from '../mesh/Mesh.ts';
import type { CsrMatrix } from '../linalg/CsrMatrix.ts';
import type { FieldValue, MeshSpec } from './Scenario.ts';
import type { KineticsModel } from '../kinetics/KineticsModel.ts';
import type { CompiledKinetics } from '../kinetics/compileKinetics.ts';
import type { ReactionDiffusionSystem } from '../integrate/ReactionDiffusionSystem.ts';
import type { ExplicitStepLimit } from '../integrate/explicitStepLimit.ts';
import type { ContrastFloor, ThresholdRule } from '../analysis/measurePattern.ts';
import type { GrowthLaw } from '../growth/GrowthLaw.ts';
import type { Refinement } from '../mesh/Refinement.ts';
import type { ColormapName } from '../io/colormap.ts';

/** What a mesh loader hands back (Node reads files; the viewer builds shapes in a worker). */
export interface LoadedMesh {
  mesh: Mesh;
  vertexData: Record<string, Float64Array>;
  /** how the mesh was made, for the record */
  source: Record<string, unknown>;
  notes: string[];
}

/** Where a scenario's files come from: the disk (command line) or the files opened in a page. */
export interface ScenarioEnvironment {
  /** build or read the mesh; throw an Error whose message says what is wrong */
  loadMesh(spec: MeshSpec): LoadedMesh;
  /** a previous run's final state, by species name (for `initial.from`) */
  loadState?(from: string): { species: string[]; values: Record<string, Float64Array> };
  /** a line about long set-up work as it starts (carrying the mesh onto a stage mesh), where someone watches */
  progress?(line: string): void;
}

export interface AnalysisPlan {
  species: string;
  threshold: ThresholdRule;
  modes: number;
  /** the contrast a field needs to count as a pattern (see `measurePattern`) */
  floor: ContrastFloor;
}

export interface GrowthPlan {
  /** builds the law on a reference surface: the initial one, or its refinement through `refinements` */
  makeLaw(reference: Float64Array, refinements: readonly Refinement[]): GrowthLaw;
  description: string;
  tolerance: number;
  /** centre of the scaling laws (given, or the area centroid) */
  centre?: [number, number, number];
  refine?: { edgeGrowth: number; maxEdge: number; maxVertices: number };
  /** keyframes of other connectivity: how each stage was reached */
  stages?: StageMapReport[];
}

export interface OutputPlan {
  /** formats written besides PLY for every frame and the final state */
  formats: ('glb' | 'obj' | 'csv')[];
  every: number;
  everySteps: number;
  colour: string;
  colormap: ColormapName;
  range: [number, number] | 'frame';
  frames: boolean;
}

/** A scenario with every default filled in and everything built that a run needs. */
export interface ResolvedScenario {
  name: string;
  seed: number;
  mesh: Mesh;
  meshSource: Record<string, unknown>;
  meshNotes: string[];
  /** the length unit of the mesh coordinates (mesh.units), when stated */
  units?: string;
  model: string;
  kineticsModel?: KineticsModel;
  species: string[];
  reactions: Record<string, string>;
  parameters: Record<string, FieldValue>;
  diffusion: Record<string, FieldValue>;
  kinetics: CompiledKinetics;
  system: ReactionDiffusionSystem;
  /**
   * K and lumped M of the start mesh, assembled once while resolving (the step
   * limits need them) and handed on to the stepper. Never written to: a
   * growing stepper copies them before it moves the surface.
   */
  operators: { stiffness: CsrMatrix; mass: Float64Array };
  /** which Laplacian the operators are; with intrinsic-delaunay every eigen-solve on the start surface uses them */
  laplacian: 'cotangent' | 'intrinsic-delaunay';
  /** the operators eigen-solves must use instead of the mesh's cotangent ones (set for intrinsic-delaunay) */
  laplacianOperators?: { stiffness: CsrMatrix; mass: Float64Array };
  initial: Float64Array;
  /** index of the homogeneous steady state the scenario starts from and analyses */
  steadyStateIndex: number;
  scheme: 'imex' | 'explicit';
  dt: number;
  end: number;
  steps: number;
  steadyState?: number;
  solver: 'cg' | 'cholesky';
  tolerance: number;
  /** threads the scenario asks for (time.threads); undefined: the runner's default */
  threads?: number;
  explicitLimit?: ExplicitStepLimit;
  output: OutputPlan;
  analysis: AnalysisPlan;
  growth?: GrowthPlan;
  warnings: string[];
  /** the resolved scenario as plain data, for record.json */
  summary: Record<string, unknown>;
}
