import { makeMesh, type Mesh } from './Mesh.ts';
import { meshTopology } from './meshTopology.ts';
import type { Refinement } from './Refinement.ts';

/**
 * Uniform 1-to-4 refinement: a new vertex at every edge midpoint (index nV + edge),
 * each triangle split into four with the parent's orientation. Geometry is not
 * smoothed (see `loopSubdivide` for that; see `projectOnto…` in the shapes for
 * refining onto an exact surface).
 */
export function refineMidpoint(mesh: Mesh): Refinement {
  const topo = meshTopology(mesh);
  const nV = topo.vertexCount;
  const nE = topo.edgeCount;
  const p = mesh.positions;
  const positions = new Float64Array(3 * (nV + nE));
  positions.set(p);
  const parents = new Uint32Array(2 * (nV + nE));
  for (let v = 0; v < nV; v++) {
    parents[2 * v] = v;
    parents[2 * v + 1] = v;
  }
  for (let e = 0; e < nE; e++) {
    const a = topo.edges[2 * e], b = topo.edges[2 * e + 1];
    const w = 3 * (nV + e);
    positions[w] = 0.5 * (p[3 * a] + p[3 * b]);
    positions[w + 1] = 0.5 * (p[3 * a + 1] + p[3 * b + 1]);
    positions[w + 2] = 0.5 * (p[3 * a + 2] + p[3 * b + 2]);
    parents[2 * (nV + e)] = a;
    parents[2 * (nV + e) + 1] = b;
  }
  return { mesh: makeMesh(positions, splitTriangles(mesh.triangles, topo.triangleEdges, nV)), parents };
}

/** The 4·nF triangles of a 1-to-4 split, with edge e's new vertex at nV + e. */
export function splitTriangles(tri: Uint32Array, triangleEdges: Uint32Array, nV: number): Uint32Array {
  const nF = tri.length / 3;
  const out = new Uint32Array(12 * nF);
  for (let t = 0; t < nF; t++) {
    const a = tri[3 * t], b = tri[3 * t + 1], c = tri[3 * t + 2];
    const mbc = nV + triangleEdges[3 * t];
    const mca = nV + triangleEdges[3 * t + 1];
    const mab = nV + triangleEdges[3 * t + 2];
    const o = 12 * t;
    out[o] = a; out[o + 1] = mab; out[o + 2] = mca;
    out[o + 3] = mab; out[o + 4] = b; out[o + 5] = mbc;
    out[o + 6] = mca; out[o + 7] = mbc; out[o + 8] = c;
    out[o + 9] = mbc; out[o + 10] = mca; out[o + 11] = mab;
  }
  return out;
}
