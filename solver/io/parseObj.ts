import { makeMesh } from '../mesh/Mesh.ts';
import { MeshFileError } from './MeshFileError.ts';
import type { ImportedMesh } from './parseMeshFile.ts';

/**
 * Wavefront OBJ: `v x y z [r g b]` vertices and `f` faces (`i`, `i/t`, `i//n`,
 * `i/t/n`, negative = relative), polygons fan-triangulated; everything else
 * (normals, texture coordinates, groups, materials) is ignored. Read here
 * rather than with a general loader because loaders for display expand faces
 * into separate vertices and round to single precision, losing the vertex order
 * and identity that per-vertex data depends on.
 */
export function parseObj(bytes: Uint8Array, name: string): ImportedMesh {
  const text = new TextDecoder().decode(bytes);
  if (text.indexOf('\u0000') >= 0) throw new MeshFileError(name, 'is binary data, not an OBJ text file');
  const pos: number[] = [];
  const col: number[] = [];
  const tri: number[] = [];
  let hasColor = true;
  let polygons = 0;
  const lines = text.split(/\r?\n/);
  const face: number[] = [];
  for (let ln = 0; ln < lines.length; ln++) {
    const line = lines[ln].trim();
    if (line === '' || line[0] === '#') continue;
    const parts = line.split(/\s+/);
    if (parts[0] === 'v') {
      if (parts.length < 4) throw new MeshFileError(name, `line ${ln + 1}: a vertex needs three coordinates, got "${line}"`);
      const x = Number(parts[1]), y = Number(parts[2]), z = Number(parts[3]);
      if (!Number.isFinite(x) || !Number.isFinite(y) || !Number.isFinite(z)) {
        throw new MeshFileError(name, `line ${ln + 1}: vertex ${pos.length / 3 + 1} has a coordinate that is not a finite number: "${line}"`);
      }
      pos.push(x, y, z);
      if (parts.length >= 7) col.push(Number(parts[4]), Number(parts[5]), Number(parts[6]));
      else hasColor = false;
    } else if (parts[0] === 'f') {
      face.length = 0;
      for (let k = 1; k < parts.length; k++) {
        const idx = parseInt(parts[k].split('/')[0], 10);
        const nv = pos.length / 3;
        const v = idx < 0 ? nv + idx : idx - 1;
        if (!Number.isInteger(idx) || idx === 0 || v < 0) {
          throw new MeshFileError(name, `line ${ln + 1}: face corner "${parts[k]}" is not a valid vertex index`);
        }
        face.push(v);
      }
      if (face.length < 3) throw new MeshFileError(name, `line ${ln + 1}: a face needs at least three corners, got "${line}"`);
      if (face.length > 3) polygons++;
      for (let k = 1; k + 1 < face.length; k++) tri.push(face[0], face[k], face[k + 1]);
    }
  }
  const nV = pos.length / 3;
  for (let c = 0; c < tri.length; c++) {
    if (tri[c] >= nV) {
      throw new MeshFileError(name, `face ${Math.floor(c / 3) + 1} uses vertex ${tri[c] + 1}, but the file defines only ${nV} vertices`);
    }
  }
  if (nV === 0 && tri.length === 0) throw new MeshFileError(name, 'holds no vertices and no faces: it is not an OBJ mesh');
  if (tri.length === 0) throw new MeshFileError(name, `holds ${nV} vertices but no faces (a point cloud, not a surface)`);
  const vertexData: Record<string, Float64Array> = {};
  if (hasColor && col.length === pos.length && nV > 0) {
    vertexData.red = Float64Array.from({ length: nV }, (_, i) => col[3 * i]);
    vertexData.green = Float64Array.from({ length: nV }, (_, i) => col[3 * i + 1]);
    vertexData.blue = Float64Array.from({ length: nV }, (_, i) => col[3 * i + 2]);
  }
  const notes = polygons > 0 ? [`triangulated ${polygons} polygons with more than three corners`] : [];
  return { mesh: makeMesh(Float64Array.from(pos), Uint32Array.from(tri)), format: 'obj', vertexData, notes };
}
