import { existsSync, mkdirSync, readFileSync, readdirSync, rmSync, statSync } from 'node:fs';
import { join, resolve } from 'node:path';
import cliProgress from 'cli-progress';
import { parseScenario } from '../scenario/parseScenario.ts';
import { isSweepFileText } from '../sweep/Sweep.ts';
import { resolveScenario, type ResolvedScenario } from '../scenario/resolveScenario.ts';
import { writeFileAtomic } from '../io/meshFiles.ts';
import { RUN_FILES, frameName, encodeFrame, stateMetrics, metricsHeader, metricsRow, encodeState, decodeState, type SavedState } from './runFiles.ts';
import { meshArea } from '../mesh/triangleAreas.ts';
import { forgetMeshTopology, meshTopology } from '../mesh/meshTopology.ts';
import { laplaceBeltramiEigenpairs, type Eigenpairs } from '../fem/laplaceBeltramiEigenpairs.ts';
import { stabilityReport, scenarioBand, modesToCoverBand } from '../analysis/stabilityReport.ts';
import { measurePattern } from '../analysis/measurePattern.ts';
import { patchEvents } from '../analysis/patchEvents.ts';
import { speciesField } from '../integrate/ReactionDiffusionSystem.ts';
import { encodeSnapshot } from '../io/encodeSnapshot.ts';
import { colorizeField } from '../io/colormap.ts';
import { GrowthDegenerationError } from '../growth/GrowthDriver.ts';
import { prolongField } from '../mesh/Refinement.ts';
import type { Mesh } from '../mesh/Mesh.ts';
import { nodeScenarioEnvironment, meshChecksum } from '../scenario/nodeScenarioEnvironment.ts';
import { UsageError } from '../cli/UsageError.ts';
import { readTextFile } from '../cli/readTextFile.ts';
import { ScenarioError } from '../scenario/ScenarioError.ts';
import { SurfaceSimulation } from './SurfaceSimulation.ts';
import { VERSION } from '../cli/version.ts';

export type StopReason = 'end' | 'steady-state' | 'blow-up' | 'interrupted' | 'degenerate';

export interface RunOptions {
  /** run directory to write (new run) */
  out?: string;
  /** replace an existing, non-empty run directory */
  force?: boolean;
  /** 'bar' on a terminal, 'lines' otherwise; 'none' for silence */
  progress?: 'auto' | 'bar' | 'lines' | 'none';
  /** stop as if interrupted once this many steps have been taken in this call (tests, scripted pauses) */
  interruptAfterSteps?: number;
  /** asked between chunks of steps: true stops the run as if interrupted (state saved, resumable) */
  shouldStop?: () => boolean;
  /** the command line, for the record */
  command?: string[];
  /** where progress and messages go (default: stderr) */
  log?: (line: string) => void;
}

export interface RunOutcome {
  dir: string;
  reason: StopReason;
  time: number;
  step: number;
  message: string;
}

interface RunRecord {
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
  sessions: { started: string; fromStep: number; toStep?: number; steppingSeconds?: number; outputSeconds?: number; setupSeconds: number }[];
  analysis: RunAnalysis;
  growth?: { description: string; tolerance: number; updates: number; refinements: { time: number; step: number; from: number; to: number }[] };
  performance?: { steps: number; steppingSeconds: number; stepsPerSecond: number; vertexStepsPerSecond: number; solverIterationsPerStep?: number; stepperBytesPerVertex: number };
}

