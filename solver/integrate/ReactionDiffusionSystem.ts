import type { Mesh } from '../mesh/Mesh.ts';
import type { CompiledKinetics } from '../kinetics/compileKinetics.ts';

/**
 * Everything that defines the continuous problem on one mesh:
 * ∂u_s/∂t = ∇_Γ·(D_s ∇_Γ u_s) + f_s(u, x, t; params).
 * Parameters and diffusion coefficients are constants or per-vertex fields.
 */
export interface ReactionDiffusionSystem {
  readonly mesh: Mesh;
  readonly kinetics: CompiledKinetics;
  /** one per kinetics parameter, in its order */
  readonly parameters: readonly (number | Float64Array)[];
  /** one per species, in its order; a field is per-vertex (nV values) */
  readonly diffusion: readonly (number | Float64Array)[];
}

/**
 * State layout used everywhere in the integrators: one Float64Array of nV·nS
 * values, vertex-major (`state[i·nS + s]`), so a sweep over a CSR row gathers
 * every species of a neighbour from one place.
 */
export function speciesField(state: Float64Array, nS: number, s: number, out?: Float64Array): Float64Array {
  const n = state.length / nS;
  const f = out ?? new Float64Array(n);
  for (let i = 0; i < n; i++) f[i] = state[i * nS + s];
  return f;
}
