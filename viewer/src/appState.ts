/** What the viewer holds and shows: frames, and the state the tests (and a curious user, in the console) can read. */
import type { StabilityView } from './protocol.ts';
import type { Mesh } from '../../solver/mesh/Mesh.ts';
import { VIEWER_PAINT_INTERVAL_MS } from '../../solver/defaults.ts';
import { speciesField } from '../../solver/integrate/ReactionDiffusionSystem.ts';

/** One picture of the timeline: a state on a surface. */
export interface Frame {
  time: number;
  mesh: Mesh;
  fields: Record<string, Float64Array>;
  /** a frame of a run directory not fetched yet */
  file?: string;
}

/** What the tests (and a curious user, in the console) can read of the app. */
export interface AppState {
  ready: boolean;
  loaded: boolean;
  running: boolean;
  time: number;
  step: number;
  vertices: number;
  species: string[];
  frames: number;
  view: 'live' | 'frame' | 'mode';
  problems: string[];
  messages: string[];
  stability: StabilityView | null;
  /** min, mean and max of the painted field as shown, and the time of the frame painted */
  shown: { species: string; min: number; mean: number; max: number; vertices: number; extent: number; time: number; range: [number, number] } | null;
  stepsPerSecond: number;
  serverRun: { name: string; frames: number } | null;
  /** milliseconds of the last brush dab (picking and gathering vertices; the BVH is built on the first) */
  brushMs: number;
  /** brush dabs that hit the surface and were sent to the worker */
  strokes: number;
  /** threads stepping the simulation */
  threads: number;
  /** paints of the live simulation so far (at most one per VIEWER_PAINT_INTERVAL_MS) */
  paints: number;
  /** the pacer's current least time between live paints: VIEWER_PAINT_INTERVAL_MS, longer when drawing is slow (5 × a frame's cost, at most 1 s) */
  paintIntervalMs: number;
  /** the WebGL renderer, and whether the surface is antialiased (not in software WebGL) */
  webgl: { renderer: string; antialias: boolean } | null;
}

export const app: AppState = { ready: false, loaded: false, running: false, time: 0, step: 0, vertices: 0, species: [], frames: 0, view: 'live', problems: [], messages: [], stability: null, shown: null, stepsPerSecond: 0, serverRun: null, brushMs: 0, strokes: 0, threads: 1, paints: 0, paintIntervalMs: VIEWER_PAINT_INTERVAL_MS, webgl: null };
(window as unknown as { __placode: AppState }).__placode = app;

/** A frame from a packed state (species interleaved per vertex). */
export function frameOf(time: number, mesh: Mesh, state: Float64Array, species: string[]): Frame {
  const fields: Record<string, Float64Array> = {};
  species.forEach((s, i) => (fields[s] = speciesField(state, species.length, i)));
  return { time, mesh, fields };
}
