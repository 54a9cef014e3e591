import type { Mesh } from '../mesh/Mesh.ts';
import type { CsrMatrix } from '../linalg/CsrMatrix.ts';
import { cotanStiffness } from '../fem/cotanStiffness.ts';

/** Per-triangle mean of a per-vertex field (the P1 coefficient of a triangle). */
export function triangleMeans(triangles: Uint32Array, field: Float64Array): Float64Array {
  const nF = triangles.length / 3;
  const out = new Float64Array(nF);
  for (let t = 0; t < nF; t++) out[t] = (field[triangles[3 * t]] + field[triangles[3 * t + 1]] + field[triangles[3 * t + 2]]) / 3;
  return out;
}

/**
 * The stiffness of ∇_Γ·(D∇_Γu) for a per-vertex diffusivity D (each triangle
 * weighted by its mean D), on the pattern of `like`, with the per-triangle
 * coefficients it used (a moving surface reassembles with them).
 */
export function diffusionStiffness(mesh: Mesh, d: Float64Array, like: CsrMatrix): { matrix: CsrMatrix; triangleD: Float64Array } {
  const triangleD = triangleMeans(mesh.triangles, d);
  return { matrix: cotanStiffness(mesh, { ...like, values: new Float64Array(like.values.length) }, triangleD), triangleD };
}