interface RunAnalysis {
  species: string;
  thresholdRule: string;
  modes: number;
  /** largest computed eigenvalue: the spectrum (and dominantEigenvalue) sees only modes up to here */
  modesUpTo?: number;
  /** linear stability of the analysed steady state on this surface (when modes were computed) */
  prediction?: { state: number; band: [number, number] | null; fastest: { k2: number; rate: number } | null; predicted: { index: number; eigenvalue: number; rate: number; multiplicity: number } | null; notes: string[] };
  frames: { time: number; step: number; threshold: number; patches: { area: number; centroid: [number, number, number] }[]; dominantEigenvalue?: number; dominantFraction?: number }[];
  events: { time: number; kind: string; before: number[]; after: number[] }[];
  /** growing runs: the predicted mode as the surface grows (eigenpairs recomputed at every output time) */
  predictions?: { time: number; area: number; vertices: number; predicted: { index: number; eigenvalue: number; rate: number; multiplicity: number } | null }[];
  /** time the run reached steady state, when it stopped there */
  timeToSteadyState?: number;
  /** last output time at which the patch count changed */
  lastCountChange?: number;
}

const isDirWithFiles = (dir: string) => existsSync(dir) && statSync(dir).isDirectory() && readdirSync(dir).length > 0;

/** Read, check and resolve a scenario file (meshes and previous runs found relative to it). */
export function loadScenarioFile(file: string): { text: string; resolved: ResolvedScenario } {
  const text = readTextFile(file, 'scenario file');
  let source;
  try {
    source = parseScenario(text, file);
  } catch (e) {
    // a sweep file fails the scenario schema: say what it is instead
    if (e instanceof ScenarioError && isSweepFileText(text)) {
      throw new UsageError(`${file} is a sweep file (scenario: + vary:), not a scenario: expand it with placode sweep plan ${file} --out DIR`);
    }
    throw e;
  }
  return { text, resolved: resolveScenario(source, file, nodeScenarioEnvironment(file)) };
}

/** Check a scenario and return its resolved plan (what `run` would do), without running it. */
export function checkScenario(file: string): Record<string, unknown> {
  const r = loadScenarioFile(file).resolved;
  return { ...r.summary, vertices: r.mesh.positions.length / 3, warnings: r.warnings, meshNotes: r.meshNotes };
}

/** Start a new run of a scenario file into `options.out`. */
export async function runScenarioFile(file: string, options: RunOptions): Promise<RunOutcome> {
  if (!options.out) throw new UsageError('say where the run goes: --out DIR');
  const out = resolve(options.out);
  if (isDirWithFiles(out) && !options.force) {
    throw new UsageError(`${options.out} already holds files; choose a new --out, add --force to replace it, or continue it with placode run --resume ${options.out}`);
  }
  const t0 = performance.now();
  const { text, resolved } = loadScenarioFile(file);
  if (options.force && existsSync(out)) {
    for (const name of [RUN_FILES.record, RUN_FILES.metrics, RUN_FILES.state, RUN_FILES.final, 'final.glb', 'final.obj', 'final.csv']) rmSync(join(out, name), { force: true });
    rmSync(join(out, RUN_FILES.frames), { recursive: true, force: true });
  }
  mkdirSync(join(out, RUN_FILES.frames), { recursive: true });
  const now = new Date().toISOString();
  const record: RunRecord = {
    tool: { name: 'placode', version: VERSION },
    node: process.version,
    platform: `${process.platform}-${process.arch}`,
    created: now,
    updated: now,
    command: options.command ?? [],
    scenarioFile: resolve(file),
    scenarioText: text,
    resolved: resolved.summary,
    mesh: {
      source: resolved.meshSource,
      vertices: resolved.mesh.positions.length / 3,
      triangles: resolved.mesh.triangles.length / 3,
      area: meshArea(resolved.mesh),
      checksum: meshChecksum(resolved.mesh),
      notes: resolved.meshNotes,
    },
    seed: resolved.seed,
    warnings: resolved.warnings,
    status: 'running',
    frames: [],
    sessions: [],
    analysis: {
      species: resolved.analysis.species,
      thresholdRule: typeof resolved.analysis.threshold === 'number' ? `fixed ${resolved.analysis.threshold}` : resolved.analysis.threshold === 'otsu' ? "Otsu's rule on the area-weighted histogram (256 bins)" : 'mid-range (min + max)/2',
      modes: resolved.analysis.modes,
      frames: [],
      events: [],
    },
  };
  return execute(out, resolved, record, undefined, [], options, t0);
}

