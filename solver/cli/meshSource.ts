import { existsSync } from 'node:fs';
import { SHAPES, buildShape } from '../../meshes/shapes/index.ts';
import type { Mesh } from '../mesh/Mesh.ts';
import { repairMesh as repairMeshPure, type MeshRepairs } from '../mesh/repairMesh.ts';
import { validateMesh } from '../mesh/validateMesh.ts';
import { UsageError } from '../UsageError.ts';
import { scaleMesh } from '../scenario/scenarioMesh.ts';
import { parseCount, parseParams } from './options.ts';

export interface MeshSourceOptions {
  param?: string[];
  vertices?: string;
  weld?: string | boolean;
  fixOrientation?: boolean;
  dropUnreferenced?: boolean;
  refine?: string;
  loop?: string;
  reorder?: boolean;
  scale?: string;
  units?: string;
  remesh?: string | boolean;
  edge?: string;
  crease?: string;
  fillHoles?: string;
  smooth?: string;
}

export interface ResolvedMesh {
  mesh: Mesh;
  /** how the mesh was made, for records and messages */
  source: { kind: 'shape'; shape: string; params: Record<string, number>; vertices: number } | { kind: 'file'; path: string };
  vertexData: Record<string, Float64Array>;
  notes: string[];
}

/**
 * A built-in shape name or a mesh file path, with the requested repairs and
 * refinements. The file readers (and three.js behind them) load only when a
 * file is given.
 */
export async function resolveMesh(spec: string, o: MeshSourceOptions): Promise<ResolvedMesh> {
  let mesh: Mesh;
  let source: ResolvedMesh['source'];
  let vertexData: Record<string, Float64Array> = {};
  const notes: string[] = [];
  if (Object.hasOwn(SHAPES, spec)) {
    const vertices = parseCount(o.vertices, '--vertices', 4);
    const built = buildShape({ shape: spec, params: parseParams(o.param), vertices });
    mesh = built.mesh;
    source = { kind: 'shape', shape: spec, params: built.params, vertices: built.vertices };
  } else if (existsSync(spec)) {
    if (o.param?.length) throw new UsageError(`-p/--param sets shape parameters, but "${spec}" is a file`);
    if (o.vertices !== undefined) throw new UsageError(`--vertices applies to built-in shapes, but "${spec}" is a file (use --refine to refine it)`);
    const { loadMeshFile } = await import('../io/meshFiles.ts');
    const imported = loadMeshFile(spec);
    mesh = imported.mesh;
    vertexData = imported.vertexData;
    notes.push(...imported.notes);
    source = { kind: 'file', path: spec };
  } else {
    throw new UsageError(`"${spec}" is neither a built-in shape (${Object.keys(SHAPES).join(', ')}) nor an existing mesh file`);
  }
  if (o.scale !== undefined) {
    const factor = Number(o.scale);
    if (!(Number.isFinite(factor) && factor > 0)) throw new UsageError(`--scale must be a number > 0, got "${o.scale}"`);
    if (factor !== 1) mesh = scaleMesh(mesh, factor);
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
    reorder: o.reorder,
    remesh: remeshOption(o),
    fillHoles: parseCount(o.fillHoles, '--fill-holes', 3),
    smooth: parseCount(o.smooth, '--smooth', 1),
  });
  mesh = repaired.mesh;
  vertexData = repaired.vertexData;
  notes.push(...repaired.notes);
  return { mesh, source, vertexData, notes };
}

/** `repairMesh` with its errors as usage errors (they say which repair to try first). */
export function repairMesh(input: Mesh, data: Record<string, Float64Array>, o: MeshRepairs): ReturnType<typeof repairMeshPure> {
  try {
    return repairMeshPure(input, data, o);
  } catch (e) {
    throw new UsageError((e as Error).message);
  }
}

/** Refuse meshes the FEM cannot use, listing every error and the repair to try. */
export function requireFemReady(mesh: Mesh, name: string): string[] {
  const report = validateMesh(mesh);
  if (report.errors.length > 0) {
    throw new UsageError(`${name} cannot be used for surface finite elements:\n  - ${report.errors.map((e) => e.message).join('\n  - ')}`);
  }
  return report.warnings.map((w) => w.message);
}

/** --remesh [N] and --edge h as the repairs' remesh request (undefined without --remesh). */
function remeshOption(o: MeshSourceOptions): { edge?: number; vertices?: number; crease?: number } | undefined {
  if (o.edge !== undefined && !o.remesh) throw new UsageError('--edge sets the target edge length of --remesh: add --remesh');
  if (o.crease !== undefined && !o.remesh) throw new UsageError('--crease sets which creases --remesh keeps: add --remesh');
  const crease = o.crease === undefined ? undefined : Number(o.crease);
  if (crease !== undefined && !(crease > 0 && crease < 180)) throw new UsageError(`--crease must be an angle in degrees between 0 and 180, got "${o.crease}"`);
  if (!o.remesh) return undefined;
  const vertices = o.remesh === true ? undefined : parseCount(o.remesh, '--remesh', 4);
  let edge: number | undefined;
  if (o.edge !== undefined) {
    edge = Number(o.edge);
    if (!(Number.isFinite(edge) && edge > 0)) throw new UsageError(`--edge must be a length > 0, got "${o.edge}"`);
    if (vertices !== undefined) throw new UsageError('give --remesh N (a vertex count) or --edge h (a length), not both');
  }
  return { edge, vertices, crease };
}
