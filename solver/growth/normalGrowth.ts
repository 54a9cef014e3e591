import type { Mesh } from '../mesh/Mesh.ts';
import { vertexNormals } from '../mesh/vertexNormals.ts';
import type { GrowthLaw } from './GrowthLaw.ts';
import { tangentialVelocity } from './tangentialVelocity.ts';

/** Speed of vertex i at its position and time. */
export type VertexSpeed = (i: number, x: number, y: number, z: number, t: number) => number;

/**
 * Growth along the surface normal at a speed given per vertex (a formula in
 * x, y, z, t, or measured per-vertex values: a fast-growing distal tip, say).
 * With `expansion`, a local areal growth rate g, the surface also moves
 * tangentially so that area is redistributed towards where g is high (see
 * `tangentialVelocity`). Integrated with forward Euler between geometry
 * updates, normals and velocities from the current surface.
 */
export function normalGrowth(speed: VertexSpeed | undefined, description: string, expansion?: VertexSpeed): GrowthLaw {
  let normals: Float64Array | undefined;
  let tangential: Float64Array | undefined;
  const velocity = (mesh: Mesh, t: number, out: Float64Array) => {
    const p = mesh.positions;
    out.fill(0);
    if (speed) {
      normals = vertexNormals(mesh, normals && normals.length === p.length ? normals : undefined);
      for (let i = 0; i < p.length; i += 3) {
        const v = speed(i / 3, p[i], p[i + 1], p[i + 2], t);
        out[i] = v * normals[i]; out[i + 1] = v * normals[i + 1]; out[i + 2] = v * normals[i + 2];
      }
    }
    if (expansion) {
      const g = new Float64Array(p.length / 3);
      for (let i = 0; i < p.length; i += 3) g[i / 3] = expansion(i / 3, p[i], p[i + 1], p[i + 2], t);
      tangential = tangential && tangential.length === p.length ? tangential : new Float64Array(p.length);
      tangentialVelocity(mesh, g, tangential);
      for (let i = 0; i < p.length; i++) out[i] += tangential[i];
    }
  };
  let scratch: Float64Array | undefined;
  return {
    description,
    advance(mesh: Mesh, t0: number, t1: number, out: Float64Array) {
      const p = mesh.positions;
      scratch = scratch && scratch.length === p.length ? scratch : new Float64Array(p.length);
      velocity(mesh, t0, scratch);
      const h = t1 - t0;
      for (let i = 0; i < p.length; i++) out[i] = p[i] + h * scratch[i];
    },
  };
}
