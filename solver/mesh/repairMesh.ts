import type { Mesh } from './Mesh.ts';
import { weldVertices } from './weldVertices.ts';
import { orientTriangles } from './orientTriangles.ts';
import { dropUnreferencedVertices } from './dropUnreferencedVertices.ts';
import { refineMidpoint } from './refineMidpoint.ts';
import { loopSubdivide } from './loopSubdivide.ts';
import { prolongField } from './Refinement.ts';
import { validateMesh } from './validateMesh.ts';
import { meshTopology } from './meshTopology.ts';
import { MAX_SHAPE_VERTICES } from '../defaults.ts';
import { isotropicRemesh } from './isotropicRemesh.ts';
import { fillHoles } from './fillHoles.ts';
import { taubinSmooth } from './taubinSmooth.ts';
import { LOCALITY_WINDOW, localityOrder, renumberVertices, scatteredEdgeFraction } from './localityOrder.ts';

const percent = (x: number) => `${(100 * x).toFixed(x < 0.1 ? 1 : 0)} %`;

export interface MeshRepairs {
  /** weld vertices closer than this (0: identical only); undefined: no welding */
  weld?: number;
  dropUnreferenced?: boolean;
  fixOrientation?: boolean;
  refine?: number;
  loop?: number;
  /** close boundary loops of at most this many edges (after the repairs) */
  fillHoles?: number;
  /** Taubin λ|μ smoothing steps (after filling holes, before remeshing) */
  smooth?: number;
  /** isotropic remeshing (after the repairs, before refinement): to an edge length or a vertex count (neither: the mean edge), keeping creases sharper than `crease` degrees */
  remesh?: { edge?: number; vertices?: number; crease?: number };
  /** renumber the vertices in a locality order (last, after any refinement) */
  reorder?: boolean;
}

/** A repair or refinement that cannot be made, with the option that asked for it. */
export class MeshRepairError extends Error {
  constructor(readonly option: keyof MeshRepairs, message: string) {
    super(message);
    this.name = 'MeshRepairError';
  }
}

/**
 * Apply repairs and refinements in a fixed order (weld, drop unreferenced,
 * orient, fill holes, smooth, remesh, midpoint refinement, Loop subdivision, renumbering), carrying
 * per-vertex data along. Errors say what to repair first.
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
    if (pre.errors.length > 0) throw new MeshRepairError('fixOrientation', `cannot reorient a mesh with errors: ${pre.errors[0].message}`);
    const r = orientTriangles(mesh);
    mesh = r.mesh;
    notes.push(r.orientable ? `reoriented ${r.flipped} triangles` : 'the surface is not orientable; orientation left partly inconsistent');
  }
  if (o.fillHoles) {
    const r = fillHoles(mesh, o.fillHoles, vertexData);
    mesh = r.mesh;
    vertexData = r.vertexData;
    notes.push(r.filled.length ? `filled ${r.filled.length} hole(s) of ${r.filled.join(', ')} edges` : `no hole of at most ${o.fillHoles} edges to fill`);
    if (r.kept.length) notes.push(`left open: boundary loop(s) of ${r.kept.join(', ')} edges (more than ${o.fillHoles})`);
  }
  if (o.smooth) {
    mesh = taubinSmooth(mesh, o.smooth);
    notes.push(`smoothed by ${o.smooth} Taubin λ|μ step(s) (λ = 0.5, μ = −0.53)`);
  }
  if (o.remesh) {
    const pre = validateMesh(mesh);
    if (pre.errors.length > 0) throw new MeshRepairError('remesh', `cannot remesh a mesh with errors: ${pre.errors[0].message}; repair it first (weld, drop unreferenced vertices)`);
    if (o.remesh.vertices !== undefined && o.remesh.vertices > MAX_SHAPE_VERTICES) throw new MeshRepairError('remesh', `remeshing to ${o.remesh.vertices} vertices is more than the ${MAX_SHAPE_VERTICES} a mesh may have`);
    const before = mesh.positions.length / 3;
    const r = isotropicRemesh(mesh, { edge: o.remesh.edge, vertices: o.remesh.vertices, creaseAngle: o.remesh.crease, vertexData });
    const after = validateMesh(r.mesh);
    if (after.errors.length > 0) throw new MeshRepairError('remesh', `remeshing left a mesh the finite elements cannot use (${after.errors[0].message}); try another edge length, or clean the input where it was made`);
    mesh = r.mesh;
    vertexData = r.vertexData;
    notes.push(`remeshed isotropically (Botsch–Kobbelt) to edge ${r.edge.toPrecision(3)}: ${before} → ${mesh.positions.length / 3} vertices${Object.keys(vertexData).length ? `; per-vertex data (${Object.keys(vertexData).join(', ')}) interpolated at the new vertices` : ''}`);
  }
  const refine = o.refine ?? 0;
  const loop = o.loop ?? 0;
  if (refine + loop > 0) {
    const pre = validateMesh(mesh);
    if (pre.errors.length > 0) throw new MeshRepairError(refine ? 'refine' : 'loop', `cannot refine a mesh with errors: ${pre.errors[0].message}`);
    // every 1-to-4 step adds a vertex per edge: V' = V + E, E' = 2E + 3F, F' = 4F; refused before any work
    const topo = meshTopology(mesh);
    let v = topo.vertexCount, e = topo.edgeCount, f = topo.triangleCount;
    for (let k = 1; k <= refine + loop; k++) {
      [v, e, f] = [v + e, 2 * e + 3 * f, 4 * f];
      if (v > MAX_SHAPE_VERTICES) {
        throw new MeshRepairError(refine ? 'refine' : 'loop', `refining ${refine + loop} times would make more than ${MAX_SHAPE_VERTICES} vertices, the most a mesh may have (${k} times already make ${v} from ${topo.vertexCount}): refine fewer times or start coarser`);
      }
    }
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
  if (o.reorder) {
    const before = scatteredEdgeFraction(mesh);
    const r = renumberVertices(mesh, localityOrder(mesh));
    mesh = r.mesh;
    remap(r.vertexMap, mesh.positions.length / 3);
    notes.push(`renumbered the vertices in a locality order (reverse Cuthill–McKee): ${percent(scatteredEdgeFraction(mesh))} of edges join vertices more than ${LOCALITY_WINDOW} apart (${percent(before)} before); vertex numbers in the outputs follow the new order`);
  }
  return { mesh, vertexData, notes };
}

