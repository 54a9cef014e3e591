export type PatchEventKind = 'split' | 'merge' | 'insertion' | 'loss';

export interface PatchEvent {
  kind: PatchEventKind;
  /** patches of the earlier frame involved */
  before: number[];
  /** patches of the later frame involved */
  after: number[];
}

/**
 * How the patches changed between two labellings of the same mesh (label −1:
 * background): a later patch overlapping no earlier one is an insertion, an
 * earlier one overlapping no later one a loss, an earlier patch overlapping
 * several later ones a split, a later one overlapping several earlier ones a merge.
 */
export function patchEvents(before: Int32Array, after: Int32Array): PatchEvent[] {
  const overlaps = new Map<number, Set<number>>(); // earlier → later
  const reverse = new Map<number, Set<number>>();
  let nBefore = 0, nAfter = 0;
  for (let i = 0; i < before.length; i++) {
    nBefore = Math.max(nBefore, before[i] + 1);
    nAfter = Math.max(nAfter, after[i] + 1);
    if (before[i] < 0 || after[i] < 0) continue;
    if (!overlaps.has(before[i])) overlaps.set(before[i], new Set());
    overlaps.get(before[i])!.add(after[i]);
    if (!reverse.has(after[i])) reverse.set(after[i], new Set());
    reverse.get(after[i])!.add(before[i]);
  }
  const events: PatchEvent[] = [];
  for (let b = 0; b < nBefore; b++) {
    const to = overlaps.get(b);
    if (!to) events.push({ kind: 'loss', before: [b], after: [] });
    else if (to.size > 1) events.push({ kind: 'split', before: [b], after: [...to].sort((x, y) => x - y) });
  }
  for (let a = 0; a < nAfter; a++) {
    const from = reverse.get(a);
    if (!from) events.push({ kind: 'insertion', before: [], after: [a] });
    else if (from.size > 1) events.push({ kind: 'merge', before: [...from].sort((x, y) => x - y), after: [a] });
  }
  return events;
}
