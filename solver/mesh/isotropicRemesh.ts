import { makeMesh, type Mesh } from './Mesh.ts';
import { meshArea } from './triangleAreas.ts';
import { SurfaceProjector } from './surfaceProjector.ts';
import { edgeLengthStats } from './edgeLengthStats.ts';

export interface RemeshOptions {
  /** target edge length (default: from `vertices`, else the input's mean edge) */
  edge?: number;
  /** target vertex count (sets the edge length: 2N triangles of area √3/4·h² cover the area) */
  vertices?: number;
  /** rounds of split, collapse, flip, relax and project (default 8) */
  iterations?: number;
  /** edges where the surface folds by more than this many degrees (between the normals) are creases, kept (default: none) */
  creaseAngle?: number;
  /** per-vertex values to carry onto the new vertices (interpolated at their closest points) */
  vertexData?: Record<string, Float64Array>;
  onProgress?: (round: number, of: number, vertices: number) => void;
}

export interface RemeshResult {
  mesh: Mesh;
  vertexData: Record<string, Float64Array>;
  /** the edge length aimed at, and the largest distance of a new vertex from the input before its last projection */
  edge: number;
}

/** Edges of a triangle list: endpoints, the (up to two) triangles on each, and a lookup by vertex pair. */
function edgesOf(tris: number[], nV: number) {
  const map = new Map<number, number>();
  const ev: number[] = [], ef: number[] = [];
  for (let f = 0; f < tris.length / 3; f++) {
    for (let k = 0; k < 3; k++) {
      const a = tris[3 * f + k], b = tris[3 * f + ((k + 1) % 3)];
      const key = Math.min(a, b) * nV + Math.max(a, b);
      const e = map.get(key);
      if (e === undefined) {
        map.set(key, ev.length / 2);
        ev.push(a, b);
        ef.push(f, -1);
      } else ef[2 * e + 1] = f;
    }
  }
  return { map, ev, ef, key: (a: number, b: number) => Math.min(a, b) * nV + Math.max(a, b) };
}

/** Crease edges (the normals of their two triangles part by more than the limit) and the vertices on them. */
function creases(p: number[], tris: number[], ev: number[], ef: number[], cosLimit: number): { edge: Uint8Array; vertex: Uint8Array } {
  const edge = new Uint8Array(ev.length / 2), vertex = new Uint8Array(p.length / 3);
  if (cosLimit <= -1) return { edge, vertex };
  for (let e = 0; e < ev.length / 2; e++) {
    const f0 = ef[2 * e], f1 = ef[2 * e + 1];
    if (f1 < 0) continue;
    const n0 = normalOf(p, tris[3 * f0], tris[3 * f0 + 1], tris[3 * f0 + 2]), n1 = normalOf(p, tris[3 * f1], tris[3 * f1 + 1], tris[3 * f1 + 2]);
    const c = (n0[0] * n1[0] + n0[1] * n1[1] + n0[2] * n1[2]) / (Math.hypot(...n0) * Math.hypot(...n1) || 1);
    if (c < cosLimit) { edge[e] = 1; vertex[ev[2 * e]] = 1; vertex[ev[2 * e + 1]] = 1; }
  }
  return { edge, vertex };
}

/** Vertex → neighbours and vertex → triangles (CSR), boundary flags from the edges with one triangle. */
function adjacency(tris: number[], nV: number, ev: number[], ef: number[]) {
  const deg = new Uint32Array(nV + 1);
  for (let e = 0; e < ev.length / 2; e++) { deg[ev[2 * e] + 1]++; deg[ev[2 * e + 1] + 1]++; }
  for (let i = 0; i < nV; i++) deg[i + 1] += deg[i];
  const nb = new Int32Array(deg[nV]);
  const fill = deg.slice(0, nV);
  const boundary = new Uint8Array(nV);
  for (let e = 0; e < ev.length / 2; e++) {
    const a = ev[2 * e], b = ev[2 * e + 1];
    nb[fill[a]++] = b; nb[fill[b]++] = a;
    if (ef[2 * e + 1] < 0) { boundary[a] = 1; boundary[b] = 1; }
  }
  const fdeg = new Uint32Array(nV + 1);
  for (const v of tris) fdeg[v + 1]++;
  for (let i = 0; i < nV; i++) fdeg[i + 1] += fdeg[i];
  const vf = new Int32Array(fdeg[nV]);
  const ffill = fdeg.slice(0, nV);
  for (let f = 0; f < tris.length / 3; f++) for (let k = 0; k < 3; k++) vf[ffill[tris[3 * f + k]]++] = f;
  return { offsets: deg, nb, boundary, faceOffsets: fdeg, vf };
}

