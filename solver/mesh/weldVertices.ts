import { makeMesh, type Mesh } from './Mesh.ts';

export interface DuplicateGroups {
  /** For each vertex, the lowest-indexed vertex within tolerance of it (itself if none). */
  representative: Uint32Array;
  /** Number of vertices that are not their own representative. */
  duplicateCount: number;
  /** Number of groups with more than one vertex. */
  groupCount: number;
}

/**
 * Group vertices closer than `tolerance` (0: identical coordinates). Sorts along
 * the axis of largest extent and sweeps, so it is O(n log n) for typical meshes.
 */
export function duplicateVertexGroups(positions: Float64Array, tolerance: number): DuplicateGroups {
  const n = positions.length / 3;
  let axis = 0;
  {
    let best = -1;
    for (let a = 0; a < 3; a++) {
      let lo = Infinity, hi = -Infinity;
      for (let v = 0; v < n; v++) {
        const x = positions[3 * v + a];
        if (x < lo) lo = x;
        if (x > hi) hi = x;
      }
      if (hi - lo > best) { best = hi - lo; axis = a; }
    }
  }
  const order = new Uint32Array(n);
  for (let v = 0; v < n; v++) order[v] = v;
  const key = new Float64Array(n);
  for (let v = 0; v < n; v++) key[v] = positions[3 * v + axis];
  order.sort((a, b) => key[a] - key[b] || a - b);
  const parent = new Uint32Array(n);
  for (let v = 0; v < n; v++) parent[v] = v;
  const find = (x: number): number => {
    while (parent[x] !== x) x = parent[x] = parent[parent[x]];
    return x;
  };
  const tol2 = tolerance * tolerance;
  for (let i = 0; i < n; i++) {
    const a = order[i];
    for (let j = i + 1; j < n; j++) {
      const b = order[j];
      if (key[b] - key[a] > tolerance) break;
      const dx = positions[3 * a] - positions[3 * b];
      const dy = positions[3 * a + 1] - positions[3 * b + 1];
      const dz = positions[3 * a + 2] - positions[3 * b + 2];
      if (dx * dx + dy * dy + dz * dz <= tol2) {
        const ra = find(a), rb = find(b);
        if (ra !== rb) {
          if (ra < rb) parent[rb] = ra;
          else parent[ra] = rb;
        }
      }
    }
  }
  const representative = new Uint32Array(n);
  let duplicateCount = 0;
  const groupSeen = new Uint8Array(n);
  let groupCount = 0;
  for (let v = 0; v < n; v++) {
    const r = find(v);
    representative[v] = r;
    if (r !== v) {
      duplicateCount++;
      if (!groupSeen[r]) { groupSeen[r] = 1; groupCount++; }
    }
  }
  return { representative, duplicateCount, groupCount };
}

export interface WeldResult {
  mesh: Mesh;
  /** old vertex index → new vertex index */
  vertexMap: Uint32Array;
  mergedVertices: number;
  /** triangles removed because welding collapsed two of their corners */
  removedTriangles: number;
}

/**
 * Merge vertices within `tolerance` (default 0: identical coordinates) into the
 * lowest-indexed one, keeping vertex order otherwise; triangles that collapse
 * are removed.
 */
export function weldVertices(mesh: Mesh, tolerance = 0): WeldResult {
  const n = mesh.positions.length / 3;
  const { representative, duplicateCount } = duplicateVertexGroups(mesh.positions, tolerance);
  const vertexMap = new Uint32Array(n);
  let next = 0;
  for (let v = 0; v < n; v++) {
    if (representative[v] === v) vertexMap[v] = next++;
  }
  for (let v = 0; v < n; v++) vertexMap[v] = vertexMap[representative[v]];
  const positions = new Float64Array(3 * next);
  for (let v = 0; v < n; v++) {
    if (representative[v] !== v) continue;
    const w = vertexMap[v];
    positions[3 * w] = mesh.positions[3 * v];
    positions[3 * w + 1] = mesh.positions[3 * v + 1];
    positions[3 * w + 2] = mesh.positions[3 * v + 2];
  }
  const src = mesh.triangles;
  const tri = new Uint32Array(src.length);
  let m = 0;
  for (let t = 0; t < src.length; t += 3) {
    const a = vertexMap[src[t]], b = vertexMap[src[t + 1]], c = vertexMap[src[t + 2]];
    if (a === b || b === c || c === a) continue;
    tri[m++] = a; tri[m++] = b; tri[m++] = c;
  }
  return {
    mesh: makeMesh(positions, tri.slice(0, m)),
    vertexMap,
    mergedVertices: duplicateCount,
    removedTriangles: (src.length - m) / 3,
  };
}
