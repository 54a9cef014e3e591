import type { Mesh } from './Mesh.ts';
import { meshTopology } from './meshTopology.ts';
import { duplicateVertexGroups } from './weldVertices.ts';

export type MeshIssueCode =
  | 'non-finite-coordinate'
  | 'index-out-of-range'
  | 'repeated-vertex-in-triangle'
  | 'zero-area-triangle'
  | 'non-manifold-edge'
  | 'unreferenced-vertices'
  | 'duplicate-vertices'
  | 'non-manifold-vertex'
  | 'inconsistent-orientation'
  | 'non-orientable'
  | 'no-triangles';

export interface MeshIssue {
  code: MeshIssueCode;
  severity: 'error' | 'warning';
  /** One sentence: what, how many, where (first few locations), what to do. */
  message: string;
  /** How many vertices/triangles/edges are affected. */
  count: number;
  /** The first affected vertex or triangle indices (at most 10). */
  where: number[];
}

export interface MeshReport {
  errors: MeshIssue[];
  warnings: MeshIssue[];
}

/** Relative area below which a triangle counts as degenerate: area < ε·(longest edge)². */
export const DEGENERATE_TRIANGLE_RELATIVE_AREA = 1e-12;

const MAX_LISTED = 5;

function listed(kind: string, idx: number[], count: number): string {
  const shown = idx.slice(0, MAX_LISTED).join(', ');
  return count > MAX_LISTED ? `${kind} ${shown} and ${count - MAX_LISTED} more` : `${kind} ${shown}`;
}

/**
 * Check a mesh for everything that breaks or weakens the surface finite-element
 * method. Errors make the FEM meaningless (or impossible); warnings have a repair
 * (`weldVertices`, `orientTriangles`) or are harmless to the FEM.
 */
