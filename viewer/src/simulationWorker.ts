/// <reference lib="webworker" />
/**
 * The simulation worker: resolves a scenario exactly as the command line does
 * (resolveInViewer), steps it in chunks of about 25 ms, and posts a frame
 * (state, and the surface when it grows) after each chunk the page has drawn.
 * Buffers are transferred. The stability analysis is analysisWorker's.
 */
import type { ResolvedScenario } from '../../solver/scenario/resolveScenario.ts';
import { ScenarioError } from '../../solver/scenario/ScenarioError.ts';
import type { MeshFileContents } from '../../solver/scenario/scenarioMesh.ts';
import { resolveInViewer } from './resolveInViewer.ts';
import { SurfaceSimulation } from '../../solver/run/SurfaceSimulation.ts';
import { GrowthDegenerationError } from '../../solver/growth/GrowthDriver.ts';
import { constantValues, steadyStatesOf } from '../../solver/analysis/stabilityReport.ts';
import { meshStatistics } from '../../solver/mesh/meshStatistics.ts';
import { meshArea } from '../../solver/mesh/triangleAreas.ts';
import type { FromSimulation, ToSimulation } from './protocol.ts';

declare const self: DedicatedWorkerGlobalScope;

let resolved: ResolvedScenario | undefined;
let sim: SurfaceSimulation | undefined;
let step = 0;
let running = false;
let waitingForAck = false;
let pendingFrame = false;
let area0 = 1;
let lastTriangles: Uint32Array | undefined;
let lastPositions: Float64Array | undefined;
/** √(area / start area) of the surface last sent: recomputed only when the surface moves */
let growthFactor = 1;
let rate = 0;
let stopped = false;

const post = (m: FromSimulation, transfer: Transferable[] = []) => self.postMessage(m, transfer);

function send(keep: boolean) {
  if (!sim || !resolved) return;
  if (waitingForAck && !keep) {
    pendingFrame = true;
    return;
  }
  const surface = sim.stepper.surface;
  const state = sim.stepper.state.slice();
  let positions: Float64Array | undefined;
  let triangles: Uint32Array | undefined;
  if (surface.triangles !== lastTriangles) {
    lastTriangles = surface.triangles;
    triangles = surface.triangles.slice();
  }
  if (surface.positions !== lastPositions || triangles) {
    lastPositions = surface.positions;
    growthFactor = Math.sqrt(meshArea(surface) / area0);
    positions = surface.positions.slice();
  }
  const transfer: Transferable[] = [state.buffer];
  if (positions) transfer.push(positions.buffer);
  if (triangles) transfer.push(triangles.buffer);
  waitingForAck = true;
  pendingFrame = false;
  post({ type: 'frame', time: step * resolved.dt, step, state, positions, triangles, stepsPerSecond: rate, growthFactor, running, keep }, transfer);
}

function stop(reason: 'end' | 'blow-up' | 'degenerate', message: string) {
  running = false;
  stopped = true;
  send(true);
  post({ type: 'stopped', reason, message });
}

/** Step for about 25 ms (or `limit` steps); false when the run stopped. */
function chunk(limit = Infinity): boolean {
  const r = resolved!, s = sim!;
  const t0 = performance.now();
  let taken = 0;
  const every = r.output.everySteps;
  while (taken < limit && step < r.steps) {
    try {
      if (s.driver) s.advanceGeometry(step, step % every === 0);
    } catch (e) {
      if (!(e instanceof GrowthDegenerationError)) throw e;
      stop('degenerate', e.message);
      return false;
    }
    if (!s.stepper.step(step * r.dt)) {
      s.stepper.setState(s.stepper.previous);
      stop('blow-up', `blow-up at t=${((step + 1) * r.dt).toPrecision(6)}: a value became NaN or infinite. The state shown is the last good one. Try a smaller time step${r.scheme === 'explicit' ? ' or the IMEX scheme' : ''}.`);
      return false;
    }
    step++;
    taken++;
    if (step % every === 0) send(true);
    if (performance.now() - t0 > 25) break;
  }
  const seconds = (performance.now() - t0) / 1000;
  if (taken > 0 && seconds > 0) rate = 0.7 * rate + 0.3 * (taken / seconds);
  if (step >= r.steps) {
    stop('end', `reached the end time t=${(step * r.dt).toPrecision(6)} (${step} steps)`);
    return false;
  }
  return true;
}

