/** A mesh file that cannot be read or written: the message names the file and the problem. */
export class MeshFileError extends Error {
  readonly file: string;
  constructor(file: string, problem: string) {
    super(`${file}: ${problem}`);
    this.name = 'MeshFileError';
    this.file = file;
  }
}

export type MeshFormat = 'ply' | 'obj' | 'stl' | 'off';
export const MESH_FORMATS: readonly MeshFormat[] = ['ply', 'obj', 'stl', 'off'];

/** Format from a file name's extension, or null. */
export function formatFromName(name: string): MeshFormat | null {
  const m = /\.([a-z0-9]+)$/i.exec(name);
  if (!m) return null;
  const ext = m[1].toLowerCase();
  return (MESH_FORMATS as readonly string[]).includes(ext) ? (ext as MeshFormat) : null;
}
