import { existsSync } from 'node:fs';
import { SHAPES, buildShape } from '../../meshes/shapes/index.ts';
import type { Mesh } from '../mesh/Mesh.ts';
import { loadMeshFile } from '../io/meshFiles.ts';
import { weldVertices } from '../mesh/weldVertices.ts';
import { orientTriangles } from '../mesh/orientTriangles.ts';
import { dropUnreferencedVertices } from '../mesh/dropUnreferencedVertices.ts';
import { refineMidpoint } from '../mesh/refineMidpoint.ts';
import { loopSubdivide } from '../mesh/loopSubdivide.ts';
import { prolongField } from '../mesh/Refinement.ts';
import { validateMesh } from '../mesh/validateMesh.ts';
import { UsageError } from './UsageError.ts';

export interface MeshSourceOptions {
  param?: string[];
  vertices?: string;
  weld?: string | boolean;
  fixOrientation?: boolean;
  dropUnreferenced?: boolean;
  refine?: string;
  loop?: string;
}

export interface ResolvedMesh {
  mesh: Mesh;
  /** how the mesh was made, for records and messages */
  source: { kind: 'shape'; shape: string; params: Record<string, number>; vertices: number } | { kind: 'file'; path: string };
  vertexData: Record<string, Float64Array>;
  notes: string[];
}

/** `key=value` pairs of shape parameters. */
export function parseParams(pairs: string[] = []): Record<string, number> {
  const out: Record<string, number> = {};
  for (const pair of pairs) {
    const m = /^([A-Za-z_][A-Za-z0-9_]*)=(.+)$/.exec(pair);
    if (!m) throw new UsageError(`shape parameter "${pair}" should read name=value, e.g. -p radius=2`);
    const v = Number(m[2]);
    if (!Number.isFinite(v)) throw new UsageError(`shape parameter ${m[1]} must be a number, got "${m[2]}"`);
    out[m[1]] = v;
  }
  return out;
}

export function parseCount(text: string | undefined, what: string, min = 0): number | undefined {
  if (text === undefined) return undefined;
  const v = Number(text);
  if (!Number.isInteger(v) || v < min) throw new UsageError(`${what} must be a whole number ≥ ${min}, got "${text}"`);
  return v;
}

/** A built-in shape name or a mesh file path, with the requested repairs and refinements. */
export function resolveMesh(spec: string, o: MeshSourceOptions): ResolvedMesh {
  let mesh: Mesh;
  let source: ResolvedMesh['source'];
  let vertexData: Record<string, Float64Array> = {};
  const notes: string[] = [];
  if (spec in SHAPES) {
    const vertices = parseCount(o.vertices, '--vertices', 4);
    const built = buildShape({ shape: spec, params: parseParams(o.param), vertices });
    mesh = built.mesh;
    source = { kind: 'shape', shape: spec, params: built.params, vertices: built.vertices };
  } else if (existsSync(spec)) {
    if (o.param?.length) throw new UsageError(`-p/--param sets shape parameters, but "${spec}" is a file`);
    if (o.vertices !== undefined) throw new UsageError(`--vertices applies to built-in shapes, but "${spec}" is a file (use --refine to refine it)`);
    const imported = loadMeshFile(spec);
    mesh = imported.mesh;
    vertexData = imported.vertexData;
    notes.push(...imported.notes);
    source = { kind: 'file', path: spec };
  } else {
    throw new UsageError(`"${spec}" is neither a built-in shape (${Object.keys(SHAPES).join(', ')}) nor an existing mesh file`);
  }
  let weld: number | undefined;
  if (o.weld !== undefined && o.weld !== false) {
    weld = o.weld === true ? 0 : Number(o.weld);
    if (!Number.isFinite(weld) || weld < 0) throw new UsageError(`--weld tolerance must be a number ≥ 0, got "${o.weld}"`);
  }
  const repaired = repairMesh(mesh, vertexData, {
    weld,
    dropUnreferenced: o.dropUnreferenced,
    fixOrientation: o.fixOrientation,
    refine: parseCount(o.refine, '--refine') ?? 0,
    loop: parseCount(o.loop, '--loop') ?? 0,
  });
  mesh = repaired.mesh;
  vertexData = repaired.vertexData;
  notes.push(...repaired.notes);
  return { mesh, source, vertexData, notes };
}

