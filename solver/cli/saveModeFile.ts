import type { Mesh } from '../mesh/Mesh.ts';
import { saveMeshFile } from '../io/meshFiles.ts';
import { colorizeField } from '../io/colormap.ts';

/**
 * Write an eigenmode as a PLY painted with the diverging colormap over the
 * symmetric range [−max|φ|, max|φ|] (white at zero), with φ as the `mode` property.
 */
export function saveModeFile(path: string, mesh: Mesh, phi: Float64Array, options: { force?: boolean; comments?: string[] } = {}): void {
  let amax = 0;
  for (let i = 0; i < phi.length; i++) amax = Math.max(amax, Math.abs(phi[i]));
  const colors = colorizeField(phi, 'diverging', [-amax || -1, amax || 1]);
  saveMeshFile(path, mesh, { colors, properties: { mode: phi }, force: options.force, comments: options.comments });
}
