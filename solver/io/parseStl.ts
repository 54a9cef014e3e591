import { STLLoader } from 'three/examples/jsm/loaders/STLLoader.js';
import { makeMesh } from '../mesh/Mesh.ts';
import { weldVertices } from '../mesh/weldVertices.ts';
import { MeshFileError } from './MeshFileError.ts';
import type { ImportedMesh } from './parseMeshFile.ts';

/**
 * STL, ASCII or binary, read with three.js's STLLoader. STL stores every
 * triangle with its own three corners, so identical corners are welded into
 * shared vertices (otherwise the surface would fall apart into triangles).
 */
export function parseStl(bytes: Uint8Array, name: string): ImportedMesh {
  if (bytes.length < 15) throw new MeshFileError(name, `is only ${bytes.length} bytes long: not an STL file`);
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const declared = bytes.length >= 84 ? view.getUint32(80, true) : -1;
  const binaryMatch = declared >= 0 && 84 + 50 * declared === bytes.length;
  const head = new TextDecoder('latin1').decode(bytes.subarray(0, Math.min(bytes.length, 512))).trimStart();
  const ascii = !binaryMatch && head.startsWith('solid');
  if (!binaryMatch && !ascii) {
    if (declared >= 0) {
      throw new MeshFileError(name, `binary STL header declares ${declared} triangles (${84 + 50 * declared} bytes) but the file has ${bytes.length} bytes: it is truncated or not an STL file`);
    }
    throw new MeshFileError(name, 'is neither ASCII STL (starting with "solid") nor binary STL');
  }
  if (ascii) {
    const text = new TextDecoder().decode(bytes);
    if (!/endsolid/.test(text)) throw new MeshFileError(name, 'ASCII STL ends before "endsolid": the file is truncated');
    if (!/facet/.test(text)) throw new MeshFileError(name, 'ASCII STL holds no facets (no triangles)');
  }
  let geometry;
  try {
    const buf = bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength) as ArrayBuffer;
    geometry = new STLLoader().parse(buf);
  } catch (e) {
    throw new MeshFileError(name, `could not be parsed as STL (${(e as Error).message})`);
  }
  const pos = geometry.getAttribute('position');
  if (!pos || pos.count === 0) throw new MeshFileError(name, 'holds no triangles');
  if (pos.count % 3 !== 0) throw new MeshFileError(name, `ASCII STL facet ${Math.floor(pos.count / 3)} does not have three vertices`);
  const positions = new Float64Array(pos.array as ArrayLike<number>);
  for (let i = 0; i < positions.length; i++) {
    if (!Number.isFinite(positions[i])) throw new MeshFileError(name, `triangle ${Math.floor(i / 9)} has a coordinate that is not a finite number`);
  }
  const triangles = new Uint32Array(pos.count);
  for (let i = 0; i < triangles.length; i++) triangles[i] = i;
  const welded = weldVertices(makeMesh(positions, triangles), 0);
  const notes = [`welded ${pos.count} triangle corners into ${welded.mesh.positions.length / 3} shared vertices`];
  if (welded.removedTriangles > 0) notes.push(`dropped ${welded.removedTriangles} triangles with two identical corners`);
  return { mesh: welded.mesh, format: 'stl', vertexData: {}, notes };
}
