import type { Mesh } from '../mesh/Mesh.ts';

/**
 * Lumped (row-sum) P1 mass: the barycentric dual area of each vertex, one third
 * of the area of every incident triangle. Contract: Float64Array(nV), the
 * diagonal of a diagonal matrix, Σ = mesh area, scales with the square of a
 * uniform scaling. Equals the row sums of `consistentMass`.
 */
export function lumpedMass(mesh: Mesh, out?: Float64Array): Float64Array {
  const p = mesh.positions;
  const tri = mesh.triangles;
  const m = out ?? new Float64Array(p.length / 3);
  m.fill(0);
  for (let t = 0; t < tri.length; t += 3) {
    const i0 = tri[t], i1 = tri[t + 1], i2 = tri[t + 2];
    const a = 3 * i0, b = 3 * i1, c = 3 * i2;
    const ux = p[b] - p[a], uy = p[b + 1] - p[a + 1], uz = p[b + 2] - p[a + 2];
    const vx = p[c] - p[a], vy = p[c + 1] - p[a + 1], vz = p[c + 2] - p[a + 2];
    const cx = uy * vz - uz * vy, cy = uz * vx - ux * vz, cz = ux * vy - uy * vx;
    const third = Math.sqrt(cx * cx + cy * cy + cz * cz) / 6;
    m[i0] += third;
    m[i1] += third;
    m[i2] += third;
  }
  return m;
}
