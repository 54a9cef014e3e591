import type { Mesh } from '../mesh/Mesh.ts';
import { meshTopology } from '../mesh/meshTopology.ts';
import type { CsrMatrix } from '../linalg/CsrMatrix.ts';
import { vertexSparsityPattern } from './vertexSparsityPattern.ts';

/**
 * P1 consistent mass matrix M_ij = ∫ φ_i φ_j dA over the flat triangles:
 * per triangle of area A, A/6 on the diagonal and A/12 off it.
 * Contract: nV×nV CSR on the mesh's shared pattern, symmetric positive definite
 * (on a mesh with no unreferenced vertex), 1ᵀM1 = mesh area, scales with the
 * square of a uniform scaling. Pass `out` to reassemble in place.
 */
export function consistentMass(mesh: Mesh, out?: CsrMatrix): CsrMatrix {
  const pattern = vertexSparsityPattern(mesh);
  const topo = meshTopology(mesh);
  const values = out?.values ?? new Float64Array(pattern.columns.length);
  values.fill(0);
  const p = mesh.positions;
  const tri = mesh.triangles;
  const te = topo.triangleEdges;
  const es = pattern.edgeSlots;
  const ds = pattern.diagonalSlots;
  const nF = tri.length / 3;
  for (let t = 0; t < nF; t++) {
    const i0 = tri[3 * t], i1 = tri[3 * t + 1], i2 = tri[3 * t + 2];
    const a = 3 * i0, b = 3 * i1, c = 3 * i2;
    const ux = p[b] - p[a], uy = p[b + 1] - p[a + 1], uz = p[b + 2] - p[a + 2];
    const vx = p[c] - p[a], vy = p[c + 1] - p[a + 1], vz = p[c + 2] - p[a + 2];
    const cx = uy * vz - uz * vy, cy = uz * vx - ux * vz, cz = ux * vy - uy * vx;
    const area = 0.5 * Math.sqrt(cx * cx + cy * cy + cz * cz);
    const off = area / 12;
    const diag = area / 6;
    for (let k = 0; k < 3; k++) {
      const e = te[3 * t + k];
      values[es[2 * e]] += off;
      values[es[2 * e + 1]] += off;
    }
    values[ds[i0]] += diag;
    values[ds[i1]] += diag;
    values[ds[i2]] += diag;
  }
  if (out) return out;
  const n = pattern.size;
  return { rows: n, cols: n, rowOffsets: pattern.rowOffsets, columns: pattern.columns, values };
}
