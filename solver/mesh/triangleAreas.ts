import type { Mesh } from './Mesh.ts';

/**
 * Area of every triangle (flat, in the embedding): Float64Array(nF), ½‖(b−a)×(c−a)‖.
 * Pass `out` to reuse a buffer.
 */
export function triangleAreas(mesh: Mesh, out?: Float64Array): Float64Array {
  const p = mesh.positions;
  const tri = mesh.triangles;
  const nF = tri.length / 3;
  const areas = out ?? new Float64Array(nF);
  for (let t = 0; t < nF; t++) {
    const a = 3 * tri[3 * t];
    const b = 3 * tri[3 * t + 1];
    const c = 3 * tri[3 * t + 2];
    const ux = p[b] - p[a], uy = p[b + 1] - p[a + 1], uz = p[b + 2] - p[a + 2];
    const vx = p[c] - p[a], vy = p[c + 1] - p[a + 1], vz = p[c + 2] - p[a + 2];
    const cx = uy * vz - uz * vy, cy = uz * vx - ux * vz, cz = ux * vy - uy * vx;
    areas[t] = 0.5 * Math.sqrt(cx * cx + cy * cy + cz * cz);
  }
  return areas;
}

/** Area of a triangle from its side lengths: Heron's formula in Kahan's stable form (sides sorted), 0 when degenerate. */
export function areaFromSides(a: number, b: number, c: number): number {
  if (a < b) [a, b] = [b, a];
  if (b < c) [b, c] = [c, b];
  if (a < b) [a, b] = [b, a];
  const s = (a + (b + c)) * (c - (a - b)) * (c + (a - b)) * (a + (b - c));
  return s > 0 ? 0.25 * Math.sqrt(s) : 0;
}

/** Total area of the triangle mesh (the discrete surface, not a smooth one). */
export function meshArea(mesh: Mesh): number {
  const areas = triangleAreas(mesh);
  let sum = 0;
  for (let t = 0; t < areas.length; t++) sum += areas[t];
  return sum;
}
