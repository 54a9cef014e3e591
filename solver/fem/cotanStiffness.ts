import type { Mesh } from '../mesh/Mesh.ts';
import type { CsrMatrix } from '../linalg/CsrMatrix.ts';
import { operatorAssembly } from './vertexSparsityPattern.ts';

/**
 * P1 stiffness matrix of the Laplace–Beltrami operator (the cotangent formula),
 * K_ij = ∫ ∇φ_i·∇φ_j dA over the flat triangles:
 * K_ij = −½(cot α_ij + cot β_ij) for an edge ij (α, β the angles opposite it),
 * K_ii = −Σ_j K_ij.
 * Contract: nV×nV CSR, symmetric positive semi-definite, K·1 = 0, integrated
 * (not pointwise) quantity, invariant under uniform scaling of the mesh. The
 * discrete Laplace–Beltrami operator is −M⁻¹K. Boundary edges get one cotangent
 * (natural no-flux condition). Pass `out` (a matrix from an earlier call on the
 * same connectivity) to reassemble in place.
 *
 * With `coefficient` (one value per triangle, e.g. a diffusivity D) the result
 * is the stiffness of ∇_Γ·(D∇_Γ u): each triangle's contribution is scaled by
 * its value; it stays symmetric with K·1 = 0, and positive semi-definite for D ≥ 0.
 */
export function cotanStiffness(mesh: Mesh, out?: CsrMatrix, coefficient?: Float64Array): CsrMatrix {
  const { matrix, values, edgeSlots: es, diagonalSlots: ds, triangleEdges: te } = operatorAssembly(mesh, out);
  const p = mesh.positions;
  const tri = mesh.triangles;
  const nF = tri.length / 3;
  for (let t = 0; t < nF; t++) {
    const i0 = tri[3 * t], i1 = tri[3 * t + 1], i2 = tri[3 * t + 2];
    const a = 3 * i0, b = 3 * i1, c = 3 * i2;
    // edge vectors e0 = c−b (opposite corner 0), e1 = a−c, e2 = b−a
    const e0x = p[c] - p[b], e0y = p[c + 1] - p[b + 1], e0z = p[c + 2] - p[b + 2];
    const e1x = p[a] - p[c], e1y = p[a + 1] - p[c + 1], e1z = p[a + 2] - p[c + 2];
    const e2x = p[b] - p[a], e2y = p[b + 1] - p[a + 1], e2z = p[b + 2] - p[a + 2];
    const nx = e2y * e1z - e2z * e1y, ny = e2z * e1x - e2x * e1z, nz = e2x * e1y - e2y * e1x;
    const inv = (coefficient ? 0.5 * coefficient[t] : 0.5) / Math.sqrt(nx * nx + ny * ny + nz * nz); // ½ / (2·area)
    // cot at corner k = −(e_{k+1}·e_{k+2}) / (2·area)
    const w0 = -(e1x * e2x + e1y * e2y + e1z * e2z) * inv;
    const w1 = -(e2x * e0x + e2y * e0y + e2z * e0z) * inv;
    const w2 = -(e0x * e1x + e0y * e1y + e0z * e1z) * inv;
    let e = te[3 * t];
    values[es[2 * e]] -= w0;
    values[es[2 * e + 1]] -= w0;
    e = te[3 * t + 1];
    values[es[2 * e]] -= w1;
    values[es[2 * e + 1]] -= w1;
    e = te[3 * t + 2];
    values[es[2 * e]] -= w2;
    values[es[2 * e + 1]] -= w2;
    values[ds[i0]] += w1 + w2;
    values[ds[i1]] += w2 + w0;
    values[ds[i2]] += w0 + w1;
  }
  return matrix;
}