const dist = (p: number[], a: number, b: number) => Math.hypot(p[3 * a] - p[3 * b], p[3 * a + 1] - p[3 * b + 1], p[3 * a + 2] - p[3 * b + 2]);

function normalOf(p: number[], a: number, b: number, c: number, over?: { v: number; x: number; y: number; z: number }): [number, number, number] {
  const P = (v: number, d: number) => (over && v === over.v ? (d === 0 ? over.x : d === 1 ? over.y : over.z) : p[3 * v + d]);
  const ux = P(b, 0) - P(a, 0), uy = P(b, 1) - P(a, 1), uz = P(b, 2) - P(a, 2);
  const vx = P(c, 0) - P(a, 0), vy = P(c, 1) - P(a, 1), vz = P(c, 2) - P(a, 2);
  return [uy * vz - uz * vy, uz * vx - ux * vz, ux * vy - uy * vx];
}

/** cot of the angle at corner o of the triangle (x, y, o). */
function cotAt(p: number[], x: number, y: number, o: number): number {
  const ux = p[3 * x] - p[3 * o], uy = p[3 * x + 1] - p[3 * o + 1], uz = p[3 * x + 2] - p[3 * o + 2];
  const vx = p[3 * y] - p[3 * o], vy = p[3 * y + 1] - p[3 * o + 1], vz = p[3 * y + 2] - p[3 * o + 2];
  return (ux * vx + uy * vy + uz * vz) / (Math.hypot(uy * vz - uz * vy, uz * vx - ux * vz, ux * vy - uy * vx) || 1e-300);
}

/** Split every edge longer than `hi` at its midpoint (each triangle by the pattern of its split edges). */
function splitLong(p: number[], tris: number[], hi: number): { tris: number[]; splits: number } {
  const nV = p.length / 3;
  let any = false; // (a scan being coarsened has none: skip building the edges)
  for (let f = 0; f < tris.length / 3 && !any; f++) for (let k = 0; k < 3; k++) if (dist(p, tris[3 * f + k], tris[3 * f + ((k + 1) % 3)]) > hi) { any = true; break; }
  if (!any) return { tris, splits: 0 };
  const { map, ev, key } = edgesOf(tris, nV);
  const mid = new Int32Array(ev.length / 2).fill(-1);
  let splits = 0;
  for (let e = 0; e < ev.length / 2; e++) {
    const a = ev[2 * e], b = ev[2 * e + 1];
    if (dist(p, a, b) <= hi) continue;
    mid[e] = p.length / 3;
    p.push(0.5 * (p[3 * a] + p[3 * b]), 0.5 * (p[3 * a + 1] + p[3 * b + 1]), 0.5 * (p[3 * a + 2] + p[3 * b + 2]));
    splits++;
  }
  if (!splits) return { tris, splits };
  const out: number[] = [];
  for (let f = 0; f < tris.length / 3; f++) {
    const v = [tris[3 * f], tris[3 * f + 1], tris[3 * f + 2]];
    const m = [0, 1, 2].map((k) => mid[map.get(key(v[k], v[(k + 1) % 3]))!]);
    const count = m.filter((x) => x >= 0).length;
    if (count === 0) { out.push(...v); continue; }
    if (count === 3) {
      out.push(v[0], m[0], m[2], m[0], v[1], m[1], m[2], m[1], v[2], m[0], m[1], m[2]);
      continue;
    }
    // rotate so the first split edge is (v0, v1)
    let r = m.findIndex((x) => x >= 0);
    if (count === 2 && m[0] >= 0 && m[2] >= 0) r = 2; // split edges (v2, v0) and (v0, v1): start at v2
    const [a, b, c] = [v[r], v[(r + 1) % 3], v[(r + 2) % 3]];
    const [mab, mbc] = [m[r], m[(r + 1) % 3]];
    if (count === 1) { out.push(a, mab, c, mab, b, c); continue; }
    // edges ab and bc split: the corner triangle at b, and the quad a, mab, mbc, c cut by its shorter diagonal
    out.push(mab, b, mbc);
    if (dist(p, a, mbc) <= dist(p, mab, c)) out.push(a, mab, mbc, a, mbc, c);
    else out.push(a, mab, c, mab, mbc, c);
  }
  return { tris: out, splits };
}

