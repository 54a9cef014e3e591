import type { Mesh } from '../mesh/Mesh.ts';

/** ASCII OFF with full double-precision coordinates. */
export function writeOff(mesh: Mesh): Uint8Array {
  const p = mesh.positions;
  const t = mesh.triangles;
  const nV = p.length / 3, nF = t.length / 3;
  const lines = ['OFF', `${nV} ${nF} 0`];
  for (let v = 0; v < nV; v++) lines.push(`${p[3 * v]} ${p[3 * v + 1]} ${p[3 * v + 2]}`);
  for (let f = 0; f < nF; f++) lines.push(`3 ${t[3 * f]} ${t[3 * f + 1]} ${t[3 * f + 2]}`);
  return new TextEncoder().encode(lines.join('\n') + '\n');
}
