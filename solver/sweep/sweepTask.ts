import { existsSync, readFileSync, rmSync, mkdirSync, appendFileSync } from 'node:fs';
import { hostname } from 'node:os';
import { join } from 'node:path';
import { RUN_FILES } from '../run/runFiles.ts';
import { peekRunRecord } from '../run/runDirectory.ts';
import type { RunRecord } from '../run/RunRecord.ts';
import { writeFileAtomic } from '../io/meshFiles.ts';
import { runScenarioFile, resumeRun, type RunOutcome } from '../run/runScenarioFile.ts';
import { readManifest, SWEEP_FILES, type ManifestEntry } from './sweepPlan.ts';
import { UsageError } from '../UsageError.ts';
import { SWEEP_RUN_THREADS } from '../defaults.ts';

/**
 * Where a run of a sweep stands, read from its run directory alone (so any
 * executor, local or Slurm, and `sweep status` agree):
 * done — finished (end time or steady state); failed — stopped by a blow-up,
 * a folded surface, or an error (failure.json); running — started and not
 * finished (or stopped without a word: a killed job); interrupted — stopped
 * with its state saved; pending — not started.
 */
export type RunState = 'done' | 'failed' | 'running' | 'interrupted' | 'pending';

export interface RunStatus {
  state: RunState;
  message?: string;
}

/** The state of a run; `read` is its record when the caller has read it already (readRunRecord). */
export function runStatus(dir: string, entry: ManifestEntry, read?: { record: RunRecord | null | undefined }): RunStatus {
  const failure = join(dir, entry.run, SWEEP_FILES.failure);
  if (existsSync(failure)) {
    try {
      return { state: 'failed', message: (JSON.parse(readFileSync(failure, 'utf8')) as { message: string }).message };
    } catch {
      return { state: 'failed', message: `${failure} cannot be read` };
    }
  }
  const record = read ? read.record : peekRunRecord(join(dir, entry.run));
  if (record === undefined) return { state: 'pending' };
  if (record === null) return { state: 'running', message: 'record.json cannot be read: the run will start again' };
  switch (record.status) {
    case 'end':
    case 'steady-state':
      return { state: 'done', message: record.stop?.message };
    case 'blow-up':
    case 'degenerate':
    case 'failed':
      return { state: 'failed', message: record.stop?.message };
    case 'interrupted':
      return { state: 'interrupted', message: record.stop?.message };
    default:
      return { state: 'running' };
  }
}

export interface TaskOptions {
  /** run failed runs again (default: a failed run counts as finished) */
  retryFailed?: boolean;
  /** where the run's messages go (default: stderr) */
  log?: (line: string) => void;
  /** asked between chunks of steps: true stops the run, saving its state */
  shouldStop?: () => boolean;
  /** called once the run has started stepping (its record and first state written) */
  onStarted?: () => void;
  /** the sweep's manifest when the caller has read it already (a pool worker reads it once) */
  manifest?: { dir: string; entries: ManifestEntry[] };
}

export interface TaskOutcome {
  index: number;
  id: string;
  /** the run's state after this call */
  state: RunState;
  /** true when the run was already finished and nothing ran */
  skipped: boolean;
  message: string;
  seconds: number;
}

/**
 * Run one entry of a sweep into its run directory: skip it when finished,
 * resume it when it was interrupted with its state saved, else start it
 * afresh. An error is written to the run's failure.json instead of thrown, so
 * one bad point never stops the others. Messages also go to logs/ID.log.
 */
export async function runSweepTask(dirArg: string, index: number, options: TaskOptions = {}): Promise<TaskOutcome> {
  const { dir, entries } = options.manifest ?? readManifest(dirArg);
  if (!(index >= 0 && index < entries.length)) throw new UsageError(`--index ${index}: the sweep in ${dirArg} has runs 0–${entries.length - 1}`);
  const entry = entries[index];
  const t0 = performance.now();
  const before = runStatus(dir, entry);
  const seconds = () => (performance.now() - t0) / 1000;
  if (before.state === 'done' || (before.state === 'failed' && !options.retryFailed)) {
    return { index, id: entry.id, state: before.state, skipped: true, message: before.message ?? before.state, seconds: seconds() };
  }
  const run = join(dir, entry.run);
  mkdirSync(join(dir, SWEEP_FILES.logs), { recursive: true });
  const logFile = join(dir, SWEEP_FILES.logs, `${entry.id}.log`);
  const log = (line: string) => {
    appendFileSync(logFile, line + '\n');
    options.log?.(line);
  };
  rmSync(join(run, SWEEP_FILES.failure), { force: true });
  log(`# ${new Date().toISOString()} ${hostname()} run ${index} (${entry.id}): ${entry.label}`);
  let outcome: RunOutcome;
  try {
    const resumable = (before.state === 'interrupted' || before.state === 'running') && existsSync(join(run, RUN_FILES.state));
    outcome = resumable
      ? await resumeRun(run, { progress: 'none', yes: true, defaultThreads: SWEEP_RUN_THREADS, log, shouldStop: options.shouldStop, onStarted: options.onStarted, command: ['sweep', 'task', dir, '--index', String(index)] })
      : await runScenarioFile(join(dir, entry.scenario), { out: run, force: true, progress: 'none', yes: true, defaultThreads: SWEEP_RUN_THREADS, log, shouldStop: options.shouldStop, onStarted: options.onStarted, command: ['sweep', 'task', dir, '--index', String(index)] });
  } catch (e) {
    const message = (e as Error).message;
    log(`failed: ${message}`);
    markFailed(dir, entry, message);
    return { index, id: entry.id, state: 'failed', skipped: false, message, seconds: seconds() };
  }
  const after = runStatus(dir, entry);
  return { index, id: entry.id, state: after.state, skipped: false, message: outcome.message, seconds: seconds() };
}

/** Record a run as failed (its failure.json), with the error that stopped it. */
export function markFailed(dir: string, entry: ManifestEntry, message: string): void {
  const run = join(dir, entry.run);
  mkdirSync(run, { recursive: true });
  writeFileAtomic(join(run, SWEEP_FILES.failure), JSON.stringify({ index: entry.index, id: entry.id, message, host: hostname(), time: new Date().toISOString() }, null, 2) + '\n', true);
}

/** Counts of every state, and each run's state, of a planned sweep. */
export function sweepStatus(dirArg: string): { dir: string; counts: Record<RunState, number>; runs: (ManifestEntry & RunStatus)[] } {
  const { dir, entries } = readManifest(dirArg);
  const counts: Record<RunState, number> = { done: 0, failed: 0, running: 0, interrupted: 0, pending: 0 };
  const runs = entries.map((e) => {
    const s = runStatus(dir, e);
    counts[s.state]++;
    return { ...e, ...s };
  });
  return { dir, counts, runs };
}