/** Continue an interrupted run from its saved state. */
export async function resumeRun(dir: string, options: RunOptions): Promise<RunOutcome> {
  const out = resolve(dir);
  const recordFile = join(out, RUN_FILES.record);
  if (!existsSync(recordFile)) throw new UsageError(`${dir} is not a run directory (no ${RUN_FILES.record})`);
  let record: RunRecord;
  try {
    record = JSON.parse(readFileSync(recordFile, 'utf8'));
  } catch (e) {
    throw new UsageError(`${recordFile}: cannot be read (${(e as Error).message})`);
  }
  if (record.status !== 'running' && record.status !== 'interrupted') {
    throw new UsageError(`${dir} has already finished (${record.stop?.message ?? record.status}); nothing to resume`);
  }
  const t0 = performance.now();
  const resolved = resolveScenario(parseScenario(record.scenarioText, record.scenarioFile), record.scenarioFile, nodeScenarioEnvironment(record.scenarioFile));
  const checksum = meshChecksum(resolved.mesh);
  if (checksum !== record.mesh.checksum) {
    throw new UsageError(`the mesh of ${dir} has changed since the run started (checksum ${checksum.slice(0, 19)}… ≠ ${record.mesh.checksum.slice(0, 19)}…): resume needs the same mesh`);
  }
  const stateFile = join(out, RUN_FILES.state);
  if (!existsSync(stateFile)) throw new UsageError(`${dir} has no saved state (${RUN_FILES.state}) to resume from`);
  const saved = decodeState(readFileSync(stateFile), stateFile);
  if (saved.meshChecksum !== checksum || saved.dt !== resolved.dt || saved.species.join() !== resolved.species.join()) {
    throw new UsageError(`${stateFile} does not belong to this run's mesh, step or species`);
  }
  // keep metrics rows and frames up to the saved step
  const metricsFile = join(out, RUN_FILES.metrics);
  const rows = existsSync(metricsFile) ? readFileSync(metricsFile, 'utf8').trim().split('\n').slice(1).filter((r) => Number(r.split(',')[1]) <= saved.step) : [];
  record.frames = record.frames.filter((f) => f.step <= saved.step);
  record.analysis.frames = record.analysis.frames.filter((f) => f.step <= saved.step);
  record.analysis.events = record.analysis.events.filter((e) => e.time <= saved.time);
  return execute(out, resolved, record, saved, rows, options, t0);
}

