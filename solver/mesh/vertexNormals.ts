import type { Mesh } from './Mesh.ts';

/**
 * Unit vertex normals, Float64Array(3·nV): the area-weighted sum of the incident
 * triangles' normals (outward on a consistently counter-clockwise mesh), normalised.
 * A vertex no triangle uses gets (0, 0, 0).
 */
export function vertexNormals(mesh: Mesh, out?: Float64Array): Float64Array {
  const p = mesh.positions;
  const tri = mesh.triangles;
  const n = out ?? new Float64Array(p.length);
  n.fill(0);
  for (let t = 0; t < tri.length; t += 3) {
    const a = 3 * tri[t], b = 3 * tri[t + 1], c = 3 * tri[t + 2];
    const ux = p[b] - p[a], uy = p[b + 1] - p[a + 1], uz = p[b + 2] - p[a + 2];
    const vx = p[c] - p[a], vy = p[c + 1] - p[a + 1], vz = p[c + 2] - p[a + 2];
    const cx = uy * vz - uz * vy, cy = uz * vx - ux * vz, cz = ux * vy - uy * vx;
    n[a] += cx; n[a + 1] += cy; n[a + 2] += cz;
    n[b] += cx; n[b + 1] += cy; n[b + 2] += cz;
    n[c] += cx; n[c + 1] += cy; n[c + 2] += cz;
  }
  for (let i = 0; i < n.length; i += 3) {
    const l = Math.sqrt(n[i] * n[i] + n[i + 1] * n[i + 1] + n[i + 2] * n[i + 2]);
    if (l > 0) { n[i] /= l; n[i + 1] /= l; n[i + 2] /= l; }
  }
  return n;
}
