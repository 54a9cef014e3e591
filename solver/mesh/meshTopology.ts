import type { Mesh } from './Mesh.ts';

/**
 * Connectivity derived from a mesh's triangles, computed once and cached per
 * `triangles` array (and vertex count): moving vertices never invalidates it.
 *
 * Layout (nV vertices, nF triangles, nE undirected edges):
 * - `edges`: Uint32Array(2·nE), edge e = (edges[2e], edges[2e+1]) with the first
 *   index smaller; edges are sorted by (first, second).
 * - `triangleEdges`: Uint32Array(3·nF); entry 3t+k is the edge opposite corner k,
 *   i.e. between corners (k+1)%3 and (k+2)%3 of triangle t.
 * - `edgeTriangleCount`: Uint32Array(nE): 1 on the boundary, 2 inside, >2 non-manifold.
 * - `edgeTriangles`: Int32Array(2·nE): the first two triangles on each edge, −1 if none.
 * - `vertexTriangleOffsets`/`vertexTriangles`: CSR list of triangles around each vertex.
 * - `vertexNeighbourOffsets`/`vertexNeighbours`/`vertexNeighbourEdges`: CSR list of
 *   the vertices joined to each vertex by an edge, ascending, with that edge's index.
 * - `boundaryLoops`: each open boundary as a closed vertex sequence (first ≠ last).
 * - `vertexComponent`: Int32Array(nV) component label, −1 for a vertex no triangle uses.
 */
export interface MeshTopology {
  readonly vertexCount: number;
  readonly triangleCount: number;
  readonly edgeCount: number;
  readonly edges: Uint32Array;
  readonly triangleEdges: Uint32Array;
  readonly edgeTriangleCount: Uint32Array;
  readonly edgeTriangles: Int32Array;
  readonly vertexTriangleOffsets: Uint32Array;
  readonly vertexTriangles: Uint32Array;
  readonly vertexNeighbourOffsets: Uint32Array;
  readonly vertexNeighbours: Uint32Array;
  readonly vertexNeighbourEdges: Uint32Array;
  readonly boundaryEdgeCount: number;
  readonly nonManifoldEdgeCount: number;
  readonly boundaryLoops: Uint32Array[];
  readonly vertexComponent: Int32Array;
  readonly componentCount: number;
  readonly referencedVertexCount: number;
  /** V − E + F over referenced vertices. */
  readonly eulerCharacteristic: number;
  /** Sum over components of (2 − χ − b)/2; meaningful for orientable manifolds. */
  /** total genus (handles) over the components; NaN when a component is not an orientable manifold surface */
  readonly genus: number;
  /** genus of each component (NaN where it has none) */
  readonly componentGenus: readonly number[];
}

const cache = new WeakMap<Uint32Array, MeshTopology>();

/** The cached topology of `mesh` (see `MeshTopology` for the layout). */
/**
 * Drop the cached topology (and with it the cached sparsity pattern) of a
 * connectivity, to free their memory once the operators are built; the next
 * `meshTopology` call rebuilds them.
 */
export function forgetMeshTopology(mesh: Mesh): void {
  cache.delete(mesh.triangles);
}

export function meshTopology(mesh: Mesh): MeshTopology {
  const nV = mesh.positions.length / 3;
  const hit = cache.get(mesh.triangles);
  if (hit !== undefined && hit.vertexCount === nV) return hit;
  const topo = buildTopology(mesh.triangles, nV);
  cache.set(mesh.triangles, topo);
  return topo;
}