/** Collapse edges shorter than `lo` (an independent set), keeping boundaries, topology and orientation. */
function collapseShort(p: number[], tris: number[], lo: number, hi: number, cosCrease: number): { tris: number[]; collapses: number } {
  const nV = p.length / 3;
  const { ev, ef } = edgesOf(tris, nV);
  const { offsets, nb, boundary: open, faceOffsets, vf } = adjacency(tris, nV, ev, ef);
  // boundary and crease vertices stay put, and only edges along them may take one into another
  const crease = creases(p, tris, ev, ef, cosCrease);
  const boundary = open.map((b, v) => b | crease.vertex[v]);
  // feature edges per vertex: 2 along a boundary or crease, more at a corner (which never moves)
  const featureDegree = new Uint8Array(nV);
  for (let e = 0; e < ev.length / 2; e++) if (ef[2 * e + 1] < 0 || crease.edge[e]) { featureDegree[ev[2 * e]]++; featureDegree[ev[2 * e + 1]]++; }
  const short: number[] = [], lengths: number[] = [];
  for (let e = 0; e < ev.length / 2; e++) {
    const l = dist(p, ev[2 * e], ev[2 * e + 1]);
    if (l < lo) { short.push(e); lengths.push(l); }
  }
  const order = Uint32Array.from(short.keys()).sort((x, y) => lengths[x] - lengths[y]).map((k) => short[k]);
  const locked = new Uint8Array(nV);
  const remap = new Int32Array(nV);
  for (let i = 0; i < nV; i++) remap[i] = i;
  let collapses = 0;
  const mark = new Int32Array(nV).fill(-1);
  for (const e of order) {
    let a = ev[2 * e], b = ev[2 * e + 1];
    if (locked[a] || locked[b]) continue;
    const onBoundary = ef[2 * e + 1] < 0 || crease.edge[e] === 1;
    if (boundary[a] && boundary[b] && !onBoundary) continue; // would pinch the surface
    if (boundary[b] && !boundary[a]) [a, b] = [b, a]; // keep the boundary vertex where it is
    if (featureDegree[b] > 2) {
      if (featureDegree[a] > 2) continue; // two corners
      [a, b] = [b, a]; // keep the corner
    }
    if (offsets[a + 1] - offsets[a] <= 3 || offsets[b + 1] - offsets[b] <= 3) continue;
    const keep = boundary[a];
    const target = keep ? [p[3 * a], p[3 * a + 1], p[3 * a + 2]] : [0, 1, 2].map((d) => 0.5 * (p[3 * a + d] + p[3 * b + d]));
    // link condition: the endpoints share exactly the vertices opposite the edge (the lists read through
    // the collapses this pass already made, so only the collapsed pair itself need be locked)
    for (let q = offsets[a]; q < offsets[a + 1]; q++) mark[remap[nb[q]]] = e;
    let common = 0;
    for (let q = offsets[b]; q < offsets[b + 1]; q++) {
      const w = remap[nb[q]];
      if (mark[w] === e) { common++; mark[w] = -1; }
    }
    if (common !== (ef[2 * e + 1] < 0 ? 1 : 2)) continue;
    // no edge of the new star longer than hi
    let ok = true;
    for (const v of [a, b]) {
      for (let q = offsets[v]; q < offsets[v + 1] && ok; q++) {
        const n = remap[nb[q]];
        if (n === a || n === b) continue;
        if (Math.hypot(target[0] - p[3 * n], target[1] - p[3 * n + 1], target[2] - p[3 * n + 2]) > hi) ok = false;
      }
    }
    if (!ok) continue;
    // no triangle turned over
    for (const v of [a, b]) {
      for (let q = faceOffsets[v]; q < faceOffsets[v + 1] && ok; q++) {
        const f = vf[q];
        const t = [remap[tris[3 * f]], remap[tris[3 * f + 1]], remap[tris[3 * f + 2]]];
        if ((t.includes(a) && t.includes(b)) || t[0] === t[1] || t[1] === t[2] || t[2] === t[0]) continue;
        const before = normalOf(p, t[0], t[1], t[2]);
        const after = normalOf(p, t[0], t[1], t[2], { v, x: target[0], y: target[1], z: target[2] });
        const dot = before[0] * after[0] + before[1] * after[1] + before[2] * after[2];
        if (!(dot > 0.1 * Math.hypot(...before) * Math.hypot(...after))) ok = false;
      }
    }
    if (!ok) continue;
    remap[b] = a;
    p[3 * a] = target[0]; p[3 * a + 1] = target[1]; p[3 * a + 2] = target[2];
    locked[a] = 1;
    locked[b] = 1;
    collapses++;
  }
  if (!collapses) return { tris, collapses };
  const out: number[] = [];
  for (let f = 0; f < tris.length / 3; f++) {
    const a = remap[tris[3 * f]], b = remap[tris[3 * f + 1]], c = remap[tris[3 * f + 2]];
    if (a !== b && b !== c && c !== a) out.push(a, b, c);
  }
  return { tris: out, collapses };
}