export function validateMesh(mesh: Mesh): MeshReport {
  const errors: MeshIssue[] = [];
  const warnings: MeshIssue[] = [];
  const p = mesh.positions;
  const tri = mesh.triangles;
  const nV = p.length / 3;
  const nF = tri.length / 3;

  const add = (code: MeshIssueCode, severity: 'error' | 'warning', where: number[], count: number, message: string) => {
    (severity === 'error' ? errors : warnings).push({ code, severity, message, count, where: where.slice(0, 10) });
  };

  if (nF === 0) {
    add('no-triangles', 'error', [], 0, 'the mesh has no triangles');
    return { errors, warnings };
  }

  const bad: number[] = [];
  let badCount = 0;
  for (let v = 0; v < nV; v++) {
    if (!Number.isFinite(p[3 * v]) || !Number.isFinite(p[3 * v + 1]) || !Number.isFinite(p[3 * v + 2])) {
      if (bad.length < 10) bad.push(v);
      badCount++;
    }
  }
  if (badCount > 0) {
    add('non-finite-coordinate', 'error', bad, badCount,
      `${badCount} vertices have NaN or infinite coordinates (${listed('vertex', bad, badCount)}); fix or remove them in the source file`);
  }

  const oob: number[] = [];
  let oobCount = 0;
  for (let t = 0; t < nF; t++) {
    if (tri[3 * t] >= nV || tri[3 * t + 1] >= nV || tri[3 * t + 2] >= nV) {
      if (oob.length < 10) oob.push(t);
      oobCount++;
    }
  }
  if (oobCount > 0) {
    const t = oob[0];
    add('index-out-of-range', 'error', oob, oobCount,
      `${oobCount} triangles use vertex indices ≥ ${nV} (the vertex count), first triangle ${t} = (${tri[3 * t]}, ${tri[3 * t + 1]}, ${tri[3 * t + 2]}); the file's faces do not match its vertex list`);
    return { errors, warnings };
  }

  const rep: number[] = [];
  let repCount = 0;
  const degen: number[] = [];
  let degenCount = 0;
  for (let t = 0; t < nF; t++) {
    const i = tri[3 * t], j = tri[3 * t + 1], k = tri[3 * t + 2];
    if (i === j || j === k || k === i) {
      if (rep.length < 10) rep.push(t);
      repCount++;
      continue;
    }
    const a = 3 * i, b = 3 * j, c = 3 * k;
    const ux = p[b] - p[a], uy = p[b + 1] - p[a + 1], uz = p[b + 2] - p[a + 2];
    const vx = p[c] - p[a], vy = p[c + 1] - p[a + 1], vz = p[c + 2] - p[a + 2];
    const wx = p[c] - p[b], wy = p[c + 1] - p[b + 1], wz = p[c + 2] - p[b + 2];
    const cx = uy * vz - uz * vy, cy = uz * vx - ux * vz, cz = ux * vy - uy * vx;
    const area = 0.5 * Math.sqrt(cx * cx + cy * cy + cz * cz);
    const l2 = Math.max(ux * ux + uy * uy + uz * uz, vx * vx + vy * vy + vz * vz, wx * wx + wy * wy + wz * wz);
    if (!(area > DEGENERATE_TRIANGLE_RELATIVE_AREA * l2)) {
      if (degen.length < 10) degen.push(t);
      degenCount++;
    }
  }
  if (repCount > 0) {
    const t = rep[0];
    add('repeated-vertex-in-triangle', 'error', rep, repCount,
      `${repCount} triangles use the same vertex twice (${listed('triangle', rep, repCount)}; triangle ${t} = (${tri[3 * t]}, ${tri[3 * t + 1]}, ${tri[3 * t + 2]})); remove them from the source mesh`);
  }
  if (degenCount > 0 && badCount === 0) {
    const t = degen[0];
    add('zero-area-triangle', 'error', degen, degenCount,
      `${degenCount} triangles have (near) zero area (${listed('triangle', degen, degenCount)}; triangle ${t} = vertices ${tri[3 * t]}, ${tri[3 * t + 1]}, ${tri[3 * t + 2]}); the cotangent weights are undefined there: remesh or collapse these triangles`);
  }

  const topo = meshTopology(mesh);
  if (topo.nonManifoldEdgeCount > 0) {
    const where: number[] = [];
    const pairs: string[] = [];
    for (let e = 0; e < topo.edgeCount && where.length < 10; e++) {
      if (topo.edgeTriangleCount[e] > 2) {
        where.push(topo.edges[2 * e]);
        if (pairs.length < MAX_LISTED) pairs.push(`(${topo.edges[2 * e]}, ${topo.edges[2 * e + 1]}) in ${topo.edgeTriangleCount[e]} triangles`);
      }
    }
    add('non-manifold-edge', 'error', where, topo.nonManifoldEdgeCount,
      `${topo.nonManifoldEdgeCount} edges are shared by more than two triangles: ${pairs.join('; ')}; the surface is not a 2-manifold there: split it into separate sheets`);
  }

  const unref: number[] = [];
  let unrefCount = 0;
  for (let v = 0; v < nV; v++) {
    if (topo.vertexTriangleOffsets[v + 1] === topo.vertexTriangleOffsets[v]) {
      if (unref.length < 10) unref.push(v);
      unrefCount++;
    }
  }
  if (unrefCount > 0) {
    add('unreferenced-vertices', 'error', unref, unrefCount,
      `${unrefCount} vertices belong to no triangle (${listed('vertex', unref, unrefCount)}); they would have zero mass: drop them (--drop-unreferenced)`);
  }

  if (badCount === 0) {
    const groups = duplicateVertexGroups(p, 0);
    if (groups.groupCount > 0) {
      const where: number[] = [];
      for (let v = 0; v < nV && where.length < 10; v++) if (groups.representative[v] !== v) where.push(v);
      add('duplicate-vertices', 'warning', where, groups.duplicateCount,
        `${groups.duplicateCount} vertices sit exactly on another vertex (${listed('vertex', where, groups.duplicateCount)}, e.g. vertex ${where[0]} on vertex ${groups.representative[where[0]]}); the surface is cut there: weld them (--weld)`);
    }
  }

  const nmv = nonManifoldVertices(mesh);
  if (nmv.length > 0) {
    add('non-manifold-vertex', 'warning', nmv, nmv.length,
      `${nmv.length} vertices join surface sheets that share no edge (${listed('vertex', nmv, nmv.length)}); the FEM treats them as pinch points where sheets exchange material`);
  }

  const orient = orientationReport(mesh);
  if (!orient.orientable) {
    add('non-orientable', 'warning', orient.where, orient.count,
      `the surface is not orientable (conflict at triangle ${orient.where[0]}); diffusion is still well defined, but normals and exports are not consistent`);
  } else if (orient.count > 0) {
    add('inconsistent-orientation', 'warning', orient.where, orient.count,
      `${orient.count} edges are traversed in the same direction by both their triangles (first at triangle ${orient.where[0]}); reorient the triangles (--fix-orientation)`);
  }
  return { errors, warnings };
}

