import type { Mesh } from '../mesh/Mesh.ts';
import { formatFromName, MeshFileError, type MeshFormat } from './MeshFileError.ts';
import { parseObj } from './parseObj.ts';
import { parseOff } from './parseOff.ts';
import { parsePly } from './parsePly.ts';
import { parseStl } from './parseStl.ts';
import { memoryByteSource, readExactly, type ByteSource } from './ByteSource.ts';

export interface ImportedMesh {
  mesh: Mesh;
  format: MeshFormat;
  /** per-vertex values found in the file beyond geometry (PLY properties, OBJ colours) */
  vertexData: Record<string, Float64Array>;
  /** what the reader did to the data (welding, triangulation) */
  notes: string[];
  /** the file's comment lines (PLY header comments) */
  comments?: string[];
}

/** Parse mesh file contents already in memory (no file system: usable in a browser worker). */
export function parseMeshFile(bytes: Uint8Array, name: string): ImportedMesh {
  return readMesh(memoryByteSource(bytes, name));
}

/**
 * Read a mesh from a byte source (a file on disk read piece by piece, or bytes
 * in memory). The format comes from the name's extension, else from the first
 * bytes. Text formats are read line by line, binary ones in bounded pieces.
 */
export function readMesh(source: ByteSource): ImportedMesh {
  const name = source.name;
  if (source.size === 0) throw new MeshFileError(name, 'is empty');
  const format = formatFromName(name) ?? sniffFormat(readExactly(source, 0, Math.min(source.size, 256), 'the first bytes'), source.size);
  if (!format) {
    throw new MeshFileError(name, 'has an unknown extension and content; meshes are read from .ply, .obj, .stl or .off files');
  }
  switch (format) {
    case 'ply': return parsePly(source);
    case 'obj': return parseObj(source);
    case 'stl': return parseStl(source);
    case 'off': return parseOff(source);
  }
}

function sniffFormat(bytes: Uint8Array, size: number): MeshFormat | null {
  const head = new TextDecoder('latin1').decode(bytes.subarray(0, 256));
  if (head.startsWith('ply')) return 'ply';
  if (head.startsWith('OFF')) return 'off';
  if (head.trimStart().startsWith('solid')) return 'stl';
  if (/^\s*(#.*\n\s*)*(v|o|g|mtllib)\s/m.test(head)) return 'obj';
  if (bytes.length >= 84 && 84 + 50 * new DataView(bytes.buffer, bytes.byteOffset).getUint32(80, true) === size) return 'stl';
  return null;
}
