import type { ResolvedScenario } from '../scenario/ResolvedScenario.ts';
import { MIN_BLOCKS_PER_MEMBER } from '../integrate/ThreadTeam.ts';
import { REDUCTION_BLOCK } from '../integrate/wasm/stepperLayout.ts';

/**
 * Threads a run can use of `requested`: each member of a team needs
 * MIN_BLOCKS_PER_MEMBER blocks of rows (on the largest surface a refining run
 * may reach), or it would spend more on meeting the others than on its rows.
 */
export function usefulThreads(r: ResolvedScenario, requested: number): number {
  const largest = r.growth?.refine ? r.growth.refine.maxVertices : r.mesh.positions.length / 3;
  return Math.max(1, Math.min(requested, Math.floor(Math.ceil(largest / REDUCTION_BLOCK) / MIN_BLOCKS_PER_MEMBER)));
}

/** How many threads step the run, and why fewer than asked for. */
export function threadNote(requested: number, used: number): string {
  const threads = `${used} thread${used > 1 ? 's' : ''}`;
  return used < requested ? `${threads} (of ${requested} asked for: a smaller mesh would not gain from more)` : threads;
}
