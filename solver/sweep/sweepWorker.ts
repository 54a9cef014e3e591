/**
 * A worker thread of the local sweep pool: runs the sweep entries the pool
 * sends it, one at a time, and stops a running one (state saved) when told.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { runSweepTask } from './sweepTask.ts';
import { readManifest } from './sweepPlan.ts';

const port = parentPort!;
const data = workerData as { dir: string; retryFailed: boolean };
const manifest = readManifest(data.dir); // once per worker, not once per run
let stop = false;
port.on('message', async (message: { type: 'stop' } | { type: 'run'; index: number }) => {
  if (message.type === 'stop') {
    stop = true;
    return;
  }
  try {
    const outcome = await runSweepTask(data.dir, message.index, {
      retryFailed: data.retryFailed, shouldStop: () => stop, manifest,
      onStarted: () => port.postMessage({ type: 'started', index: message.index }),
    });
    port.postMessage({ type: 'done', outcome });
  } catch (e) {
    port.postMessage({ type: 'error', index: message.index, message: e instanceof Error ? e.message : String(e) });
  }
});
port.postMessage({ type: 'ready' });
