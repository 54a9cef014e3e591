import { makeMesh } from '../mesh/Mesh.ts';
import { MeshFileError } from './MeshFileError.ts';
import type { ImportedMesh } from './parseMeshFile.ts';
import type { ByteSource } from './ByteSource.ts';
import { LineReader } from './LineReader.ts';
import { GrowableFloats, GrowableIndices, checkVertexCount, checkTriangleCount } from './meshLimits.ts';

/**
 * Wavefront OBJ: `v x y z [r g b]` vertices and `f` faces (`i`, `i/t`, `i//n`,
 * `i/t/n`, negative = relative), polygons fan-triangulated; everything else
 * (normals, texture coordinates, groups, materials) is ignored. Read here
 * rather than with a general loader because loaders for display expand faces
 * into separate vertices and round to single precision, losing the vertex order
 * and identity that per-vertex data depends on. Read line by line.
 */
export function parseObj(source: ByteSource): ImportedMesh {
  const name = source.name;
  const reader = new LineReader(source, 0, 'OBJ');
  const pos = new GrowableFloats();
  const col = new GrowableFloats();
  const tri = new GrowableIndices();
  let hasColor = true;
  let polygons = 0;
  const face: number[] = [];
  for (let raw = reader.next(); raw !== null; raw = reader.next()) {
    const line = raw.trim();
    if (line === '' || line[0] === '#') continue;
    const ln = reader.lineNumber;
    const parts = line.split(/\s+/);
    if (parts[0] === 'v') {
      if (parts.length < 4) throw new MeshFileError(name, `line ${ln}: a vertex needs three coordinates, got "${line.slice(0, 80)}"`);
      const x = Number(parts[1]), y = Number(parts[2]), z = Number(parts[3]);
      if (!Number.isFinite(x) || !Number.isFinite(y) || !Number.isFinite(z)) {
        throw new MeshFileError(name, `line ${ln}: vertex ${pos.length / 3 + 1} has a coordinate that is not a finite number: "${line.slice(0, 80)}"`);
      }
      checkVertexCount(name, pos.length / 3 + 1);
      pos.push3(x, y, z);
      if (parts.length >= 7) col.push3(Number(parts[4]), Number(parts[5]), Number(parts[6]));
      else hasColor = false;
    } else if (parts[0] === 'f') {
      face.length = 0;
      const nv = pos.length / 3;
      for (let k = 1; k < parts.length; k++) {
        const idx = parseInt(parts[k].split('/')[0], 10);
        const v = idx < 0 ? nv + idx : idx - 1;
        if (!Number.isInteger(idx) || idx === 0 || v < 0) {
          throw new MeshFileError(name, `line ${ln}: face corner "${parts[k].slice(0, 40)}" is not a valid vertex index`);
        }
        face.push(v);
      }
      if (face.length < 3) throw new MeshFileError(name, `line ${ln}: a face needs at least three corners, got "${line.slice(0, 80)}"`);
      if (face.length > 3) polygons++;
      checkTriangleCount(name, tri.length / 3 + face.length - 2);
      for (let k = 1; k + 1 < face.length; k++) tri.push3(face[0], face[k], face[k + 1]);
    }
  }
  const nV = pos.length / 3;
  const triangles = tri.array();
  for (let c = 0; c < triangles.length; c++) {
    if (triangles[c] >= nV) {
      throw new MeshFileError(name, `face ${Math.floor(c / 3) + 1} uses vertex ${triangles[c] + 1}, but the file defines only ${nV} vertices`);
    }
  }
  if (nV === 0 && triangles.length === 0) throw new MeshFileError(name, 'holds no vertices and no faces: it is not an OBJ mesh');
  if (triangles.length === 0) throw new MeshFileError(name, `holds ${nV} vertices but no faces (a point cloud, not a surface)`);
  const vertexData: Record<string, Float64Array> = {};
  const colours = col.array();
  if (hasColor && colours.length === 3 * nV && nV > 0) {
    vertexData.red = Float64Array.from({ length: nV }, (_, i) => colours[3 * i]);
    vertexData.green = Float64Array.from({ length: nV }, (_, i) => colours[3 * i + 1]);
    vertexData.blue = Float64Array.from({ length: nV }, (_, i) => colours[3 * i + 2]);
  }
  const notes = polygons > 0 ? [`triangulated ${polygons} polygons with more than three corners`] : [];
  return { mesh: makeMesh(pos.array(), triangles), format: 'obj', vertexData, notes };
}
