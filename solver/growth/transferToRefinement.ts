import type { Refinement } from '../mesh/Refinement.ts';
import { prolongField } from '../mesh/Refinement.ts';

/**
 * Carry a vertex-major state (nS species) onto a midpoint refinement of its
 * surface: linear interpolation at the new edge midpoints (exact for the P1
 * function, so a smooth field is carried with the O(h²) interpolation error),
 * then a constant shift per species so that Σ m u over the refined surface
 * equals Σ m u before — exactly, not only to O(h²), which lumped masses alone
 * would give.
 */
export function transferToRefinement(state: Float64Array, oldMass: Float64Array, refinement: Refinement, newMass: Float64Array, nS: number): Float64Array {
  const carried = prolongField(state, refinement, nS);
  let area = 0;
  for (let i = 0; i < newMass.length; i++) area += newMass[i];
  for (let s = 0; s < nS; s++) {
    let want = 0, have = 0;
    for (let i = 0; i < oldMass.length; i++) want += oldMass[i] * state[i * nS + s];
    for (let i = 0; i < newMass.length; i++) have += newMass[i] * carried[i * nS + s];
    const shift = (want - have) / area;
    for (let i = 0; i < newMass.length; i++) carried[i * nS + s] += shift;
  }
  return carried;
}
