/**
 * The one mesh type of the project: a triangle mesh as two flat typed arrays.
 *
 * Layout:
 * - `positions`: Float64Array of length 3·nV, vertex i at [3i, 3i+1, 3i+2] = (x, y, z).
 * - `triangles`: Uint32Array of length 3·nF, triangle t has corners
 *   [3t, 3t+1, 3t+2] (vertex indices), counter-clockwise seen from outside on an
 *   oriented mesh.
 *
 * Derived connectivity (edges, adjacency, boundary loops, genus …) lives in
 * `meshTopology(mesh)`, computed once per `triangles` array and cached, so a
 * mesh that only moves (new positions, same triangles) shares it.
 */
export interface Mesh {
  readonly positions: Float64Array;
  readonly triangles: Uint32Array;
}

export function vertexCount(mesh: Mesh): number {
  return mesh.positions.length / 3;
}

export function triangleCount(mesh: Mesh): number {
  return mesh.triangles.length / 3;
}

/** Build a mesh from arrays; copies nothing, checks only the array lengths. */
export function makeMesh(positions: Float64Array, triangles: Uint32Array): Mesh {
  if (positions.length % 3 !== 0) {
    throw new Error(`makeMesh: positions length ${positions.length} is not a multiple of 3`);
  }
  if (triangles.length % 3 !== 0) {
    throw new Error(`makeMesh: triangles length ${triangles.length} is not a multiple of 3`);
  }
  return { positions, triangles };
}

/** A mesh with the same connectivity and new positions (a moved or grown surface). */
export function withPositions(mesh: Mesh, positions: Float64Array): Mesh {
  if (positions.length !== mesh.positions.length) {
    throw new Error(
      `withPositions: expected ${mesh.positions.length} coordinates, got ${positions.length}`,
    );
  }
  return { positions, triangles: mesh.triangles };
}