/** Vertices whose incident triangles form more than one edge-connected fan. */
export function nonManifoldVertices(mesh: Mesh): number[] {
  const topo = meshTopology(mesh);
  const tri = mesh.triangles;
  const out: number[] = [];
  const local = new Int32Array(64);
  for (let v = 0; v < topo.vertexCount; v++) {
    const s = topo.vertexTriangleOffsets[v];
    const e = topo.vertexTriangleOffsets[v + 1];
    const d = e - s;
    if (d <= 1) continue;
    const par = d <= 64 ? local : new Int32Array(d);
    for (let i = 0; i < d; i++) par[i] = i;
    const find = (x: number): number => {
      while (par[x] !== x) x = par[x] = par[par[x]];
      return x;
    };
    // two triangles around v are joined if they share an edge incident to v
    for (let i = 0; i < d; i++) {
      const ti = topo.vertexTriangles[s + i];
      for (let j = i + 1; j < d; j++) {
        const tj = topo.vertexTriangles[s + j];
        let shared = 0;
        for (let a = 0; a < 3; a++) {
          const va = tri[3 * ti + a];
          if (va === v) continue;
          if (va === tri[3 * tj] || va === tri[3 * tj + 1] || va === tri[3 * tj + 2]) shared++;
        }
        if (shared > 0) {
          const ri = find(i), rj = find(j);
          if (ri !== rj) par[ri] = rj;
        }
      }
    }
    let roots = 0;
    for (let i = 0; i < d; i++) if (find(i) === i) roots++;
    if (roots > 1) out.push(v);
  }
  return out;
}

/**
 * Count manifold edges whose two triangles traverse them in the same direction,
 * and decide whether any orientation could make every edge consistent.
 */
export function orientationReport(mesh: Mesh): { count: number; where: number[]; orientable: boolean } {
  const topo = meshTopology(mesh);
  const tri = mesh.triangles;
  let count = 0;
  const where: number[] = [];
  for (let e = 0; e < topo.edgeCount; e++) {
    if (topo.edgeTriangleCount[e] !== 2) continue;
    const t0 = topo.edgeTriangles[2 * e], t1 = topo.edgeTriangles[2 * e + 1];
    if (sameDirection(tri, t0, t1, topo.edges[2 * e], topo.edges[2 * e + 1])) {
      count++;
      if (where.length < 10) where.push(t1);
    }
  }
  let orientable = true;
  if (count > 0) orientable = propagateOrientation(mesh).orientable;
  return { count, where, orientable };
}

/** Does edge (a, b) run a→b in both triangles (or b→a in both)? */
export function sameDirection(tri: Uint32Array, t0: number, t1: number, a: number, b: number): boolean {
  return runsForward(tri, t0, a, b) === runsForward(tri, t1, a, b);
}

function runsForward(tri: Uint32Array, t: number, a: number, b: number): boolean {
  for (let k = 0; k < 3; k++) {
    if (tri[3 * t + k] === a) return tri[3 * t + ((k + 1) % 3)] === b;
  }
  return false;
}

/**
 * Flip decisions that make neighbouring triangles agree, by breadth-first search
 * over manifold edges; `flip[t]` = 1 where triangle t must be reversed.
 */
export function propagateOrientation(mesh: Mesh): { flip: Uint8Array; orientable: boolean; conflictAt: number } {
  const topo = meshTopology(mesh);
  const tri = mesh.triangles;
  const nF = topo.triangleCount;
  const flip = new Uint8Array(nF);
  const seen = new Uint8Array(nF);
  const queue = new Uint32Array(nF);
  let orientable = true;
  let conflictAt = -1;
  for (let seed = 0; seed < nF; seed++) {
    if (seen[seed]) continue;
    seen[seed] = 1;
    let head = 0, tail = 0;
    queue[tail++] = seed;
    while (head < tail) {
      const t = queue[head++];
      for (let k = 0; k < 3; k++) {
        const e = topo.triangleEdges[3 * t + k];
        if (topo.edgeTriangleCount[e] !== 2) continue;
        const t0 = topo.edgeTriangles[2 * e], t1 = topo.edgeTriangles[2 * e + 1];
        const u = t0 === t ? t1 : t0;
        const same = sameDirection(tri, t, u, topo.edges[2 * e], topo.edges[2 * e + 1]);
        const want = (flip[t] ^ (same ? 1 : 0)) as 0 | 1;
        if (!seen[u]) {
          seen[u] = 1;
          flip[u] = want;
          queue[tail++] = u;
        } else if (flip[u] !== want && orientable) {
          orientable = false;
          conflictAt = u;
        }
      }
    }
  }
  return { flip, orientable, conflictAt };
}
