import { createHash } from 'node:crypto';
import type { Mesh } from '../mesh/Mesh.ts';

/** sha256 of a mesh's positions and triangles, as stored (for records and resume checks). Node only. */
export function meshChecksum(mesh: Mesh): string {
  const h = createHash('sha256');
  h.update(new Uint8Array(mesh.positions.buffer, mesh.positions.byteOffset, mesh.positions.byteLength));
  h.update(new Uint8Array(mesh.triangles.buffer, mesh.triangles.byteOffset, mesh.triangles.byteLength));
  return `sha256:${h.digest('hex')}`;
}

/** sha256 of a scenario's text, as a saved state records it (resume checks the state belongs to the run). */
export function textChecksum(text: string): string {
  return `sha256:${createHash('sha256').update(text).digest('hex')}`;
}
