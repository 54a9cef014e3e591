import { basename } from 'node:path';
import type { Mesh } from '../mesh/Mesh.ts';
import { formatFromName, MeshFileError } from './MeshFileError.ts';
import { readMesh, type ImportedMesh } from './parseMeshFile.ts';
import { fileByteSource, regularFileSize, writeFileAtomic as writeAtomic } from './fileAccess.ts';
import { MESH_FILE_MAX_BYTES } from '../defaults.ts';
import { writePly, type PlyWriteOptions } from './writePly.ts';
import { writeObj } from './writeObj.ts';
import { writeStl } from './writeStl.ts';
import { writeOff } from './writeOff.ts';

/**
 * Read a mesh file from disk (Node only): a regular file of at most
 * MESH_FILE_MAX_BYTES, read piece by piece (text formats line by line), so
 * memory stays near the size of the mesh itself. Errors name the file.
 */
export function loadMeshFile(path: string): ImportedMesh {
  regularFileSize(path, 'mesh file', MESH_FILE_MAX_BYTES, (m) => new MeshFileError(path, m.slice(path.length + 2)));
  const source = fileByteSource(path);
  try {
    return readMesh(source);
  } finally {
    source.close();
  }
}

/** Encode a mesh in the format its file name's extension names. */
export function encodeMesh(mesh: Mesh, name: string, ply: PlyWriteOptions = {}): Uint8Array {
  const format = formatFromName(name);
  switch (format) {
    case 'ply': return writePly(mesh, ply);
    case 'obj': return writeObj(mesh, { colors: ply.colors });
    case 'stl': return writeStl(mesh);
    case 'off': return writeOff(mesh);
    default:
      throw new MeshFileError(name, 'unknown mesh extension: write .ply, .obj, .stl or .off');
  }
}

/**
 * Write bytes atomically (temporary file, then rename), refusing to replace an
 * existing file unless `force`; a failed write names the file and the cause.
 */
export function writeFileAtomic(path: string, bytes: Uint8Array | string, force = false): void {
  writeAtomic(path, bytes, force, (m) => new MeshFileError(path, m.slice(path.length + 2)));
}

export function saveMeshFile(path: string, mesh: Mesh, options: PlyWriteOptions & { force?: boolean } = {}): void {
  writeFileAtomic(path, encodeMesh(mesh, basename(path), options), options.force);
}
