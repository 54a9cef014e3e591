import { formatStageMap } from '../growth/stageMapReport.ts';
import { join } from 'node:path';
import type { ResolvedScenario } from '../scenario/ResolvedScenario.ts';
import { writeFileAtomic } from '../io/meshFiles.ts';
import { FileWriteError, fileErrorWords, removeTemporaries } from '../io/fileAccess.ts';
import { readdirSync, renameSync, rmSync } from 'node:fs';
import { RUN_FILES, RUN_OUTPUT_FILES, frameName, encodeFrame, stateMetrics, metricsHeader, metricsRow, encodeState, type SavedState } from './runFiles.ts';
import type { RunRecord, StopReason } from './RunRecord.ts';
import { RunEngine, type EngineEvent } from './RunEngine.ts';
import { PatternTracker } from './PatternTracker.ts';
import { makeProgress, progressMode, type ProgressOption } from './progress.ts';
import { meshArea } from '../mesh/triangleAreas.ts';
import { speciesField } from '../integrate/ReactionDiffusionSystem.ts';
import { encodeSnapshot } from '../io/encodeSnapshot.ts';
import { colorizeField } from '../io/colormap.ts';
import { VERSION } from '../version.ts';
import { textChecksum } from './meshChecksum.ts';
import { LONG_RUN_SECONDS, RUN_CHUNK_MS } from '../defaults.ts';
import { formatDuration } from './progress.ts';
import { machineThreads, nodeThreadTeam } from './nodeThreads.ts';
import type { ThreadTeam } from '../integrate/ThreadTeam.ts';
import { threadNote, usefulThreads } from './runThreads.ts';