export interface MeshRepairs {
  /** weld vertices closer than this (0: identical only); undefined: no welding */
  weld?: number;
  dropUnreferenced?: boolean;
  fixOrientation?: boolean;
  refine?: number;
  loop?: number;
}

/**
 * Apply repairs and refinements in a fixed order (weld, drop unreferenced,
 * orient, midpoint refinement, Loop subdivision), carrying per-vertex data
 * along. Errors are UsageErrors that say what to repair first.
 */
export function repairMesh(input: Mesh, data: Record<string, Float64Array>, o: MeshRepairs): { mesh: Mesh; vertexData: Record<string, Float64Array>; notes: string[] } {
  let mesh = input;
  let vertexData = data;
  const notes: string[] = [];
  const remap = (map: Uint32Array, n: number) => {
    const out: Record<string, Float64Array> = {};
    for (const [k, v] of Object.entries(vertexData)) {
      const d = new Float64Array(n);
      for (let i = 0; i < map.length; i++) if (map[i] < n) d[map[i]] = v[i];
      out[k] = d;
    }
    vertexData = out;
  };
  if (o.weld !== undefined) {
    const w = weldVertices(mesh, o.weld);
    mesh = w.mesh;
    remap(w.vertexMap, mesh.positions.length / 3);
    notes.push(`welded ${w.mergedVertices} vertices (tolerance ${o.weld})${w.removedTriangles ? `, removed ${w.removedTriangles} collapsed triangles` : ''}`);
  }
  if (o.dropUnreferenced) {
    const d = dropUnreferencedVertices(mesh);
    mesh = d.mesh;
    remap(d.vertexMap, mesh.positions.length / 3);
    notes.push(`dropped ${d.dropped} unreferenced vertices`);
  }
  if (o.fixOrientation) {
    const pre = validateMesh(mesh);
    if (pre.errors.length > 0) throw new UsageError(`cannot reorient a mesh with errors: ${pre.errors[0].message}`);
    const r = orientTriangles(mesh);
    mesh = r.mesh;
    notes.push(r.orientable ? `reoriented ${r.flipped} triangles` : 'the surface is not orientable; orientation left partly inconsistent');
  }
  const refine = o.refine ?? 0;
  const loop = o.loop ?? 0;
  if (refine + loop > 0) {
    const pre = validateMesh(mesh);
    if (pre.errors.length > 0) throw new UsageError(`cannot refine a mesh with errors: ${pre.errors[0].message}`);
  }
  for (let i = 0; i < refine; i++) {
    const r = refineMidpoint(mesh);
    mesh = r.mesh;
    vertexData = Object.fromEntries(Object.entries(vertexData).map(([k, v]) => [k, prolongField(v, r)]));
  }
  for (let i = 0; i < loop; i++) {
    const r = loopSubdivide(mesh);
    mesh = r.mesh;
    vertexData = Object.fromEntries(Object.entries(vertexData).map(([k, v]) => [k, prolongField(v, r)]));
  }
  if (refine) notes.push(`midpoint-refined ${refine} times`);
  if (loop) notes.push(`Loop-subdivided ${loop} times`);
  return { mesh, vertexData, notes };
}

/** Refuse meshes the FEM cannot use, listing every error and the repair to try. */
export function requireFemReady(mesh: Mesh, name: string): string[] {
  const report = validateMesh(mesh);
  if (report.errors.length > 0) {
    throw new UsageError(`${name} cannot be used for surface finite elements:\n  - ${report.errors.map((e) => e.message).join('\n  - ')}`);
  }
  return report.warnings.map((w) => w.message);
}
