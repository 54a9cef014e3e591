import { Worker } from 'node:worker_threads';
import { availableParallelism } from 'node:os';
import cliProgress from 'cli-progress';
import { readManifest } from './sweepPlan.ts';
import { runStatus, markFailed, type TaskOutcome } from './sweepTask.ts';
import { markInterrupted } from '../run/runDirectory.ts';
import { join } from 'node:path';
import { progressMode } from '../run/progress.ts';
import { SWEEP_RUN_THREADS } from '../defaults.ts';

/** The worker thread's script: compiled (dist/) next to this file, or the sources through the TypeScript loader. */
const WORKER = new URL(import.meta.url.endsWith('.js') ? './sweepWorker.js' : './sweepWorkerSource.mjs', import.meta.url);

export interface PoolOptions {
  /** worker threads (default: every core) */
  workers?: number;
  retryFailed?: boolean;
  progress?: 'auto' | 'bar' | 'lines' | 'none';
  log?: (line: string) => void;
  /**
   * asked whenever a run starts stepping or finishes: true stops the pool, every
   * running run saving its state (tests, scripted pauses)
   */
  stopWhen?: (progress: { finished: number; running: number }) => boolean;
}

export interface PoolOutcome {
  total: number;
  /** finished before this call */
  skipped: number;
  /** of those, the runs that had failed (they are not run again without retryFailed) */
  failedBefore: number;
  done: number;
  failed: { index: number; id: string; message: string }[];
  /** left unfinished by an interruption */
  unfinished: number;
  interrupted: boolean;
  seconds: number;
  workers: number;
}

/**
 * `placode sweep run`: run every unfinished entry of a sweep on a pool of
 * worker threads, each running one scenario at a time on SWEEP_RUN_THREADS
 * thread unless the scenario's time.threads says otherwise (so N workers use
 * N cores). Finished runs are skipped, so an
 * interrupted sweep resumes where it stopped; Ctrl-C (or SIGTERM) asks every
 * worker to save its run's state, and a second Ctrl-C ends at once.
 */
export async function runSweepLocal(dirArg: string, options: PoolOptions = {}): Promise<PoolOutcome> {
  const { dir, entries } = readManifest(dirArg);
  const log = options.log ?? ((s: string) => process.stderr.write(s + '\n'));
  const t0 = performance.now();
  const todo: number[] = [];
  let skipped = 0, failedBefore = 0;
  for (const e of entries) {
    const s = runStatus(dir, e).state;
    if (s === 'done' || (s === 'failed' && !options.retryFailed)) {
      skipped++;
      if (s === 'failed') failedBefore++;
    } else todo.push(e.index);
  }
  const workers = Math.max(1, Math.min(options.workers ?? availableParallelism(), todo.length || 1));
  const outcome: PoolOutcome = { total: entries.length, skipped, failedBefore, done: 0, failed: [], unfinished: 0, interrupted: false, seconds: 0, workers };
  if (!todo.length) {
    log(`all ${entries.length} runs of ${dirArg} are finished (${skipped} skipped)${options.retryFailed ? '' : '; --retry-failed runs failed ones again'}`);
    return outcome;
  }
  log(`running ${todo.length} of ${entries.length} runs on ${workers} worker thread${workers > 1 ? 's' : ''}${skipped ? ` (${skipped} already finished)` : ''}; each run steps on ${SWEEP_RUN_THREADS} thread unless its scenario sets time.threads (the pool already fills the cores)`);
  const mode = progressMode(options.progress);
  const bar = mode === 'bar' ? new cliProgress.SingleBar({ format: 'sweep |{bar}| {value}/{total} runs  {failed} failed  ETA {eta_formatted}', hideCursor: true, stream: process.stderr }, cliProgress.Presets.shades_classic) : undefined;
  bar?.start(todo.length, 0, { failed: 0 });
  let finished = 0;
  let stopping = false;
  /** runs that have started stepping and not finished */
  const running = new Set<number>();
  const pool: Worker[] = [];
  const stopAll = () => {
    if (stopping) return;
    stopping = true;
    outcome.interrupted = true;
    for (const w of pool) w.postMessage({ type: 'stop' });
  };
  let signals = 0;
  const onSignal = () => {
    signals++;
    if (signals > 1) {
      for (const w of pool) void w.terminate();
      // the runs stopped mid-chunk resume from their last saved state: say so in their records
      for (const index of running) markInterrupted(join(dir, entries[index].run), 'stopped at once by a second Ctrl-C; it continues from its last saved state');
      process.exit(130);
    }
    log('stopping: every running run saves its state (Ctrl-C again to quit at once)');
    stopAll();
  };
  process.on('SIGINT', onSignal);
  process.on('SIGTERM', onSignal);
  const record = (o: TaskOutcome | { index: number; id: string; state: 'failed'; message: string }) => {
    finished++;
    if (o.state === 'done') outcome.done++;
    else if (o.state === 'failed') outcome.failed.push({ index: o.index, id: o.id, message: o.message });
    else outcome.unfinished++;
    bar?.update(finished, { failed: outcome.failed.length });
    if (mode === 'lines') log(`  [${finished}/${todo.length}] run ${o.index} (${o.id}) ${o.state}${o.state === 'failed' ? `: ${o.message}` : ''}`);
    running.delete(o.index);
    if (options.stopWhen?.({ finished, running: running.size })) stopAll();
  };
  try {
    await new Promise<void>((resolveAll) => {
      let next = 0;
      let alive = 0;
      let crashes = 0;
      /** Start a worker thread; one that dies mid-run records that run as failed and is replaced. */
      const spawn = () => {
        const w = new Worker(WORKER, { workerData: { dir, retryFailed: options.retryFailed ?? false } });
        pool.push(w);
        alive++;
        let current: number | undefined;
        let crashed: string | undefined;
        const feed = () => {
          if (stopping || next >= todo.length) {
            current = undefined;
            void w.terminate();
            return;
          }
          current = todo[next++];
          w.postMessage({ type: 'run', index: current });
        };
        w.on('message', (m: { type: string; outcome?: TaskOutcome; index?: number; message?: string }) => {
          if (m.type === 'ready') feed();
          else if (m.type === 'started') {
            running.add(m.index!);
            if (options.stopWhen?.({ finished, running: running.size })) stopAll();
          }
          else if (m.type === 'done') { record(m.outcome!); feed(); }
          else if (m.type === 'error') { record({ index: m.index!, id: entries[m.index!].id, state: 'failed', message: m.message! }); feed(); }
        });
        w.on('error', (e) => { crashed = e.message; });
        w.on('exit', (code) => {
          alive--;
          if (current !== undefined) {
            const message = `the worker thread running it died (${crashed ?? `exit code ${code}`}); the other runs went on`;
            const index = current;
            current = undefined;
            markFailed(dir, entries[index], message);
            record({ index, id: entries[index].id, state: 'failed', message });
            // replace it, unless workers die over and over (then something is wrong with every run)
            if (++crashes <= workers * 2 && !stopping && next < todo.length) spawn();
          }
          if (alive === 0) resolveAll();
        });
      };
      for (let k = 0; k < workers; k++) spawn();
    });
  } finally {
    process.off('SIGINT', onSignal);
    process.off('SIGTERM', onSignal);
    bar?.stop();
  }
  outcome.unfinished += todo.length - finished;
  outcome.failed.sort((a, b) => a.index - b.index);
  outcome.seconds = (performance.now() - t0) / 1000;
  return outcome;
}
