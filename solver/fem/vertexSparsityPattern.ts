import type { Mesh } from '../mesh/Mesh.ts';
import { meshTopology, type MeshTopology } from '../mesh/meshTopology.ts';
import type { CsrMatrix } from '../linalg/CsrMatrix.ts';

/**
 * The nV×nV CSR pattern of every P1 operator on a mesh: row i holds i and its edge
 * neighbours, ascending (nnz = nV + 2·nE), with the value slots each assembly
 * scatters into:
 * - `edgeSlots`: Uint32Array(2·nE); for edge e = (a, b), a < b: slot of (a, b) at
 *   2e and of (b, a) at 2e+1.
 * - `diagonalSlots`: Uint32Array(nV), slot of (i, i).
 * Cached per topology, so a moving mesh reassembles into the same arrays.
 */
export interface VertexSparsityPattern {
  readonly size: number;
  readonly rowOffsets: Uint32Array;
  readonly columns: Uint32Array;
  readonly edgeSlots: Uint32Array;
  readonly diagonalSlots: Uint32Array;
}

const cache = new WeakMap<MeshTopology, VertexSparsityPattern>();

export function vertexSparsityPattern(mesh: Mesh): VertexSparsityPattern {
  const topo = meshTopology(mesh);
  const hit = cache.get(topo);
  if (hit) return hit;
  const nV = topo.vertexCount;
  const nbo = topo.vertexNeighbourOffsets;
  const nb = topo.vertexNeighbours;
  const nbe = topo.vertexNeighbourEdges;
  const rowOffsets = new Uint32Array(nV + 1);
  for (let i = 0; i < nV; i++) rowOffsets[i + 1] = rowOffsets[i] + (nbo[i + 1] - nbo[i]) + 1;
  const columns = new Uint32Array(rowOffsets[nV]);
  const edgeSlots = new Uint32Array(2 * topo.edgeCount);
  const diagonalSlots = new Uint32Array(nV);
  for (let i = 0; i < nV; i++) {
    let slot = rowOffsets[i];
    let placedDiag = false;
    for (let s = nbo[i]; s < nbo[i + 1]; s++) {
      const j = nb[s];
      if (!placedDiag && j > i) {
        columns[slot] = i;
        diagonalSlots[i] = slot++;
        placedDiag = true;
      }
      columns[slot] = j;
      // neighbour j > i means this row is the edge's first vertex
      edgeSlots[2 * nbe[s] + (j > i ? 0 : 1)] = slot++;
    }
    if (!placedDiag) {
      columns[slot] = i;
      diagonalSlots[i] = slot;
    }
  }
  const pattern = { size: nV, rowOffsets, columns, edgeSlots, diagonalSlots };
  cache.set(topo, pattern);
  return pattern;
}

/** Where a P1 operator is assembled: the matrix on the shared pattern (`out`'s, zeroed, or a new one) and the slots triangles scatter into. */
export interface OperatorAssembly {
  matrix: CsrMatrix;
  values: Float64Array;
  edgeSlots: Uint32Array;
  diagonalSlots: Uint32Array;
  /** the three edges of each triangle (topology's triangleEdges) */
  triangleEdges: Uint32Array;
}

/** Start assembling an operator on a mesh's shared pattern, into `out` (same connectivity) when given. */
export function operatorAssembly(mesh: Mesh, out?: CsrMatrix): OperatorAssembly {
  const pattern = vertexSparsityPattern(mesh);
  const values = out?.values ?? new Float64Array(pattern.columns.length);
  values.fill(0);
  const n = pattern.size;
  const matrix = out ?? { rows: n, cols: n, rowOffsets: pattern.rowOffsets, columns: pattern.columns, values };
  return { matrix, values, edgeSlots: pattern.edgeSlots, diagonalSlots: pattern.diagonalSlots, triangleEdges: meshTopology(mesh).triangleEdges };
}