export interface RunOptions {
  /** run directory to write (new run) */
  out?: string;
  /** replace an existing, non-empty run directory */
  force?: boolean;
  /** 'bar' on a terminal, 'lines' otherwise; 'none' for silence */
  progress?: ProgressOption;
  /** stop as if interrupted once this many steps have been taken in this call (tests, scripted pauses) */
  interruptAfterSteps?: number;
  /** asked between chunks of steps: true stops the run as if interrupted (state saved, resumable) */
  shouldStop?: () => boolean;
  /** threads to step with, over the scenario's time.threads (a mesh too small for them uses fewer) */
  threads?: number;
  /** threads when neither `threads` nor the scenario says (default: the machine's cores; sweeps: 1) */
  defaultThreads?: number;
  /** called with the run's thread team once it is made (tests inject a failing thread through it) */
  onTeam?: (team: ThreadTeam) => void;
  /** run however long the first chunk's rate says the run will take (otherwise a run estimated above LONG_RUN_SECONDS stops, resumable, and says so) */
  yes?: boolean;
  /** called once the run's record and first state are written, before the first step */
  onStarted?: () => void;
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

/** Where a run's lines go: `options.log`, else stderr. */
export function runLog(options: RunOptions): (line: string) => void {
  return options.log ?? ((line: string) => process.stderr.write(line + '\n'));
}

/** Where a run is written: `dir`; with `replacing`, `dir` is a new directory beside that run, which replaces it once the new run has its first state. */
export interface RunTarget {
  dir: string;
  replacing?: string;
}

/**
 * Step a resolved scenario with the run engine and write its run directory:
 * at every output a metrics row, the pattern measures, a frame (and the
 * scenario's extra formats) and the saved state; at the end final.ply, the
 * record with its stop reason and throughput. Ctrl-C (SIGINT or SIGTERM)
 * stops after the current chunk with the state saved; a second one quits at
 * once (the last saved state stays valid). `saved` resumes an interrupted run;
 * `metricRows` are the metrics rows it already wrote.
 */
export async function writeRun(target: RunTarget, r: ResolvedScenario, record: RunRecord, saved: SavedState | undefined, metricRows: string[], options: RunOptions, t0: number): Promise<RunOutcome> {
  /** where files go now: the run directory, or (replacing a run) a new one beside it until its first state is written */
  let out = target.dir;
  const final = target.replacing ?? target.dir;
  const log = runLog(options);
  const nS = r.species.length;
  const { dt, steps: lastStep } = r;
  const growing = r.growth !== undefined;
  const requested = Math.max(1, options.threads ?? r.threads ?? options.defaultThreads ?? machineThreads());
  const team = await nodeThreadTeam(usefulThreads(r, requested));
  if (team) options.onTeam?.(team);
  const engine = new RunEngine(r, saved, team);
  record.threads = { requested, used: engine.threads };
  if (r.growth) record.growth ??= { description: r.growth.description, tolerance: r.growth.tolerance, updates: 0, refinements: [], ...(r.growth.stages ? { stages: r.growth.stages } : {}) };
  const updatesBefore = record.growth?.updates ?? 0;
  const area0 = meshArea(r.mesh);
  let announced = false; // warnings found before the run's first line are printed with the scenario's
  const tracker = new PatternTracker(engine, record.analysis, saved !== undefined, (w) => {
    if (record.warnings.includes(w)) return;
    record.warnings.push(w);
    if (announced) log(`warning: ${w}`);
  });
  engine.onRefined = ({ step, from, to }) => {
    tracker.refined(step);
    record.growth!.refinements.push({ time: step * dt, step, from, to });
    log(`  refined at t=${(step * dt).toPrecision(6)}: ${from} → ${to} vertices`);
  };
  let nextFrame = saved?.nextFrame ?? 0;
  const session: RunRecord['sessions'][number] = { started: new Date().toISOString(), fromStep: engine.step, setupSeconds: (performance.now() - t0) / 1000 };
  record.sessions.push(session);

  let outputSeconds = 0, steppingSeconds = 0;
  const writeRecord = () => {
    record.updated = new Date().toISOString();
    writeFileAtomic(join(out, RUN_FILES.record), JSON.stringify(record, null, 2) + '\n', true);
  };
  const scenarioChecksum = textChecksum(record.scenarioText);
  let lastSaved = saved?.step ?? 0;
  const saveState = (state: Float64Array, atStep: number) => {
    lastSaved = atStep;
    writeFileAtomic(join(out, RUN_FILES.state), encodeState({ step: atStep, time: atStep * dt, nextFrame, species: [...r.species], vertexCount: engine.vertexCount, meshChecksum: record.mesh.checksum, scenarioChecksum, dt, state, ...engine.savedParts() }), true);
  };
  const comments = (atStep: number) => [`placode ${VERSION} run ${r.name}`, `time ${atStep * dt} step ${atStep}`];
  const style = { colour: r.output.colour, colormap: r.output.colormap, range: r.output.range };
  /** metrics row, pattern measures, frame and saved state for the state at `atStep` */
  const emit = (state: Float64Array, atStep: number, frame: boolean) => {
    const tw = performance.now();
    const lastRow = metricRows[metricRows.length - 1];
    if (lastRow === undefined || Number(lastRow.split(',')[1]) !== atStep) {
      const pattern = tracker.record(atStep, state);
      const area = meshArea(engine.surface);
      metricRows.push(metricsRow(atStep * dt, atStep, stateMetrics(state, nS, engine.mass), [pattern.patches, pattern.dominantEigenvalue, ...(growing ? [area, Math.sqrt(area / area0), engine.vertexCount] : [])]));
    }
    writeFileAtomic(join(out, RUN_FILES.metrics), [metricsHeader(r.species, growing), ...metricRows].join('\n') + '\n', true);
    if (frame && r.output.frames) {
      const name = frameName(nextFrame);
      writeFileAtomic(join(out, RUN_FILES.frames, name), encodeFrame(engine.surface, r.species, state, style, comments(atStep)), true);
      record.frames.push({ file: `${RUN_FILES.frames}/${name}`, time: atStep * dt, step: atStep });
    }
    if (frame) nextFrame++;
    saveState(state, atStep);
    outputSeconds += (performance.now() - tw) / 1000;
  };
  /** the scenario's extra formats (glb, obj, csv) beside a frame or the final PLY */
  const writeFormats = async (atStep: number, name: string) => {
    if (!r.output.formats.length || (name !== 'final' && !r.output.frames)) return;
    const tw = performance.now();
    const fields = Object.fromEntries(r.species.map((s, i) => [s, speciesField(engine.state, nS, i)]));
    const colors = colorizeField(fields[r.output.colour], r.output.colormap, r.output.range === 'frame' ? undefined : r.output.range);
    for (const format of r.output.formats) {
      const bytes = await encodeSnapshot(format, engine.surface, fields, colors, comments(atStep).join('; '));
      writeFileAtomic(name === 'final' ? join(out, `final.${format}`) : join(out, RUN_FILES.frames, `${name}.${format}`), bytes, true);
    }
    outputSeconds += (performance.now() - tw) / 1000;
  };
  const finish = (reason: StopReason, atStep: number, message: string): RunOutcome => {
    const tw = performance.now();
    if (reason !== 'interrupted') writeFileAtomic(join(out, RUN_FILES.final), encodeFrame(engine.surface, r.species, engine.state, style, comments(atStep)), true);
    outputSeconds += (performance.now() - tw) / 1000;
    record.status = reason;
    record.stop = { reason, time: atStep * dt, step: atStep, message };
    if (record.growth) record.growth.updates = updatesBefore + engine.moves;
    session.toStep = atStep;
    session.steppingSeconds = steppingSeconds;
    session.outputSeconds = outputSeconds;
    const allSteps = record.sessions.reduce((a, s) => a + ((s.toStep ?? s.fromStep) - s.fromStep), 0);
    const allSeconds = record.sessions.reduce((a, s) => a + (s.steppingSeconds ?? 0), 0);
    const stepper = engine.sim.stepper;
    record.performance = {
      steps: allSteps,
      steppingSeconds: allSeconds,
      stepsPerSecond: allSteps / Math.max(allSeconds, 1e-9),
      vertexStepsPerSecond: (allSteps * engine.vertexCount) / Math.max(allSeconds, 1e-9),
      solverIterationsPerStep: r.scheme === 'imex' && r.solver === 'cg' ? stepper.totalIterations / Math.max(1, stepper.stepsTaken) : undefined,
      stepperBytesPerVertex: stepper.bytes() / engine.vertexCount,
    };
    writeRecord();
    progress.stop();
    log(message);
    return { dir: final, reason, time: atStep * dt, step: atStep, message };
  };

  let interrupted = false;
  const onSignal = () => {
    if (interrupted) {
      // a second Ctrl-C quits at once: the record says so, and the run resumes from its last saved state
      record.status = 'interrupted';
      record.stop = { reason: 'interrupted', time: lastSaved * dt, step: lastSaved, message: `stopped at once by a second Ctrl-C; continue from its last saved state (t=${(lastSaved * dt).toPrecision(6)}) with: placode run --resume ${final}` };
      try {
        writeRecord();
      } catch {
        // quitting all the same: state.bin is what resume needs
      }
      process.exit(130);
    }
    interrupted = true;
  };
  process.on('SIGINT', onSignal);
  process.on('SIGTERM', onSignal);
  for (const w of record.warnings) log(`warning: ${w}`);
  announced = true;
  for (const note of r.meshNotes) log(`mesh: ${note}`);
  if (!saved) for (const stage of r.growth?.stages ?? []) log(formatStageMap(stage, r.units));
  log(`${saved ? 'resuming' : 'running'} ${r.name}: ${r.model} on ${engine.vertexCount} vertices, ${r.scheme} dt=${dt}, ${lastStep} steps to t=${lastStep * dt}${saved ? ` from t=${saved.time}` : ''}, ${threadNote(requested, engine.threads)} → ${final}`);
  const progress = makeProgress(options.progress, log, engine.time, lastStep * dt);
  try {
    if (!saved) {
      emit(engine.state, 0, true);
      await writeFormats(0, frameName(0).replace('.ply', ''));
    }
    writeRecord();
    if (target.replacing) {
      // the new run has its first state: only now does it take the old run's place
      swapDirectories(target.dir, target.replacing);
      out = target.replacing;
    }
    options.onStarted?.();
    const startStep = engine.step;
    const started = performance.now();
    let checkedLength = false;
    while (!engine.finished) {
      const chunkStart = performance.now();
      const limit = options.interruptAfterSteps === undefined ? undefined : options.interruptAfterSteps - (engine.step - startStep);
      const ev: EngineEvent = engine.advance({ deadline: chunkStart + RUN_CHUNK_MS, maxSteps: limit });
      steppingSeconds += (performance.now() - chunkStart) / 1000;
      if (ev.kind === 'failed') {
        emit(engine.state, ev.step, false);
        const where = ev.reason === 'degenerate' ? `The last state before it is in ${RUN_FILES.final} and ${RUN_FILES.state}.` : `The last good state (t=${(ev.step * dt).toPrecision(6)}) is in ${RUN_FILES.final} and ${RUN_FILES.state}.`;
        if (ev.reason === 'thread') return finish('failed', ev.step, `${ev.message}. ${where} Continue it with: placode run --resume ${final} (--threads 1 runs it on this thread alone)`);
        return finish(ev.reason, ev.step, `${ev.message}. ${where}${ev.advice ? ` ${ev.advice}` : ''}`);
      }
      if (options.shouldStop?.()) interrupted = true;
      if (!checkedLength && !engine.finished) {
        // the first chunk's rate says how long the whole run takes: a very long one waits for a yes
        checkedLength = true;
        const rate = (engine.step - startStep) / Math.max(1e-9, (performance.now() - started) / 1000);
        const eta = (lastStep - engine.step) / rate;
        if (eta > LONG_RUN_SECONDS && !options.yes) {
          if (ev.kind !== 'output') saveState(engine.state, engine.step);
          return finish('interrupted', engine.step, `at ${rate.toPrecision(3)} steps/s this run needs about ${formatDuration(eta)} (${lastStep} steps): it was stopped at once, its state saved. Shorten time.end or lengthen time.step, or run it anyway with: placode run --resume ${final} --yes`);
        }
        if (progressMode(options.progress) !== 'none') log(`  about ${formatDuration(eta)} to go at ${rate.toPrecision(3)} steps/s`);
      }
      if (options.interruptAfterSteps !== undefined && engine.step - startStep >= options.interruptAfterSteps) interrupted = true;
      progress.update(engine.time, (engine.step - startStep) / Math.max(1e-9, (performance.now() - started) / 1000));
      await new Promise((res) => setImmediate(res));
      if (ev.kind === 'output') {
        emit(engine.state, ev.step, true);
        await writeFormats(ev.step, frameName(nextFrame - 1).replace('.ply', ''));
        if (ev.finish) {
          if (ev.finish.reason === 'steady-state') record.analysis.timeToSteadyState = ev.step * dt;
          await writeFormats(ev.step, 'final');
          return finish(ev.finish.reason, ev.step, `${ev.finish.message}. Outputs in ${final}`);
        }
      }
      if (interrupted) {
        if (ev.kind !== 'output') saveState(engine.state, engine.step);
        return finish('interrupted', engine.step, `interrupted at t=${engine.time.toPrecision(6)} (step ${engine.step} of ${lastStep}); continue with: placode run --resume ${final}`);
      }
    }
    // resumed at the end (an interruption landed on the last step): the final state is the saved one
    await writeFormats(engine.step, 'final');
    return finish('end', engine.step, `finished at t=${engine.time.toPrecision(6)} after ${engine.step} steps. Outputs in ${final}`);
  } catch (e) {
    if (!(e instanceof FileWriteError)) throw e;
    progress.stop();
    if (out !== final) {
      // replacing a run: the new one never got its first state; the old one stays as it was
      rmSync(out, { recursive: true, force: true });
      throw new FileWriteError(e.file, e.cause, `; ${final} is left as it was`);
    }
    removeTemporaries(out);
    const message = `cannot write ${e.file}: ${fileErrorWords(e.cause)}. The run stopped at t=${engine.time.toPrecision(6)} (step ${engine.step}); its last saved state is at t=${(lastSaved * dt).toPrecision(6)}. ${e.diskFull ? 'Free some space, then continue' : 'Continue'} it with: placode run --resume ${final}`;
    record.status = 'failed';
    record.stop = { reason: 'failed', time: lastSaved * dt, step: lastSaved, message };
    try {
      writeRecord();
    } catch {
      // the record cannot be written either: it still says running, and resume works from state.bin all the same
    }
    log(message);
    return { dir: final, reason: 'failed', time: lastSaved * dt, step: lastSaved, message };
  } finally {
    team?.dispose();
    process.off('SIGINT', onSignal);
    process.off('SIGTERM', onSignal);
    progress.stop();
  }
}

/**
 * Put the new run written in `fresh` in the place of the run in `old`: the old
 * run's own files (record, metrics, state, final states, frames) are removed,
 * the new ones renamed in (no copying, no space needed), anything else a user
 * keeps in the directory is left alone.
 */
function swapDirectories(fresh: string, old: string): void {
  try {
    for (const name of [...RUN_OUTPUT_FILES, ...readdirSync(fresh)]) rmSync(join(old, name), { recursive: true, force: true });
    for (const name of readdirSync(fresh)) renameSync(join(fresh, name), join(old, name));
    rmSync(fresh, { recursive: true, force: true });
  } catch (e) {
    throw new FileWriteError(old, e, ` (the new run is in ${fresh})`);
  }
}
