import { makeMesh, type Mesh } from './Mesh.ts';
import { meshTopology } from './meshTopology.ts';
import { propagateOrientation } from './validateMesh.ts';

export interface OrientResult {
  mesh: Mesh;
  /** triangles whose corner order was reversed */
  flipped: number;
  /** false when no consistent orientation exists (e.g. a Möbius band) */
  orientable: boolean;
}

/**
 * Make neighbouring triangles agree in orientation, then turn every closed
 * component outward (positive enclosed signed volume).
 */
export function orientTriangles(mesh: Mesh): OrientResult {
  const { flip, orientable } = propagateOrientation(mesh);
  const tri = mesh.triangles.slice();
  const nF = tri.length / 3;
  for (let t = 0; t < nF; t++) {
    if (flip[t]) {
      const b = tri[3 * t + 1];
      tri[3 * t + 1] = tri[3 * t + 2];
      tri[3 * t + 2] = b;
    }
  }
  let out = makeMesh(mesh.positions, tri);
  // Outward: closed components with negative signed volume are reversed.
  const topo = meshTopology(out);
  const vol = new Float64Array(topo.componentCount);
  const open = new Uint8Array(topo.componentCount);
  for (const loop of topo.boundaryLoops) open[topo.vertexComponent[loop[0]]] = 1;
  const p = mesh.positions;
  for (let t = 0; t < nF; t++) {
    const a = 3 * tri[3 * t], b = 3 * tri[3 * t + 1], c = 3 * tri[3 * t + 2];
    vol[topo.vertexComponent[tri[3 * t]]] +=
      p[a] * (p[b + 1] * p[c + 2] - p[b + 2] * p[c + 1]) -
      p[a + 1] * (p[b] * p[c + 2] - p[b + 2] * p[c]) +
      p[a + 2] * (p[b] * p[c + 1] - p[b + 1] * p[c]);
  }
  let flipped = 0;
  for (let t = 0; t < nF; t++) {
    const comp = topo.vertexComponent[tri[3 * t]];
    const reverse = orientable && !open[comp] && vol[comp] < 0;
    if (reverse) {
      const b = tri[3 * t + 1];
      tri[3 * t + 1] = tri[3 * t + 2];
      tri[3 * t + 2] = b;
    }
    if ((reverse ? 1 : 0) !== flip[t]) flipped++;
  }
  out = makeMesh(mesh.positions, tri);
  return { mesh: out, flipped, orientable };
}
