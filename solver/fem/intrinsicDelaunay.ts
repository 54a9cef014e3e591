import type { Mesh } from '../mesh/Mesh.ts';
import type { CsrMatrix } from '../linalg/CsrMatrix.ts';
import { areaFromSides } from '../mesh/triangleAreas.ts';

/**
 * An intrinsic triangulation of a mesh's surface: the same vertices, triangles
 * given by their corners and their edge lengths only (the metric of the input
 * mesh), as edge flips leave them.
 */
export interface IntrinsicTriangulation {
  /** corners of each intrinsic triangle (three per triangle; an edge may join a vertex pair twice) */
  corners: Uint32Array;
  /** length of the edge from corner h to the next corner of its triangle, per corner */
  lengths: Float64Array;
  /** edges flipped to reach the Delaunay condition */
  flips: number;
}

/**
 * The intrinsic Delaunay triangulation of a mesh (Bobenko & Springborn 2007):
 * every interior edge whose opposite angles sum to more than π (cot α + cot β
 * < 0) is flipped, its new length found by laying its two triangles out in the
 * plane, until none is left. The surface's metric is untouched — vertices stay
 * where they are, the area is the same — only which points are joined changes
 * (Fisher, Springborn, Schröder & Bobenko 2007; Sharp, Soliman & Crane 2019).
 * Boundary edges are never flipped.
 */
export function intrinsicDelaunay(mesh: Mesh): IntrinsicTriangulation {
  const tri = mesh.triangles, p = mesh.positions;
  const nH = tri.length, n = p.length / 3;
  const V = Uint32Array.from(tri);
  const L = new Float64Array(nH);
  const twin = new Int32Array(nH).fill(-1);
  const next = (h: number) => (h % 3 === 2 ? h - 2 : h + 1);
  const prev = (h: number) => (h % 3 === 0 ? h + 2 : h - 1);
  const open = new Map<number, number>();
  for (let h = 0; h < nH; h++) {
    const a = V[h], b = V[next(h)];
    L[h] = Math.hypot(p[3 * a] - p[3 * b], p[3 * a + 1] - p[3 * b + 1], p[3 * a + 2] - p[3 * b + 2]);
    const back = open.get(b * n + a);
    if (back !== undefined) {
      twin[h] = back;
      twin[back] = h;
      open.delete(b * n + a);
    } else open.set(a * n + b, h);
  }
  // cot of the angle opposite halfedge h in its triangle, ×4·area (sign is what matters for Delaunay)
  const cotOpposite = (h: number) => {
    const a = L[h], b = L[next(h)], c = L[prev(h)];
    const area = areaFromSides(a, b, c);
    return area > 0 ? (b * b + c * c - a * a) / (4 * area) : -Infinity;
  };
  const queued = new Uint8Array(nH);
  const stack: number[] = [];
  const push = (h: number) => {
    const t = twin[h];
    if (t < 0) return;
    const e = Math.min(h, t);
    if (!queued[e]) { queued[e] = 1; stack.push(e); }
  };
  for (let h = 0; h < nH; h++) push(h);
  let flips = 0;
  const cap = 50 * nH; // the flip algorithm terminates (Bobenko & Springborn); a guard against round-off cycling
  while (stack.length && flips < cap) {
    const h = stack.pop()!;
    queued[h] = 0;
    const t = twin[h];
    if (t < 0 || cotOpposite(h) + cotOpposite(t) >= -1e-12) continue;
    const h1 = next(h), h2 = prev(h), t1 = next(t), t2 = prev(t);
    const i = V[h], j = V[h1], k = V[h2], l = V[t2];
    if (k === l) continue;
    const lij = L[h], ljk = L[h1], lki = L[h2], lil = L[t1], llj = L[t2];
    // lay out i at the origin, j on the x axis, k above and l below it
    const kx = (lij * lij + lki * lki - ljk * ljk) / (2 * lij), ky = Math.sqrt(Math.max(0, lki * lki - kx * kx));
    const lx = (lij * lij + lil * lil - llj * llj) / (2 * lij), ly = -Math.sqrt(Math.max(0, lil * lil - lx * lx));
    const lkl = Math.hypot(kx - lx, ky - ly);
    const [tw1, tw2, tt1, tt2] = [twin[h1], twin[h2], twin[t1], twin[t2]];
    // triangle of h becomes (k, l, j): h = k→l, h1 = l→j (was t2), h2 = j→k (was h1)
    V[h] = k; L[h] = lkl;
    V[h1] = l; L[h1] = llj; twin[h1] = tt2;
    V[h2] = j; L[h2] = ljk; twin[h2] = tw1;
    // triangle of t becomes (l, k, i): t = l→k, t1 = k→i (was h2), t2 = i→l (was t1)
    V[t] = l; L[t] = lkl;
    V[t1] = k; L[t1] = lki; twin[t1] = tw2;
    V[t2] = i; L[t2] = lil; twin[t2] = tt1;
    twin[h] = t; twin[t] = h;
    for (const g of [h1, h2, t1, t2]) if (twin[g] >= 0) twin[twin[g]] = g;
    flips++;
    for (const g of [h1, h2, t1, t2]) push(g);
  }
  return { corners: V, lengths: L, flips };
}