/**
 * Flip interior edges where it brings the four vertices' valences nearer 6 (4 on the boundary), or
 * (criterion 'delaunay') where the angles opposite the edge sum to more than π.
 */
function flipEdges(p: number[], tris: number[], criterion: 'valence' | 'delaunay', cosCrease: number): number {
  const nV = p.length / 3;
  const { map, ev, ef, key } = edgesOf(tris, nV);
  const { offsets, boundary } = adjacency(tris, nV, ev, ef);
  const crease = creases(p, tris, ev, ef, cosCrease);
  const valence = new Int32Array(nV);
  for (let i = 0; i < nV; i++) valence[i] = offsets[i + 1] - offsets[i];
  const target = (v: number) => (boundary[v] ? 4 : 6);
  const used = new Uint8Array(tris.length / 3);
  let flips = 0;
  for (let e = 0; e < ev.length / 2; e++) {
    const f0 = ef[2 * e], f1 = ef[2 * e + 1];
    if (f1 < 0 || used[f0] || used[f1] || crease.edge[e]) continue;
    // orient: f0 holds a→b, f1 holds b→a
    let a = ev[2 * e], b = ev[2 * e + 1];
    const k0 = [0, 1, 2].find((k) => tris[3 * f0 + k] === a)!;
    if (tris[3 * f0 + ((k0 + 1) % 3)] !== b) [a, b] = [b, a];
    const c = [0, 1, 2].map((k) => tris[3 * f0 + k]).find((v) => v !== a && v !== b)!;
    const d = [0, 1, 2].map((k) => tris[3 * f1 + k]).find((v) => v !== a && v !== b)!;
    if (c === d || map.has(key(c, d))) continue;
    if (criterion === 'valence') {
      // the four valences' distance from their targets, before and after the flip
      const before = Math.abs(valence[a] - target(a)) + Math.abs(valence[b] - target(b)) + Math.abs(valence[c] - target(c)) + Math.abs(valence[d] - target(d));
      const after = Math.abs(valence[a] - 1 - target(a)) + Math.abs(valence[b] - 1 - target(b)) + Math.abs(valence[c] + 1 - target(c)) + Math.abs(valence[d] + 1 - target(d));
      if (after >= before) continue;
    } else if (cotAt(p, a, b, c) + cotAt(p, a, b, d) >= -1e-9) {
      continue; // Delaunay already: the angles opposite the edge sum to at most π (cot α + cot β ≥ 0)
    }
    if (valence[a] <= 3 || valence[b] <= 3) continue;
    // the two new triangles must face as the old ones did
    const n0 = normalOf(p, a, b, c), n1 = normalOf(p, b, a, d);
    const m0 = normalOf(p, a, d, c), m1 = normalOf(p, d, b, c);
    const avg = [n0[0] + n1[0], n0[1] + n1[1], n0[2] + n1[2]];
    if (!((m0[0] * avg[0] + m0[1] * avg[1] + m0[2] * avg[2]) > 0 && (m1[0] * avg[0] + m1[1] * avg[1] + m1[2] * avg[2]) > 0)) continue;
    tris[3 * f0] = a; tris[3 * f0 + 1] = d; tris[3 * f0 + 2] = c;
    tris[3 * f1] = d; tris[3 * f1 + 1] = b; tris[3 * f1 + 2] = c;
    used[f0] = 1; used[f1] = 1;
    valence[a]--; valence[b]--; valence[c]++; valence[d]++;
    map.set(key(c, d), -1);
    flips++;
  }
  return flips;
}

/**
 * Remove interior vertices of valence 3 (a vertex inside one triangle of its neighbours: its star is
 * small whatever its angles, so it sets the explicit step): its three triangles become that one.
 */
