/// <reference lib="webworker" />
/**
 * Threads for the simulation worker: a ThreadTeam whose helpers are Web
 * Workers started from a Blob of the team's own helper code. Shared memory
 * needs a cross-origin isolated page (`placode view` serves it with COOP and
 * COEP); elsewhere the run steps on one thread and says why.
 */
import { ThreadTeam, type HelperThread } from '../../solver/integrate/ThreadTeam.ts';
import { threadNote, usefulThreads } from '../../solver/run/runThreads.ts';
import type { ResolvedScenario } from '../../solver/scenario/ResolvedScenario.ts';

function spawnWebHelper(code: string): HelperThread {
  const url = URL.createObjectURL(new Blob([code], { type: 'text/javascript' }));
  const worker = new Worker(url);
  return {
    postMessage: (m) => worker.postMessage(m),
    onMessage: (listener) => {
      worker.onmessage = (e: MessageEvent<{ kind: string; error?: string }>) => {
        URL.revokeObjectURL(url);
        listener(e.data);
      };
      worker.onerror = (e) => listener({ kind: 'error', error: e.message || 'a helper worker failed to start' });
    },
    terminate: () => worker.terminate(),
  };
}

/** Threads the page can share memory between (a cross-origin isolated page). */
export const threadsAvailable = (): boolean => (self as unknown as { crossOriginIsolated?: boolean }).crossOriginIsolated === true && ThreadTeam.available();

/**
 * The team for a scenario (kept while the next scenario wants the same size):
 * its time.threads, or every core but one (the page draws on that one).
 */
export class WorkerThreads {
  private team: ThreadTeam | undefined;

  async teamFor(r: ResolvedScenario): Promise<{ team?: ThreadTeam; used: number; note?: string }> {
    const cores = Math.max(1, navigator.hardwareConcurrency || 1);
    const requested = Math.max(1, r.threads ?? cores - 1);
    const useful = usefulThreads(r, requested);
    if (useful > 1 && !threadsAvailable()) {
      this.release();
      return { used: 1, note: `1 thread: this page is not cross-origin isolated, so threads cannot share memory (open it through placode view, which serves it so)` };
    }
    if (useful !== (this.team?.size ?? 1)) {
      this.release();
      if (useful > 1) {
        try {
          this.team = await ThreadTeam.create(useful, spawnWebHelper);
        } catch (e) {
          return { used: 1, note: `1 thread: helper threads could not start (${(e as Error).message})` };
        }
      }
    }
    const note = useful < requested ? threadNote(requested, useful) : undefined;
    return { team: this.team, used: useful, note };
  }

  release(): void {
    this.team?.dispose();
    this.team = undefined;
  }
}
