import type { Mesh } from '../mesh/Mesh.ts';
import { vertexNormals } from '../mesh/vertexNormals.ts';
import type { GrowthLaw } from './GrowthLaw.ts';

/**
 * Growth along the surface normal at a speed given per vertex by
 * `speed(x, y, z, t)` (a formula in the scenario: a fast-growing distal tip,
 * say). Integrated with forward Euler between geometry updates, normals from
 * the current surface.
 */
export function normalGrowth(speed: (x: number, y: number, z: number, t: number) => number, description: string): GrowthLaw {
  let normals: Float64Array | undefined;
  return {
    description: `growth along the normal at speed ${description}`,
    advance(mesh: Mesh, t0: number, t1: number, out: Float64Array) {
      const p = mesh.positions;
      normals = vertexNormals(mesh, normals && normals.length === p.length ? normals : undefined);
      const h = t1 - t0;
      for (let i = 0; i < p.length; i += 3) {
        const v = speed(p[i], p[i + 1], p[i + 2], t0);
        out[i] = p[i] + h * v * normals[i];
        out[i + 1] = p[i + 1] + h * v * normals[i + 1];
        out[i + 2] = p[i + 2] + h * v * normals[i + 2];
      }
    },
    maxSpeed(mesh: Mesh, t0: number) {
      const p = mesh.positions;
      let m = 0;
      for (let i = 0; i < p.length; i += 3) m = Math.max(m, Math.abs(speed(p[i], p[i + 1], p[i + 2], t0)));
      return m;
    },
  };
}
