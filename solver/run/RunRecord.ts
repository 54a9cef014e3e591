import type { StageMapReport } from '../growth/stageMapReport.ts';
import type { ResolvedScenario } from '../scenario/ResolvedScenario.ts';
import { meshArea } from '../mesh/triangleAreas.ts';
import { PATTERN_NOISE_FACTOR } from '../defaults.ts';

/**
 * Why a run stopped: its end time, a steady state, a blow-up, a folded
 * surface, an interruption, or a failed write (a full disk); the last two
 * resume from the last saved state.
 */
export type StopReason = 'end' | 'steady-state' | 'blow-up' | 'degenerate' | 'interrupted' | 'failed';

export interface PredictedMode {
  index: number;
  eigenvalue: number;
  rate: number;
  multiplicity: number;
}

/** The pattern measures of a run, `record.json` → `analysis`. */
export interface RunAnalysis {
  species: string;
  thresholdRule: string;
  /** the contrast a frame needs to count as a pattern, in words */
  floorRule?: string;
  modes: number;
  /** largest computed eigenvalue: the spectrum (and dominantEigenvalue) sees only modes up to here */
  modesUpTo?: number;
  /** linear stability of the analysed steady state on this surface (when modes were computed) */
  prediction?: { state: number; band: [number, number] | null; fastest: { k2: number; rate: number } | null; predicted: PredictedMode | null; notes: string[] };
  frames: { time: number; step: number; threshold: number; contrast?: number; floor?: number; patches: { area: number; centroid: [number, number, number] }[]; dominantEigenvalue?: number; dominantFraction?: number }[];
  events: { time: number; kind: string; before: number[]; after: number[] }[];
  /**
   * growing runs whose growth is a similarity (with modes > 0): when each surface eigenvalue cluster enters
   * and leaves the unstable band, predicted from the starting surface (λ(t) = λ(0)/ρ(t)²), and the first
   * measured insertion or split at or after each entry
   */
  bandEntries?: { index: number; multiplicity: number; eigenvalue0: number; enters: number | null; leaves: number | null; firstEventAfter: { time: number; kind: string } | null }[];
  /** growing runs: the predicted mode as the surface grows (eigenpairs recomputed at every output time) */
  predictions?: { time: number; area: number; vertices: number; predicted: PredictedMode | null }[];
  /** time the run reached steady state, when it stopped there */
  timeToSteadyState?: number;
  /** last output time at which the patch count changed */
  lastCountChange?: number;
}

export interface RunSession {
  started: string;
  fromStep: number;
  toStep?: number;
  steppingSeconds?: number;
  outputSeconds?: number;
  setupSeconds: number;
}

/** A run directory's `record.json`: everything needed to reproduce and judge the run. */
export interface RunRecord {
  tool: { name: string; version: string };
  node: string;
  platform: string;
  created: string;
  updated: string;
  command: string[];
  scenarioFile: string;
  scenarioText: string;
  resolved: Record<string, unknown>;
  mesh: { source: Record<string, unknown>; vertices: number; triangles: number; area: number; checksum: string; notes: string[] };
  seed: number;
  warnings: string[];
  status: 'running' | StopReason;
  stop?: { reason: StopReason; time: number; step: number; message: string };
  frames: { file: string; time: number; step: number }[];
  sessions: RunSession[];
  analysis: RunAnalysis;
  /** threads asked for and used (a mesh too small for them uses fewer; results do not depend on it) */
  threads?: { requested: number; used: number };
  growth?: { description: string; tolerance: number; updates: number; refinements: { time: number; step: number; from: number; to: number }[]; stages?: StageMapReport[] };
  performance?: { steps: number; steppingSeconds: number; stepsPerSecond: number; vertexStepsPerSecond: number; solverIterationsPerStep?: number; stepperBytesPerVertex: number };
}

/** How the contrast floor of the pattern measures reads in a record. */
export function floorRuleText(floor: ResolvedScenario['analysis']['floor']): string {
  if (floor.relative === 0) return `contrast (max − min) above ${floor.absolute} (analysis.floor)`;
  return `contrast (max − min) above ${floor.absolute > 0 ? `${floor.absolute} (${PATTERN_NOISE_FACTOR} × the starting noise) and ` : ''}${floor.relative} × max(|min|, |max|)`;
}

/** How the threshold rule of the pattern measures reads in a record. */
export function thresholdRuleText(threshold: ResolvedScenario['analysis']['threshold']): string {
  return typeof threshold === 'number' ? `fixed ${threshold}` : threshold === 'otsu' ? "Otsu's rule on the area-weighted histogram (256 bins)" : 'mid-range (min + max)/2';
}

/** The record of a new run of a resolved scenario, before its first step. */
export function newRunRecord(r: ResolvedScenario, about: { version: string; node: string; platform: string; command: string[]; scenarioFile: string; scenarioText: string; checksum: string }): RunRecord {
  const now = new Date().toISOString();
  return {
    tool: { name: 'placode', version: about.version },
    node: about.node,
    platform: about.platform,
    created: now,
    updated: now,
    command: about.command,
    scenarioFile: about.scenarioFile,
    scenarioText: about.scenarioText,
    resolved: r.summary,
    mesh: {
      source: r.meshSource,
      vertices: r.mesh.positions.length / 3,
      triangles: r.mesh.triangles.length / 3,
      area: meshArea(r.mesh),
      checksum: about.checksum,
      notes: r.meshNotes,
    },
    seed: r.seed,
    warnings: r.warnings,
    status: 'running',
    frames: [],
    sessions: [],
    analysis: { species: r.analysis.species, thresholdRule: thresholdRuleText(r.analysis.threshold), floorRule: floorRuleText(r.analysis.floor), modes: r.analysis.modes, frames: [], events: [] },
  };
}
