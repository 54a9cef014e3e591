import type { Mesh } from './Mesh.ts';
import { meshTopology } from './meshTopology.ts';

export interface EdgeLengthStats {
  min: number;
  mean: number;
  max: number;
}

/** Minimum, mean and maximum length over the mesh's undirected edges. */
export function edgeLengthStats(mesh: Mesh): EdgeLengthStats {
  const { edges, edgeCount } = meshTopology(mesh);
  const p = mesh.positions;
  let min = Infinity, max = 0, sum = 0;
  for (let e = 0; e < edgeCount; e++) {
    const a = 3 * edges[2 * e], b = 3 * edges[2 * e + 1];
    const dx = p[b] - p[a], dy = p[b + 1] - p[a + 1], dz = p[b + 2] - p[a + 2];
    const l = Math.sqrt(dx * dx + dy * dy + dz * dz);
    if (l < min) min = l;
    if (l > max) max = l;
    sum += l;
  }
  if (edgeCount === 0) return { min: 0, mean: 0, max: 0 };
  return { min, mean: sum / edgeCount, max };
}