async function execute(out: string, r: ResolvedScenario, record: RunRecord, saved: SavedState | undefined, metricRows: string[], options: RunOptions, t0: number): Promise<RunOutcome> {
  const log = options.log ?? ((line: string) => process.stderr.write(line + '\n'));
  const nS = r.species.length;
  const { dt, steps: lastStep } = r;
  const every = r.output.everySteps;
  const checksum = record.mesh.checksum;
  const growing = r.growth !== undefined;
  // the surface: the start mesh, or (resuming a growing run) its refinements moved to the saved positions
  const sim = new SurfaceSimulation(r, saved);
  if (r.growth) record.growth ??= { description: r.growth.description, tolerance: r.growth.tolerance, updates: 0, refinements: [] };
  const area0 = meshArea(r.mesh);
  // pattern measures: vertex adjacency, and surface eigenpairs for the spectrum and the prediction
  let eig: Eigenpairs | undefined;
  const band = growing && r.analysis.modes > 0 ? scenarioBand(r) : null;
  const updateEigenpairs = (atStep: number) => {
    const surface = sim.stepper.surface;
    const eigArea = meshArea(surface);
    // enough modes to reach the unstable band on the grown surface
    const wanted = Math.max(r.analysis.modes, modesToCoverBand(eigArea, band) ?? 0);
    eig = laplaceBeltramiEigenpairs(surface, { count: Math.min(wanted, MAX_TRACKED_MODES, sim.vertexCount - 1), mass: 'lumped' });
    record.analysis.modesUpTo = eig.values[eig.values.length - 1];
    const rep = stabilityReport({ ...r, mesh: surface, system: sim.system }, { eigenpairs: eig });
    const prediction = { state: rep.state, band: rep.turing?.band ?? null, fastest: rep.turing?.fastest ?? null, predicted: rep.predicted, notes: rep.notes };
    if (atStep === 0) record.analysis.prediction = prediction;
    if (growing) (record.analysis.predictions ??= []).push({ time: atStep * dt, area: eigArea, vertices: sim.vertexCount, predicted: rep.predicted });
  };
  if (r.analysis.modes > 0 && !growing) updateEigenpairs(saved?.step ?? 0);
  // the vertex adjacency the pattern measures walk, kept apart from the rest of the topology
  const adjacency = (mesh: Mesh) => {
    const topo = meshTopology(mesh);
    return { vertexNeighbourOffsets: topo.vertexNeighbourOffsets, vertexNeighbours: topo.vertexNeighbours };
  };
  let neighbours = adjacency(sim.system.mesh);
  if (!growing) forgetMeshTopology(r.mesh); // the stepper holds all it needs; free edges and the CSR pattern
  const measuredIndex = r.species.indexOf(r.analysis.species);
  const measure = (state: Float64Array) => measurePattern(sim.stepper.surface, speciesField(state, nS, measuredIndex), sim.stepper.mass, neighbours, r.analysis.threshold, eig);
  let previousLabels: Int32Array | undefined = saved ? measure(saved.state).labels : undefined;
  let step = saved?.step ?? 0;
  let nextFrame = saved?.nextFrame ?? 0;
  let reference: Float64Array | undefined = r.steadyState !== undefined ? new Float64Array(saved?.reference ?? r.initial) : undefined;
  let referenceStep = saved ? Math.floor(saved.step / every) * every : 0;
  const session: RunRecord['sessions'][number] = { started: new Date().toISOString(), fromStep: step, setupSeconds: (performance.now() - t0) / 1000 };
  record.sessions.push(session);

  let outputSeconds = 0;
  const writeRecord = () => {
    record.updated = new Date().toISOString();
    writeFileAtomic(join(out, RUN_FILES.record), JSON.stringify(record, null, 2) + '\n', true);
  };
  const saveState = (state: Float64Array, atStep: number) => {
    writeFileAtomic(join(out, RUN_FILES.state), encodeState({ step: atStep, time: atStep * dt, nextFrame, species: [...r.species], vertexCount: sim.vertexCount, meshChecksum: checksum, dt, state, reference, growth: sim.savedGrowth() }), true);
  };
  const comments = (atStep: number) => [`placode ${VERSION} run ${r.name}`, `time ${atStep * dt} step ${atStep}`];
  const style = { colour: r.output.colour, colormap: r.output.colormap, range: r.output.range };
  /** metrics row, frame and saved state for the state at `atStep` */
  const emit = (state: Float64Array, atStep: number, frame: boolean) => {
    const tw = performance.now();
    const lastRow = metricRows[metricRows.length - 1];
    if (lastRow === undefined || Number(lastRow.split(',')[1]) !== atStep) {
      // a growing surface: eigenpairs of the surface as it is now (a pure function of it, so resumed runs agree)
      if (growing && r.analysis.modes > 0) updateEigenpairs(atStep);
      const pattern = measure(state);
      const a = record.analysis;
      const count = pattern.patches.length;
      if (a.frames.length && a.frames[a.frames.length - 1].patches.length !== count) a.lastCountChange = atStep * dt;
      a.frames.push({
        time: atStep * dt, step: atStep, threshold: pattern.threshold,
        patches: pattern.patches.map((p) => ({ area: p.area, centroid: p.centroid })),
        dominantEigenvalue: pattern.dominant?.eigenvalue, dominantFraction: pattern.dominant?.fraction,
      });
      if (previousLabels) for (const e of patchEvents(previousLabels, pattern.labels)) a.events.push({ time: atStep * dt, ...e });
      previousLabels = pattern.labels;
      const area = meshArea(sim.stepper.surface);
      metricRows.push(metricsRow(atStep * dt, atStep, stateMetrics(state, nS, sim.stepper.mass), [count, pattern.dominant?.eigenvalue, ...(growing ? [area, Math.sqrt(area / area0), sim.vertexCount] : [])]));
    }
    writeFileAtomic(join(out, RUN_FILES.metrics), [metricsHeader(r.species, growing), ...metricRows].join('\n') + '\n', true);
    if (frame && r.output.frames) {
      const name = frameName(nextFrame);
      writeFileAtomic(join(out, RUN_FILES.frames, name), encodeFrame(sim.stepper.surface, r.species, state, style, comments(atStep)), true);
      record.frames.push({ file: `${RUN_FILES.frames}/${name}`, time: atStep * dt, step: atStep });
    }
    if (frame) nextFrame++;
    saveState(state, atStep);
    outputSeconds += (performance.now() - tw) / 1000;
  };
  /** the scenario's extra formats (glb, obj, csv) beside a frame or the final PLY */
  const writeFormats = async (state: Float64Array, atStep: number, name: string) => {
    if (!r.output.formats.length || (name !== 'final' && !r.output.frames)) return;
    const tw = performance.now();
    const fields = Object.fromEntries(r.species.map((s, i) => [s, speciesField(state, nS, i)]));
    const colors = colorizeField(fields[r.output.colour], r.output.colormap, r.output.range === 'frame' ? undefined : r.output.range);
    for (const format of r.output.formats) {
      const bytes = await encodeSnapshot(format, sim.stepper.surface, fields, colors, comments(atStep).join('; '));
      writeFileAtomic(name === 'final' ? join(out, `final.${format}`) : join(out, RUN_FILES.frames, `${name}.${format}`), bytes, true);
    }
    outputSeconds += (performance.now() - tw) / 1000;
  };
  const finish = (reason: StopReason, atStep: number, message: string, state: Float64Array): RunOutcome => {
    const tw = performance.now();
    if (reason !== 'interrupted') writeFileAtomic(join(out, RUN_FILES.final), encodeFrame(sim.stepper.surface, r.species, state, style, comments(atStep)), true);
    outputSeconds += (performance.now() - tw) / 1000;
    record.status = reason;
    record.stop = { reason, time: atStep * dt, step: atStep, message };
    session.toStep = atStep;
    session.steppingSeconds = steppingSeconds;
    session.outputSeconds = outputSeconds;
    const allSteps = record.sessions.reduce((a, s) => a + ((s.toStep ?? s.fromStep) - s.fromStep), 0);
    const allSeconds = record.sessions.reduce((a, s) => a + (s.steppingSeconds ?? 0), 0);
    record.performance = {
      steps: allSteps,
      steppingSeconds: allSeconds,
      stepsPerSecond: allSteps / Math.max(allSeconds, 1e-9),
      vertexStepsPerSecond: (allSteps * sim.vertexCount) / Math.max(allSeconds, 1e-9),
      solverIterationsPerStep: r.scheme === 'imex' && r.solver === 'cg' ? sim.stepper.totalIterations / Math.max(1, sim.stepper.stepsTaken) : undefined,
      stepperBytesPerVertex: sim.stepper.bytes() / sim.vertexCount,
    };
    writeRecord();
    progress.stop();
    log(message);
    return { dir: out, reason, time: atStep * dt, step: atStep, message };
  };

  let interrupted = false;
  const onSignal = () => {
    if (interrupted) process.exit(130);
    interrupted = true;
  };
  process.on('SIGINT', onSignal);
  process.on('SIGTERM', onSignal);
  for (const w of r.warnings) log(`warning: ${w}`);
  for (const note of r.meshNotes) log(`mesh: ${note}`);
  log(`${saved ? 'resuming' : 'running'} ${r.name}: ${r.model} on ${sim.vertexCount} vertices, ${r.scheme} dt=${dt}, ${lastStep} steps to t=${lastStep * dt}${saved ? ` from t=${saved.time}` : ''} → ${out}`);
  /** Move the surface to `step` if due (or forced), refining when its elements have grown; an outcome if it folded. */
  const growTo = (step: number, force: boolean, chunkStart: number): RunOutcome | undefined => {
    try {
      const before = sim.vertexCount;
      const { moved, refinement } = sim.advanceGeometry(step, force);
      if (moved) record.growth!.updates++;
      if (refinement) {
        neighbours = adjacency(sim.stepper.surface);
        previousLabels = undefined;
        if (reference) reference = prolongField(reference, refinement, nS);
        record.growth!.refinements.push({ time: step * dt, step, from: before, to: sim.vertexCount });
        log(`  refined at t=${(step * dt).toPrecision(6)}: ${before} → ${sim.vertexCount} vertices`);
        if (r.analysis.modes > 0) updateEigenpairs(step);
      }
    } catch (e) {
      if (!(e instanceof GrowthDegenerationError)) throw e;
      steppingSeconds += (performance.now() - chunkStart) / 1000;
      emit(sim.stepper.state, step, false);
      return finish('degenerate', step, `${e.message}. The last state before it is in ${RUN_FILES.final} and ${RUN_FILES.state}.`, sim.stepper.state);
    }
    return undefined;
  };

  const progress = makeProgress(options, log, step * dt, lastStep * dt);
  let steppingSeconds = 0;
  try {
    if (!saved) {
      emit(sim.stepper.state, 0, true);
      await writeFormats(sim.stepper.state, 0, frameName(0).replace('.ply', ''));
    }
    writeRecord();
    const startStep = step;
    const started = performance.now();
    while (step < lastStep) {
      const target = Math.min(lastStep, (Math.floor(step / every) + 1) * every);
      const chunkStart = performance.now();
      while (step < target) {
        if (sim.driver) {
          const stopped = growTo(step, false, chunkStart);
          if (stopped) return stopped;
        }
        const ok = sim.stepper.step(step * dt);
        step++;
        if (!ok) {
          steppingSeconds += (performance.now() - chunkStart) / 1000;
          const bad = sim.stepper.state;
          let at = 0;
          while (at < bad.length && Number.isFinite(bad[at])) at++;
          const s = at % nS, vertex = Math.floor(at / nS);
          const good = sim.stepper.previous;
          emit(good, step - 1, false);
          return finish('blow-up', step - 1,
            `blow-up at t=${(step * dt).toPrecision(6)} (step ${step}): ${r.species[s]} became ${bad[at]} at vertex ${vertex}. ` +
            `The last good state (t=${((step - 1) * dt).toPrecision(6)}) is in ${RUN_FILES.final} and ${RUN_FILES.state}. ` +
            (r.scheme === 'explicit' ? 'Try a smaller time.step or scheme: imex.' : 'Try a smaller time.step: the reactions are integrated explicitly.'),
            good);
        }
        if ((step & 7) === 0 && performance.now() - chunkStart > 200) break;
        if (options.interruptAfterSteps !== undefined && step - startStep >= options.interruptAfterSteps) {
          interrupted = true;
          break;
        }
      }
      if (options.shouldStop?.()) interrupted = true;
      steppingSeconds += (performance.now() - chunkStart) / 1000;
      progress.update(step * dt, (step - startStep) / Math.max(1e-9, (performance.now() - started) / 1000));
      await new Promise((res) => setImmediate(res));
      const atOutput = step % every === 0 || step === lastStep;
      if (atOutput) {
        if (sim.driver) {
          const stopped = growTo(step, true, performance.now());
          if (stopped) return stopped;
        }
        emit(sim.stepper.state, step, true);
        await writeFormats(sim.stepper.state, step, frameName(nextFrame - 1).replace('.ply', ''));
        if (reference && r.steadyState !== undefined) {
          const change = relativeChange(sim.stepper.state, reference, (step - referenceStep) * dt);
          reference.set(sim.stepper.state);
          referenceStep = step;
          if (change < r.steadyState) {
            record.analysis.timeToSteadyState = step * dt;
            await writeFormats(sim.stepper.state, step, 'final');
            return finish('steady-state', step, `steady state at t=${(step * dt).toPrecision(6)}: relative change ${change.toExponential(2)} per unit time < ${r.steadyState}. Outputs in ${out}`, sim.stepper.state);
          }
        }
      }
      if (interrupted) {
        if (!atOutput) saveState(sim.stepper.state, step);
        return finish('interrupted', step, `interrupted at t=${(step * dt).toPrecision(6)} (step ${step} of ${lastStep}); continue with: placode run --resume ${out}`, sim.stepper.state);
      }
    }
    await writeFormats(sim.stepper.state, step, 'final');
    return finish('end', step, `finished at t=${(step * dt).toPrecision(6)} after ${step} steps. Outputs in ${out}`, sim.stepper.state);
  } finally {
    process.off('SIGINT', onSignal);
    process.off('SIGTERM', onSignal);
    progress.stop();
  }
}

