import type { Mesh } from './Mesh.ts';

/**
 * A refined mesh with the map that carries vertex fields across.
 * `parents` is Uint32Array(2·nV_new): new vertex i lies between old vertices
 * parents[2i] and parents[2i+1] (equal for a vertex that existed before), so a
 * P1 field is carried across by averaging its two parents (`prolongField`).
 */
export interface Refinement {
  mesh: Mesh;
  parents: Uint32Array;
}

/**
 * Carry a per-vertex field (`components` values per vertex, interleaved) from the
 * coarse mesh onto a refinement: exact for the P1 interpolant on a midpoint split.
 */
export function prolongField(
  field: Float64Array,
  refinement: Refinement,
  components = 1,
  out?: Float64Array,
): Float64Array {
  const { parents } = refinement;
  const n = parents.length / 2;
  const result = out ?? new Float64Array(n * components);
  for (let i = 0; i < n; i++) {
    const a = parents[2 * i] * components;
    const b = parents[2 * i + 1] * components;
    for (let c = 0; c < components; c++) result[i * components + c] = 0.5 * (field[a + c] + field[b + c]);
  }
  return result;
}