function removeValence3(p: number[], tris: number[], cosCrease: number): { tris: number[]; removed: number } {
  const nV = p.length / 3;
  const { ev, ef } = edgesOf(tris, nV);
  const { offsets, nb, boundary, faceOffsets, vf } = adjacency(tris, nV, ev, ef);
  const crease = creases(p, tris, ev, ef, cosCrease);
  const gone = new Uint8Array(tris.length / 3);
  const locked = new Uint8Array(nV);
  const added: number[] = [];
  let removed = 0;
  for (let v = 0; v < nV; v++) {
    if (boundary[v] || crease.vertex[v] || locked[v] || offsets[v + 1] - offsets[v] !== 3 || faceOffsets[v + 1] - faceOffsets[v] !== 3) continue;
    const ring = [nb[offsets[v]], nb[offsets[v] + 1], nb[offsets[v] + 2]];
    if (ring.some((x) => locked[x] || offsets[x + 1] - offsets[x] <= 3)) continue;
    // the outer triangle, in the orientation of v's triangles: from face (v, x, y) the edge x→y
    const f = vf[faceOffsets[v]];
    const k = [0, 1, 2].find((j) => tris[3 * f + j] === v)!;
    const x = tris[3 * f + ((k + 1) % 3)], y = tris[3 * f + ((k + 2) % 3)];
    const z = ring.find((w) => w !== x && w !== y)!;
    // a triangle x, y, z elsewhere would make the surface a closed tetrahedron
    let exists = false;
    for (let q = faceOffsets[x]; q < faceOffsets[x + 1]; q++) {
      const g = vf[q], t = [tris[3 * g], tris[3 * g + 1], tris[3 * g + 2]];
      if (!t.includes(v) && t.includes(y) && t.includes(z)) exists = true;
    }
    if (exists) continue;
    for (let q = faceOffsets[v]; q < faceOffsets[v + 1]; q++) gone[vf[q]] = 1;
    added.push(x, y, z);
    locked[v] = 1;
    for (const w of ring) locked[w] = 1;
    removed++;
  }
  if (!removed) return { tris, removed };
  const out: number[] = [];
  for (let f = 0; f < tris.length / 3; f++) if (!gone[f]) out.push(tris[3 * f], tris[3 * f + 1], tris[3 * f + 2]);
  out.push(...added);
  return { tris: out, removed };
}

/** Move every interior vertex towards the centroid of its neighbours, within its tangent plane. */
function relaxTangentially(p: number[], tris: number[], cosCrease: number): void {
  const nV = p.length / 3;
  const { ev, ef } = edgesOf(tris, nV);
  const { offsets, nb, boundary } = adjacency(tris, nV, ev, ef);
  const crease = creases(p, tris, ev, ef, cosCrease);
  const normal = new Float64Array(3 * nV);
  for (let f = 0; f < tris.length / 3; f++) {
    const n = normalOf(p, tris[3 * f], tris[3 * f + 1], tris[3 * f + 2]);
    for (let k = 0; k < 3; k++) for (let d = 0; d < 3; d++) normal[3 * tris[3 * f + k] + d] += n[d];
  }
  const next = p.slice();
  for (let v = 0; v < nV; v++) {
    if (boundary[v] || crease.vertex[v] || offsets[v + 1] === offsets[v]) continue;
    const c = [0, 0, 0];
    const k = offsets[v + 1] - offsets[v];
    for (let q = offsets[v]; q < offsets[v + 1]; q++) for (let d = 0; d < 3; d++) c[d] += p[3 * nb[q] + d] / k;
    const n = [normal[3 * v], normal[3 * v + 1], normal[3 * v + 2]];
    const len = Math.hypot(...n) || 1;
    const u = [c[0] - p[3 * v], c[1] - p[3 * v + 1], c[2] - p[3 * v + 2]];
    const along = (u[0] * n[0] + u[1] * n[1] + u[2] * n[2]) / (len * len);
    for (let d = 0; d < 3; d++) next[3 * v + d] = p[3 * v + d] + u[d] - along * n[d];
  }
  for (let i = 0; i < p.length; i++) p[i] = next[i];
}

/** Renumber the vertices the triangles use, in place (unused ones dropped); the triangles renumbered. */
function compactVertices(p: number[], tris: number[]): number[] {
  const map = new Int32Array(p.length / 3).fill(-1);
  let n = 0;
  for (const v of tris) if (map[v] < 0) map[v] = n++;
  const q = new Array<number>(3 * n);
  for (let v = 0; v < map.length; v++) {
    const w = map[v];
    if (w >= 0) { q[3 * w] = p[3 * v]; q[3 * w + 1] = p[3 * v + 1]; q[3 * w + 2] = p[3 * v + 2]; }
  }
  p.length = 3 * n;
  for (let i = 0; i < 3 * n; i++) p[i] = q[i];
  return tris.map((v) => map[v]);
}