/** The most eigenpairs a growing run computes to follow its predicted mode. */
const MAX_TRACKED_MODES = 300;

/** max_i |U − U_ref| / (Δt · max(max_i |U|, 1e-30)). */
function relativeChange(state: Float64Array, reference: Float64Array, interval: number): number {
  let diff = 0, size = 0;
  for (let i = 0; i < state.length; i++) {
    diff = Math.max(diff, Math.abs(state[i] - reference[i]));
    size = Math.max(size, Math.abs(state[i]));
  }
  return diff / (Math.max(interval, 1e-300) * Math.max(size, 1e-30));
}

interface Progress {
  update(time: number, stepsPerSecond: number): void;
  stop(): void;
}

function formatSeconds(s: number): string {
  if (!Number.isFinite(s)) return '?';
  if (s < 90) return `${s.toFixed(0)} s`;
  if (s < 5400) return `${(s / 60).toFixed(1)} min`;
  return `${(s / 3600).toFixed(1)} h`;
}

/** The progress display a --progress option asks for: auto is a bar on a terminal, plain lines otherwise. */
export function progressMode(option: RunOptions['progress']): 'bar' | 'lines' | 'none' {
  return option === 'auto' || option === undefined ? (process.stderr.isTTY ? 'bar' : 'lines') : option;
}

