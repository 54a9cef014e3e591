import type { Mesh } from '../mesh/Mesh.ts';

/** Binary STL: 80-byte header, triangle count, then per triangle a unit normal and three corners (float32). */
export function writeStl(mesh: Mesh, header = 'placode mesh'): Uint8Array {
  const p = mesh.positions;
  const t = mesh.triangles;
  const nF = t.length / 3;
  const out = new Uint8Array(84 + 50 * nF);
  out.set(new TextEncoder().encode(header.slice(0, 80)));
  const view = new DataView(out.buffer);
  view.setUint32(80, nF, true);
  let o = 84;
  for (let f = 0; f < nF; f++) {
    const a = 3 * t[3 * f], b = 3 * t[3 * f + 1], c = 3 * t[3 * f + 2];
    const ux = p[b] - p[a], uy = p[b + 1] - p[a + 1], uz = p[b + 2] - p[a + 2];
    const vx = p[c] - p[a], vy = p[c + 1] - p[a + 1], vz = p[c + 2] - p[a + 2];
    let nx = uy * vz - uz * vy, ny = uz * vx - ux * vz, nz = ux * vy - uy * vx;
    const l = Math.hypot(nx, ny, nz) || 1;
    nx /= l; ny /= l; nz /= l;
    view.setFloat32(o, nx, true); view.setFloat32(o + 4, ny, true); view.setFloat32(o + 8, nz, true);
    o += 12;
    for (const v of [a, b, c]) {
      view.setFloat32(o, p[v], true); view.setFloat32(o + 4, p[v + 1], true); view.setFloat32(o + 8, p[v + 2], true);
      o += 12;
    }
    o += 2;
  }
  return out;
}
