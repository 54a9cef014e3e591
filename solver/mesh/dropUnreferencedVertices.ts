import { makeMesh, type Mesh } from './Mesh.ts';

/**
 * Remove vertices no triangle uses, keeping the order of the others.
 * `vertexMap[old]` is the new index, or 0xffffffff for a dropped vertex.
 */
export function dropUnreferencedVertices(mesh: Mesh): { mesh: Mesh; vertexMap: Uint32Array; dropped: number } {
  const n = mesh.positions.length / 3;
  const used = new Uint8Array(n);
  for (let c = 0; c < mesh.triangles.length; c++) used[mesh.triangles[c]] = 1;
  const vertexMap = new Uint32Array(n).fill(0xffffffff);
  let next = 0;
  for (let v = 0; v < n; v++) if (used[v]) vertexMap[v] = next++;
  const positions = new Float64Array(3 * next);
  for (let v = 0; v < n; v++) {
    if (!used[v]) continue;
    const w = vertexMap[v];
    positions[3 * w] = mesh.positions[3 * v];
    positions[3 * w + 1] = mesh.positions[3 * v + 1];
    positions[3 * w + 2] = mesh.positions[3 * v + 2];
  }
  const tri = new Uint32Array(mesh.triangles.length);
  for (let c = 0; c < tri.length; c++) tri[c] = vertexMap[mesh.triangles[c]];
  return { mesh: makeMesh(positions, tri), vertexMap, dropped: n - next };
}
