import type { Mesh } from '../../mesh/Mesh.ts';
import type { CsrMatrix } from '../../linalg/CsrMatrix.ts';
import type { EllPattern } from '../../linalg/EllMatrix.ts';
import { CORNER_STRIDE } from './stepperLayout.ts';

/**
 * The corner table the geometry kernel reassembles a moving surface from: for
 * each vertex i (rows in order), one entry per triangle around it (triangles
 * in order), holding the triangle's other two vertices j, k in its own
 * orientation (byte offsets of their positions, 24·j), the byte offsets of the
 * weights of ij and ik in row i's slots (8·slot in the ELL block, or
 * 8·(n·width + o) for overflow entry o), and the triangle (8·t, for per-triangle
 * coefficients). `offsets` (n + 1) and `corners` (CORNER_STRIDE per corner,
 * three corners per triangle) are filled in place.
 */
export function fillGeometryCorners(mesh: Mesh, pattern: EllPattern, like: CsrMatrix, offsets: Int32Array, corners: Int32Array): void {
  const tri = mesh.triangles, n = pattern.rows, nF = tri.length / 3;
  const { rowOffsets: ro, columns: ci } = like;
  offsets.fill(0);
  for (let q = 0; q < tri.length; q++) offsets[tri[q] + 1]++;
  for (let i = 0; i < n; i++) offsets[i + 1] += offsets[i];
  const next = offsets.slice(0, n);
  /** byte offset of the weight of column j in row i */
  const slot = (i: number, j: number): number => {
    for (let p = ro[i]; p < ro[i + 1]; p++) {
      if (ci[p] !== j) continue;
      const at = pattern.slotMap[p];
      return 8 * (at >= 0 ? at : n * pattern.width + (-1 - at));
    }
    throw new Error(`geometry corners: edge ${i}–${j} is not in the stiffness pattern`);
  };
  for (let t = 0; t < nF; t++) {
    for (let c = 0; c < 3; c++) {
      const i = tri[3 * t + c], j = tri[3 * t + ((c + 1) % 3)], k = tri[3 * t + ((c + 2) % 3)];
      const e = CORNER_STRIDE * next[i]++;
      corners[e] = 24 * j;
      corners[e + 1] = 24 * k;
      corners[e + 2] = slot(i, j);
      corners[e + 3] = slot(i, k);
      corners[e + 4] = 8 * t;
    }
  }
}