function loop() {
  if (!running || !sim) return;
  try {
    if (chunk()) send(false);
  } catch (e) {
    running = false;
    post({ type: 'error', message: (e as Error).message });
    return;
  }
  if (running) nextChunk.port2.postMessage(null);
}

/** Chunks follow each other through a message channel: setTimeout would add its ≥ 4 ms clamp to every chunk. */
const nextChunk = new MessageChannel();
nextChunk.port1.onmessage = () => loop();

function load(text: string, files: Record<string, MeshFileContents>) {
  running = false;
  let next: ResolvedScenario;
  try {
    next = resolveInViewer(text, files);
  } catch (e) {
    if (e instanceof ScenarioError) post({ type: 'problems', message: e.message, problems: e.problems });
    else post({ type: 'problems', message: (e as Error).message, problems: [{ path: '', message: (e as Error).message }] });
    return; // the current simulation is left as it was
  }
  resolved = next;
  setUp();
  const stats = meshStatistics(next.mesh);
  const rest = restState(next);
  const state = sim!.stepper.state.slice();
  const positions = next.mesh.positions.slice();
  const triangles = next.mesh.triangles.slice();
  post({
    type: 'loaded', positions, triangles, species: next.species, state, dt: next.dt, end: next.end, every: next.output.everySteps * next.dt,
    scheme: next.scheme, solver: next.solver, growing: next.growth !== undefined, warnings: next.warnings, notes: next.meshNotes,
    stats: { vertices: stats.vertices, triangles: stats.triangles, area: stats.area, genus: stats.genus, boundaryLoops: stats.boundaryLoops, components: stats.components, meanEdge: stats.edgeLength.mean },
    rest, colour: next.output.colour, colormap: next.output.colormap, range: next.output.range,
  }, [state.buffer, positions.buffer, triangles.buffer]);
}

/** The homogeneous steady state the erase brush restores (the scenario's analysed one), per species. */
function restState(r: ResolvedScenario): (number | null)[] {
  try {
    const parameters = constantValues(r).parameters;
    const state = steadyStatesOf(r, parameters, r.seed)[r.steadyStateIndex];
    return r.species.map((_, i) => (state ? state.values[i] : null));
  } catch {
    return r.species.map(() => null);
  }
}

function setUp() {
  sim = new SurfaceSimulation(resolved!);
  step = 0;
  rate = 0;
  stopped = false;
  waitingForAck = false;
  area0 = meshArea(resolved!.mesh);
  lastTriangles = sim.stepper.surface.triangles;
  lastPositions = sim.stepper.surface.positions;
  growthFactor = 1;
}

self.onmessage = (event: MessageEvent<ToSimulation>) => {
  const m = event.data;
  try {
    switch (m.type) {
      case 'load':
        load(m.text, m.files);
        break;
      case 'run':
        if (!sim || running) break;
        if (stopped) {
          post({ type: 'error', message: 'the run has stopped (end time, blow-up or fold): reset it, or change the scenario and set it up again' });
          break;
        }
        running = true;
        loop();
        break;
      case 'pause':
        running = false;
        send(false);
        break;
      case 'step':
        if (!sim || running || stopped) break;
        if (chunk(m.steps)) send(false);
        break;
      case 'reset':
        if (!resolved) break;
        running = false;
        setUp();
        lastTriangles = undefined; // send the start surface again
        send(true);
        break;
      case 'ack':
        waitingForAck = false;
        if (pendingFrame && !running) send(false);
        break;
      case 'brush': {
        if (!sim) break;
        const nS = resolved!.species.length;
        const state = sim.stepper.state;
        for (let k = 0; k < m.vertices.length; k++) {
          const i = m.vertices[k], w = m.weights[k];
          for (let s = 0; s < nS; s++) {
            const target = m.values[s];
            if (target === null) continue;
            state[i * nS + s] += w * (target - state[i * nS + s]);
          }
        }
        waitingForAck = false;
        send(false);
        break;
      }
    }
  } catch (e) {
    running = false;
    post({ type: 'error', message: (e as Error).message });
  }
};