/**
 * Isotropic remeshing in the manner of Botsch & Kobbelt (2004): rounds of
 * splitting edges longer than 4/3·h, collapsing edges shorter than 4/5·h,
 * flipping edges towards valence 6 (4 on the boundary), tangential
 * relaxation and projection back onto the input surface (closest points
 * through a BVH). With `creaseAngle`, creases (edges whose triangles'
 * normals part by more than it) are kept like boundaries: their vertices stay,
 * edges along them are split and collapsed along them, never flipped. Open
 * boundaries stay where they are (their vertices do not
 * move off them, edges along them are split and collapsed along them); the
 * genus and the number of boundary loops are kept (collapses respect the link
 * condition); triangles are never turned over. Coarsens a dense scan as well
 * as it refines a coarse mesh. Per-vertex data are interpolated at each new
 * vertex's closest point on the input.
 */
export function isotropicRemesh(input: Mesh, options: RemeshOptions = {}): RemeshResult {
  const area = meshArea(input);
  let h = options.edge;
  if (h === undefined && options.vertices !== undefined) h = Math.sqrt((2 * area) / (Math.sqrt(3) * options.vertices));
  h ??= edgeLengthStats(input).mean;
  if (!(h > 0) || !Number.isFinite(h)) throw new Error(`remesh: the target edge length must be a positive number, got ${h}`);
  const hi = (4 / 3) * h, lo = (4 / 5) * h;
  // creases only when asked for: a scan's terraces fold as sharply as a real crease, and must go
  const cosCrease = options.creaseAngle === undefined ? -2 : Math.cos((options.creaseAngle * Math.PI) / 180);
  const projector = new SurfaceProjector(input);
  const p = Array.from(input.positions);
  let tris = Array.from(input.triangles);
  const iterations = options.iterations ?? 8;
  for (let round = 0; round < iterations; round++) {
    for (let pass = 0; pass < 12; pass++) {
      const s = splitLong(p, tris, hi);
      tris = s.tris;
      if (!s.splits) break;
    }
    for (let pass = 0; pass < 40; pass++) {
      const c = collapseShort(p, tris, lo, hi, cosCrease);
      tris = c.tris;
      if (c.collapses < 0.001 * p.length / 3) break; // (the last few are not worth a pass each)
    }
    tris = removeValence3(p, tris, cosCrease).tris;
    flipEdges(p, tris, 'valence', cosCrease);
    relaxTangentially(p, tris, cosCrease);
    // the last rounds also make the triangulation Delaunay, which lifts the smallest angles
    if (round >= iterations - 3) {
      for (let pass = 0; pass < 4 && flipEdges(p, tris, 'delaunay', cosCrease) > 0; pass++);
      tris = removeValence3(p, tris, cosCrease).tris;
    }
    // drop the vertices collapses left behind, then back onto the input surface
    tris = compactVertices(p, tris);
    for (let i = 0; i < p.length / 3; i++) projector.project(p, i, h);
    options.onProgress?.(round + 1, iterations, p.length / 3);
  }
  // drop the vertices collapses left behind, carry the data to the rest
  const used = new Int32Array(p.length / 3).fill(-1);
  let n = 0;
  for (const v of tris) if (used[v] < 0) used[v] = n++;
  const positions = new Float64Array(3 * n);
  const data: Record<string, Float64Array> = {};
  const fields = Object.entries(options.vertexData ?? {});
  for (const [name] of fields) data[name] = new Float64Array(n);
  const at = new Float64Array(3);
  for (let v = 0; v < used.length; v++) {
    const w = used[v];
    if (w < 0) continue;
    at[0] = p[3 * v]; at[1] = p[3 * v + 1]; at[2] = p[3 * v + 2];
    projector.project(at, 0, h);
    positions[3 * w] = at[0]; positions[3 * w + 1] = at[1]; positions[3 * w + 2] = at[2];
    for (const [name, values] of fields) data[name][w] = projector.interpolate(values);
  }
  const triangles = new Uint32Array(tris.length);
  for (let i = 0; i < tris.length; i++) triangles[i] = used[tris[i]];
  return { mesh: makeMesh(positions, triangles), vertexData: data, edge: h };
}
