import { makeMesh, type Mesh } from './Mesh.ts';
import { meshTopology } from './meshTopology.ts';
import type { Refinement } from './Refinement.ts';
import { splitTriangles } from './refineMidpoint.ts';

/**
 * One step of Loop subdivision (C. Loop, "Smooth subdivision surfaces based on
 * triangles", MSc thesis, Univ. of Utah, 1987): 1-to-4 split; interior edge points
 * 3/8(a+b) + 1/8(c+d); old interior vertices (1 − nβ)v + βΣ neighbours with
 * β = (1/n)(5/8 − (3/8 + ¼cos(2π/n))²); boundary edges and vertices use the cubic
 * B-spline rules ½(a+b) and ¾v + ⅛(left + right), so open boundaries stay curves.
 * The connectivity (and `parents`) is the same as `refineMidpoint`'s.
 */
export function loopSubdivide(mesh: Mesh): Refinement {
  const topo = meshTopology(mesh);
  const nV = topo.vertexCount;
  const nE = topo.edgeCount;
  const p = mesh.positions;
  const tri = mesh.triangles;
  const positions = new Float64Array(3 * (nV + nE));
  const parents = new Uint32Array(2 * (nV + nE));

  // Sum of the vertices opposite each edge.
  const opp = new Float64Array(3 * nE);
  for (let c = 0; c < tri.length; c++) {
    const e = topo.triangleEdges[c];
    const v = tri[c];
    opp[3 * e] += p[3 * v];
    opp[3 * e + 1] += p[3 * v + 1];
    opp[3 * e + 2] += p[3 * v + 2];
  }
  const boundaryNeighbourSum = new Float64Array(3 * nV);
  const boundaryDegree = new Uint8Array(nV);
  for (let e = 0; e < nE; e++) {
    const a = topo.edges[2 * e], b = topo.edges[2 * e + 1];
    const w = 3 * (nV + e);
    parents[2 * (nV + e)] = a;
    parents[2 * (nV + e) + 1] = b;
    const interior = topo.edgeTriangleCount[e] === 2;
    for (let k = 0; k < 3; k++) {
      positions[w + k] = interior
        ? 0.375 * (p[3 * a + k] + p[3 * b + k]) + 0.125 * opp[3 * e + k]
        : 0.5 * (p[3 * a + k] + p[3 * b + k]);
    }
    if (topo.edgeTriangleCount[e] === 1) {
      boundaryDegree[a]++;
      boundaryDegree[b]++;
      for (let k = 0; k < 3; k++) {
        boundaryNeighbourSum[3 * a + k] += p[3 * b + k];
        boundaryNeighbourSum[3 * b + k] += p[3 * a + k];
      }
    }
  }
  for (let v = 0; v < nV; v++) {
    parents[2 * v] = v;
    parents[2 * v + 1] = v;
    const s = topo.vertexNeighbourOffsets[v], e = topo.vertexNeighbourOffsets[v + 1];
    const n = e - s;
    if (boundaryDegree[v] === 2) {
      for (let k = 0; k < 3; k++) positions[3 * v + k] = 0.75 * p[3 * v + k] + 0.125 * boundaryNeighbourSum[3 * v + k];
    } else if (boundaryDegree[v] > 0 || n === 0) {
      // corner or pinch point of the boundary: keep it where it is
      for (let k = 0; k < 3; k++) positions[3 * v + k] = p[3 * v + k];
    } else {
      const c = 0.375 + 0.25 * Math.cos((2 * Math.PI) / n);
      const beta = (0.625 - c * c) / n;
      let sx = 0, sy = 0, sz = 0;
      for (let i = s; i < e; i++) {
        const u = topo.vertexNeighbours[i];
        sx += p[3 * u]; sy += p[3 * u + 1]; sz += p[3 * u + 2];
      }
      const self = 1 - n * beta;
      positions[3 * v] = self * p[3 * v] + beta * sx;
      positions[3 * v + 1] = self * p[3 * v + 1] + beta * sy;
      positions[3 * v + 2] = self * p[3 * v + 2] + beta * sz;
    }
  }
  return { mesh: makeMesh(positions, splitTriangles(tri, topo.triangleEdges, nV)), parents };
}
