import type { Mesh } from '../mesh/Mesh.ts';
import { formatFromName, MeshFileError, type MeshFormat } from './MeshFileError.ts';
import { parseObj } from './parseObj.ts';
import { parseOff } from './parseOff.ts';
import { parsePly } from './parsePly.ts';
import { parseStl } from './parseStl.ts';

export interface ImportedMesh {
  mesh: Mesh;
  format: MeshFormat;
  /** per-vertex values found in the file beyond geometry (PLY properties, OBJ colours) */
  vertexData: Record<string, Float64Array>;
  /** what the reader did to the data (welding, triangulation) */
  notes: string[];
}

/**
 * Parse mesh file contents (no file system: usable in a browser worker). The
 * format comes from the name's extension, else from the first bytes.
 */
export function parseMeshFile(bytes: Uint8Array, name: string): ImportedMesh {
  if (bytes.length === 0) throw new MeshFileError(name, 'is empty');
  const format = formatFromName(name) ?? sniffFormat(bytes);
  if (!format) {
    throw new MeshFileError(name, 'has an unknown extension and content; meshes are read from .ply, .obj, .stl or .off files');
  }
  switch (format) {
    case 'ply': return parsePly(bytes, name);
    case 'obj': return parseObj(bytes, name);
    case 'stl': return parseStl(bytes, name);
    case 'off': return parseOff(bytes, name);
  }
}

function sniffFormat(bytes: Uint8Array): MeshFormat | null {
  const head = new TextDecoder('latin1').decode(bytes.subarray(0, 256));
  if (head.startsWith('ply')) return 'ply';
  if (head.startsWith('OFF')) return 'off';
  if (head.trimStart().startsWith('solid')) return 'stl';
  if (/^\s*(#.*\n\s*)*(v|o|g|mtllib)\s/m.test(head)) return 'obj';
  if (bytes.length >= 84 && 84 + 50 * new DataView(bytes.buffer, bytes.byteOffset).getUint32(80, true) === bytes.length) return 'stl';
  return null;
}
