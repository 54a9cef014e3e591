import type { Mesh } from '../mesh/Mesh.ts';

/**
 * Wavefront OBJ: `v x y z` (full double precision), with `v x y z r g b` when
 * sRGB colours are given (the common per-vertex colour extension, components in
 * [0, 1]), and 1-based `f a b c`.
 */
export function writeObj(mesh: Mesh, options: { colors?: Uint8Array; comment?: string } = {}): Uint8Array {
  const p = mesh.positions;
  const t = mesh.triangles;
  const c = options.colors;
  const lines: string[] = [];
  if (options.comment) lines.push(`# ${options.comment.replace(/\n/g, ' ')}`);
  for (let v = 0; v < p.length / 3; v++) {
    let line = `v ${p[3 * v]} ${p[3 * v + 1]} ${p[3 * v + 2]}`;
    if (c) line += ` ${(c[3 * v] / 255).toFixed(6)} ${(c[3 * v + 1] / 255).toFixed(6)} ${(c[3 * v + 2] / 255).toFixed(6)}`;
    lines.push(line);
  }
  for (let f = 0; f < t.length / 3; f++) lines.push(`f ${t[3 * f] + 1} ${t[3 * f + 1] + 1} ${t[3 * f + 2] + 1}`);
  return new TextEncoder().encode(lines.join('\n') + '\n');
}