function buildTopology(tri: Uint32Array, nV: number): MeshTopology {
  const nF = tri.length / 3;
  const nC = 3 * nF;
  for (let c = 0; c < nC; c++) {
    if (tri[c] >= nV) {
      throw new Error(
        `meshTopology: triangle ${Math.floor(c / 3)} uses vertex ${tri[c]}, but the mesh has ${nV} vertices`,
      );
    }
  }
  // Bucket every corner's opposite edge under its smaller vertex.
  const start = new Uint32Array(nV + 1);
  for (let c = 0; c < nC; c++) {
    const t3 = c - (c % 3);
    const k = c % 3;
    const u = tri[t3 + ((k + 1) % 3)];
    const v = tri[t3 + ((k + 2) % 3)];
    start[(u < v ? u : v) + 1]++;
  }
  for (let i = 0; i < nV; i++) start[i + 1] += start[i];
  const fill = start.slice(0, nV);
  const bucketOther = new Uint32Array(nC);
  const bucketCorner = new Uint32Array(nC);
  for (let c = 0; c < nC; c++) {
    const t3 = c - (c % 3);
    const k = c % 3;
    const u = tri[t3 + ((k + 1) % 3)];
    const v = tri[t3 + ((k + 2) % 3)];
    const a = u < v ? u : v;
    const slot = fill[a]++;
    bucketOther[slot] = u < v ? v : u;
    bucketCorner[slot] = c;
  }
  const triangleEdges = new Uint32Array(nC);
  const edgesTmp = new Uint32Array(2 * nC);
  const countTmp = new Uint32Array(nC);
  let nE = 0;
  for (let a = 0; a < nV; a++) {
    const s = start[a];
    const e = start[a + 1];
    // insertion sort of the (small) bucket by the other vertex
    for (let i = s + 1; i < e; i++) {
      const b = bucketOther[i];
      const c = bucketCorner[i];
      let j = i - 1;
      while (j >= s && bucketOther[j] > b) {
        bucketOther[j + 1] = bucketOther[j];
        bucketCorner[j + 1] = bucketCorner[j];
        j--;
      }
      bucketOther[j + 1] = b;
      bucketCorner[j + 1] = c;
    }
    let prev = -1;
    for (let i = s; i < e; i++) {
      const b = bucketOther[i];
      if (b !== prev) {
        edgesTmp[2 * nE] = a;
        edgesTmp[2 * nE + 1] = b;
        nE++;
        prev = b;
      }
      triangleEdges[bucketCorner[i]] = nE - 1;
      countTmp[nE - 1]++;
    }
  }
  const edges = edgesTmp.slice(0, 2 * nE);
  const edgeTriangleCount = countTmp.slice(0, nE);
  const edgeTriangles = new Int32Array(2 * nE).fill(-1);
  for (let c = 0; c < nC; c++) {
    const e = triangleEdges[c];
    const t = (c / 3) | 0;
    if (edgeTriangles[2 * e] < 0) edgeTriangles[2 * e] = t;
    else if (edgeTriangles[2 * e + 1] < 0) edgeTriangles[2 * e + 1] = t;
  }
  let boundaryEdgeCount = 0;
  let nonManifoldEdgeCount = 0;
  for (let e = 0; e < nE; e++) {
    if (edgeTriangleCount[e] === 1) boundaryEdgeCount++;
    else if (edgeTriangleCount[e] > 2) nonManifoldEdgeCount++;
  }

  // Vertex → triangles.
  const vertexTriangleOffsets = new Uint32Array(nV + 1);
  for (let c = 0; c < nC; c++) vertexTriangleOffsets[tri[c] + 1]++;
  for (let i = 0; i < nV; i++) vertexTriangleOffsets[i + 1] += vertexTriangleOffsets[i];
  const vertexTriangles = new Uint32Array(nC);
  {
    const f = vertexTriangleOffsets.slice(0, nV);
    for (let c = 0; c < nC; c++) vertexTriangles[f[tri[c]]++] = (c / 3) | 0;
  }

  // Vertex → neighbours, ascending (edges are sorted, so filling in edge order sorts).
  const vertexNeighbourOffsets = new Uint32Array(nV + 1);
  for (let e = 0; e < nE; e++) {
    vertexNeighbourOffsets[edges[2 * e] + 1]++;
    vertexNeighbourOffsets[edges[2 * e + 1] + 1]++;
  }
  for (let i = 0; i < nV; i++) vertexNeighbourOffsets[i + 1] += vertexNeighbourOffsets[i];
  const vertexNeighbours = new Uint32Array(2 * nE);
  const vertexNeighbourEdges = new Uint32Array(2 * nE);
  {
    const f = vertexNeighbourOffsets.slice(0, nV);
    for (let e = 0; e < nE; e++) {
      const a = edges[2 * e];
      const b = edges[2 * e + 1];
      let s = f[a]++;
      vertexNeighbours[s] = b;
      vertexNeighbourEdges[s] = e;
      s = f[b]++;
      vertexNeighbours[s] = a;
      vertexNeighbourEdges[s] = e;
    }
  }

  // Components by union–find over edges.
  const parent = new Int32Array(nV);
  for (let i = 0; i < nV; i++) parent[i] = i;
  const find = (x: number): number => {
    while (parent[x] !== x) {
      parent[x] = parent[parent[x]];
      x = parent[x];
    }
    return x;
  };
  for (let e = 0; e < nE; e++) {
    const ra = find(edges[2 * e]);
    const rb = find(edges[2 * e + 1]);
    if (ra !== rb) parent[ra < rb ? rb : ra] = ra < rb ? ra : rb;
  }
  const vertexComponent = new Int32Array(nV).fill(-1);
  const label = new Int32Array(nV).fill(-1);
  let componentCount = 0;
  let referencedVertexCount = 0;
  for (let v = 0; v < nV; v++) {
    if (vertexTriangleOffsets[v + 1] === vertexTriangleOffsets[v]) continue;
    referencedVertexCount++;
    const r = find(v);
    if (label[r] < 0) label[r] = componentCount++;
    vertexComponent[v] = label[r];
  }

  const boundaryLoops = traceBoundaryLoops(edges, edgeTriangleCount, vertexNeighbourOffsets, vertexNeighbours, vertexNeighbourEdges);

  // Per-component Euler characteristic and boundary count → genus.
  const chi = new Int32Array(componentCount);
  const loops = new Int32Array(componentCount);
  for (let v = 0; v < nV; v++) if (vertexComponent[v] >= 0) chi[vertexComponent[v]]++;
  for (let e = 0; e < nE; e++) chi[vertexComponent[edges[2 * e]]]--;
  for (let t = 0; t < nF; t++) chi[vertexComponent[tri[3 * t]]]++;
  for (const loop of boundaryLoops) loops[vertexComponent[loop[0]]]++;
  // a component's genus is (2 − χ − b)/2: a whole number ≥ 0 for an orientable manifold; otherwise (a
  // non-manifold or non-orientable component) it has none, and neither has the whole mesh
  const componentGenus: number[] = [];
  let eulerCharacteristic = 0;
  for (let c = 0; c < componentCount; c++) {
    const g = (2 - chi[c] - loops[c]) / 2;
    componentGenus.push(Number.isInteger(g) && g >= 0 && nonManifoldEdgeCount === 0 ? g : NaN);
    eulerCharacteristic += chi[c];
  }
  const genus = componentGenus.reduce((a, g) => a + g, 0);

  return {
    vertexCount: nV,
    triangleCount: nF,
    edgeCount: nE,
    edges,
    triangleEdges,
    edgeTriangleCount,
    edgeTriangles,
    vertexTriangleOffsets,
    vertexTriangles,
    vertexNeighbourOffsets,
    vertexNeighbours,
    vertexNeighbourEdges,
    boundaryEdgeCount,
    nonManifoldEdgeCount,
    boundaryLoops,
    vertexComponent,
    componentCount,
    referencedVertexCount,
    eulerCharacteristic,
    genus,
    componentGenus,
  };
}

