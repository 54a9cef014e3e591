import type { Mesh } from '../mesh/Mesh.ts';
import type { CsrMatrix } from '../linalg/CsrMatrix.ts';
import { operatorAssembly } from './vertexSparsityPattern.ts';
import { triangleAreas } from '../mesh/triangleAreas.ts';

/**
 * P1 consistent mass matrix M_ij = ∫ φ_i φ_j dA over the flat triangles:
 * per triangle of area A, A/6 on the diagonal and A/12 off it.
 * Contract: nV×nV CSR on the mesh's shared pattern, symmetric positive definite
 * (on a mesh with no unreferenced vertex), 1ᵀM1 = mesh area, scales with the
 * square of a uniform scaling. Pass `out` to reassemble in place.
 */
export function consistentMass(mesh: Mesh, out?: CsrMatrix): CsrMatrix {
  const { matrix, values, edgeSlots: es, diagonalSlots: ds, triangleEdges: te } = operatorAssembly(mesh, out);
  const areas = triangleAreas(mesh);
  const tri = mesh.triangles;
  for (let t = 0; t < areas.length; t++) {
    const area = areas[t];
    const off = area / 12;
    const diag = area / 6;
    for (let k = 0; k < 3; k++) {
      const e = te[3 * t + k];
      values[es[2 * e]] += off;
      values[es[2 * e + 1]] += off;
    }
    values[ds[tri[3 * t]]] += diag;
    values[ds[tri[3 * t + 1]]] += diag;
    values[ds[tri[3 * t + 2]]] += diag;
  }
  return matrix;
}
