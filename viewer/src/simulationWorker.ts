/// <reference lib="webworker" />
/**
 * The simulation worker: resolves a scenario exactly as the command line does
 * (resolveInViewer) and runs it with the command line's own run loop
 * (RunEngine, on a team of threads where the page is cross-origin isolated)
 * in chunks of about VIEWER_CHUNK_MS. It posts a frame (state, and the surface
 * when it grows) at every output time, and otherwise at most every
 * VIEWER_PAINT_INTERVAL_MS once the page has drawn the last one, so the page
 * paints the latest state only. Buffers are transferred. The steps per second
 * it reports count wall-clock time, everything included. The stability
 * analysis is analysisWorker's.
 */
import type { ResolvedScenario } from '../../solver/scenario/resolveScenario.ts';
import { ScenarioError } from '../../solver/scenario/ScenarioError.ts';
import type { MeshFileContents } from '../../solver/scenario/scenarioMesh.ts';
import { resolveInViewer } from './resolveInViewer.ts';
import { RunEngine } from '../../solver/run/RunEngine.ts';
import { constantValues, steadyStatesOf } from '../../solver/analysis/stabilityReport.ts';
import { meshStatistics } from '../../solver/mesh/meshStatistics.ts';
import { meshArea } from '../../solver/mesh/triangleAreas.ts';
import { VIEWER_CHUNK_MS, VIEWER_PAINT_INTERVAL_MS, VIEWER_RATE_WINDOW_MS } from '../../solver/defaults.ts';
import type { ThreadTeam } from '../../solver/integrate/ThreadTeam.ts';
import type { FromSimulation, ToSimulation } from './protocol.ts';
import { WorkerThreads } from './browserThreads.ts';

declare const self: DedicatedWorkerGlobalScope;

let resolved: ResolvedScenario | undefined;
let engine: RunEngine | undefined;
let running = false;
let waitingForAck = false;
let pendingFrame = false;
let area0 = 1;
let lastTriangles: Uint32Array | undefined;
let lastPositions: Float64Array | undefined;
/** √(area / start area) of the surface last sent: recomputed only when the surface moves */
let growthFactor = 1;
let rate = 0;
/** the rate's window: steps and wall-clock time at its start */
let window0 = { step: 0, time: 0 };
/** when the last frame to paint was sent */
let lastSent = -Infinity;
let flushTimer: ReturnType<typeof setTimeout> | undefined;
let stopped = false;
const threads = new WorkerThreads();
let team: ThreadTeam | undefined;

const post = (m: FromSimulation, transfer: Transferable[] = []) => self.postMessage(m, transfer);

function send(keep: boolean) {
  if (!engine || !resolved) return;
  if (!keep) {
    const wait = lastSent + VIEWER_PAINT_INTERVAL_MS - performance.now();
    if (waitingForAck || wait > 0) {
      pendingFrame = true;
      // a running simulation sends again after its next chunk; a paused one needs reminding
      if (!waitingForAck && !running && flushTimer === undefined) flushTimer = setTimeout(() => { flushTimer = undefined; if (pendingFrame) send(false); }, wait);
      return;
    }
  }
  lastSent = performance.now();
  const surface = engine.surface;
  const state = engine.state.slice();
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
  post({ type: 'frame', time: engine.time, step: engine.step, state, positions, triangles, stepsPerSecond: rate, growthFactor, running, keep }, transfer);
}

function stop(reason: 'end' | 'steady-state' | 'blow-up' | 'degenerate', message: string) {
  running = false;
  stopped = true;
  send(true);
  post({ type: 'stopped', reason, message });
}

/** Step for about VIEWER_CHUNK_MS (or `limit` steps), posting a frame to keep at every output; false when the run stopped. */
function chunk(limit = Infinity): boolean {
  const e = engine!;
  const t0 = performance.now();
  const from = e.step;
  let ended = false;
  while (!ended && e.step - from < limit && !e.finished) {
    const ev = e.advance({ deadline: t0 + VIEWER_CHUNK_MS, maxSteps: limit - (e.step - from) });
    if (ev.kind === 'failed') {
      stop(ev.reason === 'thread' ? 'blow-up' : ev.reason, `${ev.message}. The state shown is the last good one (t=${e.time.toPrecision(6)}).${ev.advice ? ` ${ev.advice}` : ''}`);
      ended = true;
    } else if (ev.kind === 'output') {
      if (ev.finish) {
        stop(ev.finish.reason, ev.finish.message);
        ended = true;
      } else send(true);
    } else break;
    if (performance.now() - t0 > VIEWER_CHUNK_MS) break;
  }
  measureRate();
  return !ended;
}

/** Steps per second over the last window of VIEWER_RATE_WINDOW_MS (the first one as it fills), wall clock. */
function measureRate() {
  const now = performance.now(), span = now - window0.time;
  if (!engine || span <= 0) return;
  if (span >= VIEWER_RATE_WINDOW_MS || (rate === 0 && span >= VIEWER_RATE_WINDOW_MS / 4)) rate = ((engine.step - window0.step) * 1000) / span;
  if (span >= VIEWER_RATE_WINDOW_MS) window0 = { step: engine.step, time: now };
}

function loop() {
  if (!running || !engine) return;
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

async function load(text: string, files: Record<string, MeshFileContents>) {
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
  const chosen = await threads.teamFor(next);
  team = chosen.team;
  setUp();
  const stats = meshStatistics(next.mesh);
  const rest = restState(next);
  const state = engine!.state.slice();
  const positions = next.mesh.positions.slice();
  const triangles = next.mesh.triangles.slice();
  post({
    type: 'loaded', positions, triangles, species: next.species, state, dt: next.dt, end: next.end, every: next.output.everySteps * next.dt,
    scheme: next.scheme, solver: next.solver, growing: next.growth !== undefined, threads: { used: engine!.threads, note: chosen.note }, warnings: next.warnings, notes: next.meshNotes,
    stats: { vertices: stats.vertices, triangles: stats.triangles, area: stats.area, genus: stats.genus, boundaryLoops: stats.boundaryLoops, components: stats.components, meanEdge: stats.edgeLength.mean, units: next.units },
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
  engine = new RunEngine(resolved!, undefined, team);
  rate = 0;
  stopped = false;
  waitingForAck = false;
  area0 = meshArea(resolved!.mesh);
  lastTriangles = engine.surface.triangles;
  lastPositions = engine.surface.positions;
  growthFactor = 1;
}

/** Messages are handled one after another (setting a scenario up waits for its threads to start). */
let queue: Promise<void> = Promise.resolve();
self.onmessage = (event: MessageEvent<ToSimulation>) => {
  queue = queue.then(() => handle(event.data));
};

async function handle(m: ToSimulation): Promise<void> {
  try {
    switch (m.type) {
      case 'load':
        await load(m.text, m.files);
        break;
      case 'run':
        if (!engine || running) break;
        if (stopped) {
          post({ type: 'error', message: 'the run has stopped (end time, steady state, blow-up or fold): reset it, or change the scenario and set it up again' });
          break;
        }
        running = true;
        window0 = { step: engine.step, time: performance.now() };
        rate = 0;
        loop();
        break;
      case 'pause':
        running = false;
        send(false);
        break;
      case 'step':
        if (!engine || running || stopped) break;
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
        if (!engine) break;
        const nS = resolved!.species.length;
        const state = engine.state;
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
}