/** Walk the boundary edges (one incident triangle) into closed vertex loops. */
function traceBoundaryLoops(
  edges: Uint32Array,
  edgeTriangleCount: Uint32Array,
  nbOffsets: Uint32Array,
  nb: Uint32Array,
  nbEdges: Uint32Array,
): Uint32Array[] {
  const nE = edgeTriangleCount.length;
  const used = new Uint8Array(nE);
  const loops: Uint32Array[] = [];
  const loop: number[] = [];
  for (let e0 = 0; e0 < nE; e0++) {
    if (edgeTriangleCount[e0] !== 1 || used[e0]) continue;
    loop.length = 0;
    used[e0] = 1;
    const first = edges[2 * e0];
    let cur = edges[2 * e0 + 1];
    loop.push(first);
    while (cur !== first) {
      loop.push(cur);
      let next = -1;
      for (let s = nbOffsets[cur]; s < nbOffsets[cur + 1]; s++) {
        const e = nbEdges[s];
        if (edgeTriangleCount[e] === 1 && !used[e]) {
          used[e] = 1;
          next = nb[s];
          break;
        }
      }
      if (next < 0) break; // open chain at a non-manifold spot: keep what was walked
      cur = next;
    }
    loops.push(Uint32Array.from(loop));
  }
  return loops;
}
