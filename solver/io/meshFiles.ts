import { readFileSync, writeFileSync, existsSync, renameSync } from 'node:fs';
import { basename } from 'node:path';
import type { Mesh } from '../mesh/Mesh.ts';
import { formatFromName, MeshFileError } from './MeshFileError.ts';
import { parseMeshFile, type ImportedMesh } from './parseMeshFile.ts';
import { writePly, type PlyWriteOptions } from './writePly.ts';
import { writeObj } from './writeObj.ts';
import { writeStl } from './writeStl.ts';
import { writeOff } from './writeOff.ts';

/** Read a mesh file from disk (Node only); errors name the file. */
export function loadMeshFile(path: string): ImportedMesh {
  let bytes: Uint8Array;
  try {
    bytes = readFileSync(path);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    const why = code === 'ENOENT' ? 'no such file' : code === 'EISDIR' ? 'is a directory, not a mesh file' : (e as Error).message;
    throw new MeshFileError(path, why);
  }
  return parseMeshFile(bytes, path);
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
 * existing file unless `force`.
 */
export function writeFileAtomic(path: string, bytes: Uint8Array | string, force = false): void {
  if (!force && existsSync(path)) {
    throw new MeshFileError(path, 'already exists; pass --force to overwrite it');
  }
  const tmp = `${path}.${process.pid}.tmp`;
  writeFileSync(tmp, bytes);
  renameSync(tmp, path);
}

export function saveMeshFile(path: string, mesh: Mesh, options: PlyWriteOptions & { force?: boolean } = {}): void {
  writeFileAtomic(path, encodeMesh(mesh, basename(path), options), options.force);
}
