import { SHAPES, buildShape } from '../../meshes/shapes/index.ts';
import type { Mesh } from '../mesh/Mesh.ts';
import type { MeshSpec } from './Scenario.ts';
import type { LoadedMesh } from './resolveScenario.ts';
import { repairMesh } from '../mesh/repairMesh.ts';
import { validateMesh } from '../mesh/validateMesh.ts';
import { LOCALITY_WINDOW, scatteredEdgeFraction } from '../mesh/localityOrder.ts';
import { SCATTERED_ORDER_FRACTION, SCATTERED_ORDER_VERTICES } from '../defaults.ts';

/** A mesh file's contents, however the environment reads it (a path in Node, an opened file in the browser). */
export interface MeshFileContents {
  mesh: Mesh;
  vertexData: Record<string, Float64Array>;
  notes: string[];
  /** what the record says the mesh came from */
  source: Record<string, unknown>;
}

/**
 * The mesh of a scenario: a built-in shape, or a file read by `readFile`;
 * then the scenario's repairs and refinements; refused (with every error)
 * if surface finite elements cannot use it. Shared by the command line and
 * the viewer, so both build exactly the same mesh from the same scenario.
 */
export function scenarioMesh(spec: MeshSpec, readFile: (file: string) => MeshFileContents): LoadedMesh {
  let mesh: Mesh;
  let vertexData: Record<string, Float64Array> = {};
  const notes: string[] = [];
  let source: Record<string, unknown>;
  if (spec.shape !== undefined) {
    if (!Object.hasOwn(SHAPES, spec.shape)) throw new Error(`unknown shape "${spec.shape}"; built-in shapes: ${Object.keys(SHAPES).join(', ')}`);
    const built = buildShape({ shape: spec.shape, params: spec.params, vertices: spec.vertices });
    mesh = built.mesh;
    source = { shape: spec.shape, params: built.params, vertices: built.vertices };
  } else {
    if (spec.params || spec.vertices !== undefined) throw new Error('params and vertices apply to built-in shapes, not to mesh files (use refine or loop to refine a file)');
    const read = readFile(spec.file!);
    mesh = read.mesh;
    vertexData = read.vertexData;
    notes.push(...read.notes);
    source = read.source;
  }
  if (spec.scale !== undefined && spec.scale !== 1) mesh = scaleMesh(mesh, spec.scale);
  if (typeof spec.remesh === 'object' && spec.remesh.vertices !== undefined && spec.remesh.edge !== undefined) throw new Error('remesh: give vertices (a count) or edge (a length), not both');
  const weld = spec.weld === undefined || spec.weld === false ? undefined : spec.weld === true ? 0 : spec.weld;
  const repaired = repairMesh(mesh, vertexData, { weld, dropUnreferenced: spec.dropUnreferenced, fixOrientation: spec.fixOrientation, refine: spec.refine, loop: spec.loop, reorder: spec.reorder, remesh: spec.remesh === true ? {} : spec.remesh || undefined, fillHoles: spec.fillHoles, smooth: spec.smooth });
  const report = validateMesh(repaired.mesh);
  if (report.errors.length) {
    throw new Error(`the mesh cannot be used for surface finite elements: ${report.errors.map((e) => e.message).join('; ')}`);
  }
  notes.push(...repaired.notes, ...report.warnings.map((w) => w.message));
  const scattered = repaired.mesh.positions.length / 3 >= SCATTERED_ORDER_VERTICES && !spec.reorder ? scatteredEdgeFraction(repaired.mesh) : 0;
  if (scattered > SCATTERED_ORDER_FRACTION) {
    notes.push(`the vertex order is scattered (${Math.round(100 * scattered)} % of edges join vertices more than ${LOCALITY_WINDOW} apart), which makes stepping up to 3× slower and threads gain little: add reorder: true to the mesh section (vertex numbers in the outputs then follow the new order), or renumber the file once with placode mesh ${spec.file ?? 'FILE'} --reorder -o NEW.ply`);
  }
  for (const k of ['weld', 'fixOrientation', 'dropUnreferenced', 'refine', 'loop', 'reorder', 'remesh', 'fillHoles', 'smooth', 'scale', 'units'] as const) if (spec[k] !== undefined) source[k] = spec[k];
  return { mesh: repaired.mesh, vertexData: repaired.vertexData, source, notes };
}

/** The mesh with every coordinate multiplied by `scale` (a change of length unit). */
export function scaleMesh(mesh: Mesh, scale: number): Mesh {
  const positions = new Float64Array(mesh.positions.length);
  for (let i = 0; i < positions.length; i++) positions[i] = mesh.positions[i] * scale;
  return { positions, triangles: mesh.triangles };
}
