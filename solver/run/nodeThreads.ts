import { Worker } from 'node:worker_threads';
import { availableParallelism } from 'node:os';
import { ThreadTeam, type HelperThread } from '../integrate/ThreadTeam.ts';

/** A team helper as a Node worker thread running the helper's code; it does not keep the process alive. */
function spawnNodeHelper(code: string): HelperThread {
  const worker = new Worker(code, { eval: true });
  worker.unref();
  return {
    postMessage: (m) => worker.postMessage(m),
    onMessage: (listener) => {
      worker.on('message', listener);
      worker.on('error', (e) => listener({ kind: 'error', error: e.message }));
    },
    terminate: () => void worker.terminate(),
  };
}

/** The machine's cores: the default number of threads of a run. */
export const machineThreads = (): number => availableParallelism();

/** A team of `threads` members in Node (undefined for one thread: the run needs no helpers). */
export async function nodeThreadTeam(threads: number, minBlocksPerMember?: number): Promise<ThreadTeam | undefined> {
  return threads > 1 ? ThreadTeam.create(threads, spawnNodeHelper, minBlocksPerMember) : undefined;
}
