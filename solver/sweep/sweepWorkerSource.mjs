// A worker thread of the local sweep pool: registers the TypeScript loader,
// then runs the sweep entries the pool sends it, one at a time.
import { register } from 'tsx/esm/api';
import { parentPort, workerData } from 'node:worker_threads';

register();
const { runSweepTask } = await import('./sweepTask.ts');
const { readManifest } = await import('./sweepPlan.ts');
const manifest = readManifest(workerData.dir); // once per worker, not once per run
let stop = false;
parentPort.on('message', async (message) => {
  if (message.type === 'stop') {
    stop = true;
    return;
  }
  if (message.type !== 'run') return;
  try {
    const outcome = await runSweepTask(workerData.dir, message.index, { retryFailed: workerData.retryFailed, shouldStop: () => stop, manifest });
    parentPort.postMessage({ type: 'done', outcome });
  } catch (e) {
    parentPort.postMessage({ type: 'error', index: message.index, message: e instanceof Error ? e.message : String(e) });
  }
});
parentPort.postMessage({ type: 'ready' });
