import type { Mesh } from './Mesh.ts';
import { meshTopology } from './meshTopology.ts';

/**
 * A vertex order that keeps neighbours close in memory: reverse Cuthill–McKee
 * (Cuthill & McKee 1969; George & Liu, "Computer Solution of Large Sparse
 * Positive Definite Systems", 1981, §4.3): each connected component
 * breadth-first from a pseudo-peripheral vertex (the far end of a
 * breadth-first search, twice), neighbours in order of increasing degree,
 * the whole order reversed. Vertices no triangle uses come last. Returns
 * `order`, order[k] = the vertex that becomes number k.
 */
export function localityOrder(mesh: Mesh): Uint32Array {
  const topo = meshTopology(mesh);
  const n = topo.vertexCount;
  const off = topo.vertexNeighbourOffsets, nb = topo.vertexNeighbours;
  const degree = (v: number) => off[v + 1] - off[v];
  const order = new Uint32Array(n);
  const placed = new Uint8Array(n);
  const level = new Int32Array(n).fill(-1);
  const queue = new Uint32Array(n);
  let count = 0;
  /** breadth-first from `start` over unplaced vertices; returns the last vertex reached (fewest neighbours among the farthest) */
  const farthest = (start: number): number => {
    let head = 0, tail = 0, last = start;
    queue[tail++] = start;
    level[start] = 0;
    const seen: number[] = [start];
    while (head < tail) {
      const v = queue[head++];
      if (level[v] > level[last] || (level[v] === level[last] && degree(v) < degree(last))) last = v;
      for (let p = off[v]; p < off[v + 1]; p++) {
        const w = nb[p];
        if (placed[w] || level[w] >= 0) continue;
        level[w] = level[v] + 1;
        queue[tail++] = w;
        seen.push(w);
      }
    }
    for (const v of seen) level[v] = -1;
    return last;
  };
  const scratch: number[] = [];
  for (let s = 0; s < n; s++) {
    if (placed[s] || degree(s) === 0) continue;
    const start = farthest(farthest(s));
    let head = count;
    order[count++] = start;
    placed[start] = 1;
    while (head < count) {
      const v = order[head++];
      scratch.length = 0;
      for (let p = off[v]; p < off[v + 1]; p++) if (!placed[nb[p]]) scratch.push(nb[p]);
      scratch.sort((a, b) => degree(a) - degree(b) || a - b);
      for (const w of scratch) {
        placed[w] = 1;
        order[count++] = w;
      }
    }
  }
  order.subarray(0, count).reverse();
  for (let v = 0; v < n; v++) if (!placed[v]) order[count++] = v;
  return order;
}

/** The mesh with its vertices renumbered by `order` (order[k] = old vertex of new number k), and the map old → new. */
export function renumberVertices(mesh: Mesh, order: Uint32Array): { mesh: Mesh; vertexMap: Uint32Array } {
  const n = mesh.positions.length / 3;
  const vertexMap = new Uint32Array(n);
  for (let k = 0; k < n; k++) vertexMap[order[k]] = k;
  const positions = new Float64Array(3 * n);
  for (let k = 0; k < n; k++) for (let d = 0; d < 3; d++) positions[3 * k + d] = mesh.positions[3 * order[k] + d];
  const triangles = mesh.triangles.map((v) => vertexMap[v]);
  return { mesh: { positions, triangles }, vertexMap };
}

/** Rows within which a thread's neighbour reads stay near (a cache-sized window of vertices). */
export const LOCALITY_WINDOW = 4096;

/** The fraction of edges joining vertices more than LOCALITY_WINDOW numbers apart: near 0 for a well-ordered mesh, near 1 for a scattered one. */
export function scatteredEdgeFraction(mesh: Mesh): number {
  const tri = mesh.triangles;
  let far = 0;
  for (let t = 0; t < tri.length; t += 3) {
    for (let c = 0; c < 3; c++) if (Math.abs(tri[t + c] - tri[t + ((c + 1) % 3)]) > LOCALITY_WINDOW) far++;
  }
  return tri.length ? far / tri.length : 0;
}