/**
 * The cotangent stiffness and lumped mass of a mesh's intrinsic Delaunay
 * triangulation: K_ij = −½ Σ (cot α + cot β) over the intrinsic edges joining
 * i and j, every interior edge's weight ≥ 0 (Delaunay: opposite angles sum to
 * at most π; a boundary edge keeps its one cotangent, negative only when the
 * angle opposite it is obtuse), and
 * m_i a third of the intrinsic areas around i. K is symmetric, K·1 = 0; the
 * total mass is the mesh's area. Built for meshes whose vertices must stay
 * (measurements sit on them) but whose triangles are poor.
 */
export function intrinsicDelaunayOperators(mesh: Mesh): { stiffness: CsrMatrix; mass: Float64Array; flips: number } {
  const { corners: V, lengths: L, flips } = intrinsicDelaunay(mesh);
  const n = mesh.positions.length / 3, nH = V.length;
  const mass = new Float64Array(n);
  const weights = new Map<number, number>();
  for (let f = 0; f < nH / 3; f++) {
    const h0 = 3 * f;
    const a = L[h0], b = L[h0 + 1], c = L[h0 + 2];
    const area = areaFromSides(a, b, c);
    for (let k = 0; k < 3; k++) mass[V[h0 + k]] += area / 3;
    if (!(area > 0)) continue;
    const len = [a, b, c];
    for (let k = 0; k < 3; k++) {
      // halfedge h0+k joins V[h0+k] and V[h0+(k+1)%3]; the angle opposite it is at the third corner
      const x = len[k], y = len[(k + 1) % 3], z = len[(k + 2) % 3];
      const w = (y * y + z * z - x * x) / (8 * area); // ½ cot
      const i = V[h0 + k], j = V[h0 + ((k + 1) % 3)];
      if (i === j) continue; // a loop edge adds nothing to the Laplacian
      const key = Math.min(i, j) * n + Math.max(i, j);
      weights.set(key, (weights.get(key) ?? 0) + w);
    }
  }
  // CSR: per row the diagonal and the neighbours, ascending
  const rows: number[][] = Array.from({ length: n }, () => []);
  const diag = new Float64Array(n);
  const entries: [number, number, number][] = [];
  for (const [key, w] of weights) {
    const i = Math.floor(key / n), j = key - i * n;
    entries.push([i, j, w]);
    rows[i].push(j);
    rows[j].push(i);
    diag[i] += w;
    diag[j] += w;
  }
  const rowOffsets = new Uint32Array(n + 1);
  for (let i = 0; i < n; i++) rowOffsets[i + 1] = rowOffsets[i] + rows[i].length + 1;
  const columns = new Uint32Array(rowOffsets[n]);
  const values = new Float64Array(rowOffsets[n]);
  for (let i = 0; i < n; i++) {
    const cols = [...rows[i], i].sort((x, y) => x - y);
    columns.set(cols, rowOffsets[i]);
  }
  const slot = (i: number, j: number) => {
    let lo = rowOffsets[i], hi = rowOffsets[i + 1] - 1;
    while (lo <= hi) {
      const mid = (lo + hi) >> 1;
      if (columns[mid] === j) return mid;
      if (columns[mid] < j) lo = mid + 1;
      else hi = mid - 1;
    }
    throw new Error('intrinsicDelaunayOperators: pattern entry missing');
  };
  for (const [i, j, w] of entries) {
    values[slot(i, j)] -= w;
    values[slot(j, i)] -= w;
  }
  for (let i = 0; i < n; i++) values[slot(i, i)] += diag[i];
  return { stiffness: { rows: n, cols: n, rowOffsets, columns, values }, mass, flips };
}