function makeProgress(options: RunOptions, log: (line: string) => void, start: number, end: number): Progress {
  const mode = progressMode(options.progress);
  if (mode === 'none') return { update() {}, stop() {} };
  const started = performance.now();
  if (mode === 'bar') {
    const bar = new cliProgress.SingleBar({
      format: 't {time}/{end} |{bar}| {percentage}% | {rate} steps/s | ETA {eta_formatted}',
      hideCursor: true,
      stream: process.stderr,
      etaBuffer: 50,
    }, cliProgress.Presets.shades_classic);
    bar.start(end, start, { time: start, end, rate: 0 });
    let stopped = false;
    return {
      update(time, rate) { if (!stopped) bar.update(Math.min(time, end), { time: Number(time.toPrecision(6)), rate: rate.toFixed(0) }); },
      stop() { if (!stopped) { stopped = true; bar.stop(); } },
    };
  }
  let last = -Infinity;
  return {
    update(time, rate) {
      const now = performance.now();
      if (now - last < 2000 && time < end) return;
      last = now;
      const elapsed = (now - started) / 1000;
      const eta = time > start ? (elapsed * (end - time)) / (time - start) : Infinity;
      log(`  t=${time.toPrecision(6)}/${end} (${((100 * time) / end).toFixed(1)}%)  ${rate.toFixed(0)} steps/s  ETA ${formatSeconds(eta)}`);
    },
    stop() {},
  };
}
