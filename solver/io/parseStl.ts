import { makeMesh } from '../mesh/Mesh.ts';
import { weldVertices } from '../mesh/weldVertices.ts';
import { MeshFileError } from './MeshFileError.ts';
import type { ImportedMesh } from './parseMeshFile.ts';
import { readExactly, type ByteSource } from './ByteSource.ts';
import { LineReader, tokens } from './LineReader.ts';
import { GrowableFloats, checkTriangleCount } from './meshLimits.ts';

/**
 * STL, ASCII or binary. STL stores every triangle with its own three corners,
 * so identical corners are welded into shared vertices (otherwise the surface
 * would fall apart into triangles). Binary: 80-byte header, a triangle count,
 * 50 bytes per triangle (normal, three corners as float32, attribute count);
 * ASCII: `facet … outer loop, vertex x y z ×3, endloop, endfacet`, read line by line.
 */
export function parseStl(source: ByteSource): ImportedMesh {
  const name = source.name;
  if (source.size < 15) throw new MeshFileError(name, `is only ${source.size} bytes long: not an STL file`);
  const head = readExactly(source, 0, Math.min(source.size, 512), 'the STL header');
  const declared = source.size >= 84 ? new DataView(head.buffer).getUint32(80, true) : -1;
  const binaryMatch = declared >= 0 && 84 + 50 * declared === source.size;
  const ascii = !binaryMatch && new TextDecoder('latin1').decode(head).trimStart().startsWith('solid');
  if (!binaryMatch && !ascii) {
    if (declared >= 0) {
      throw new MeshFileError(name, `binary STL header declares ${declared} triangles (${84 + 50 * declared} bytes) but the file has ${source.size} bytes: it is truncated or not an STL file`);
    }
    throw new MeshFileError(name, 'is neither ASCII STL (starting with "solid") nor binary STL');
  }
  const corners = ascii ? readAsciiCorners(source) : readBinaryCorners(source, declared);
  const count = corners.length / 3;
  if (count === 0) throw new MeshFileError(name, 'holds no triangles');
  const triangles = new Uint32Array(count);
  for (let i = 0; i < count; i++) triangles[i] = i;
  const welded = weldVertices(makeMesh(corners, triangles), 0);
  const notes = [`welded ${count} triangle corners into ${welded.mesh.positions.length / 3} shared vertices`];
  if (welded.removedTriangles > 0) notes.push(`dropped ${welded.removedTriangles} triangles with two identical corners`);
  return { mesh: welded.mesh, format: 'stl', vertexData: {}, notes };
}

function readBinaryCorners(source: ByteSource, count: number): Float64Array {
  checkTriangleCount(source.name, count);
  const out = new Float64Array(9 * count);
  const perChunk = 20_000;
  for (let t0 = 0; t0 < count; t0 += perChunk) {
    const n = Math.min(perChunk, count - t0);
    const bytes = readExactly(source, 84 + 50 * t0, 50 * n, `triangle ${t0}`);
    const view = new DataView(bytes.buffer);
    for (let t = 0; t < n; t++) {
      for (let k = 0; k < 9; k++) {
        const x = view.getFloat32(50 * t + 12 + 4 * k, true);
        if (!Number.isFinite(x)) throw new MeshFileError(source.name, `triangle ${t0 + t} has a coordinate that is not a finite number`);
        out[9 * (t0 + t) + k] = x;
      }
    }
  }
  return out;
}

function readAsciiCorners(source: ByteSource): Float64Array {
  const reader = new LineReader(source, 0, 'ASCII STL');
  const out = new GrowableFloats();
  let inFacet = 0, ended = false, facets = 0;
  for (let raw = reader.next(); raw !== null; raw = reader.next()) {
    const t = tokens(raw);
    if (!t.length) continue;
    switch (t[0]) {
      case 'facet':
        inFacet = 0;
        facets++;
        break;
      case 'vertex': {
        if (t.length < 4) throw new MeshFileError(source.name, `line ${reader.lineNumber}: a vertex needs three coordinates`);
        const x = Number(t[1]), y = Number(t[2]), z = Number(t[3]);
        if (!Number.isFinite(x) || !Number.isFinite(y) || !Number.isFinite(z)) throw new MeshFileError(source.name, `line ${reader.lineNumber}: a vertex coordinate is not a finite number`);
        // ASCII STL is read as single precision, as binary STL stores it
        out.push3(Math.fround(x), Math.fround(y), Math.fround(z));
        inFacet++;
        break;
      }
      case 'endfacet':
        if (inFacet !== 3) throw new MeshFileError(source.name, `line ${reader.lineNumber}: facet ${facets - 1} has ${inFacet} vertices; a facet needs three`);
        checkTriangleCount(source.name, facets);
        break;
      case 'endsolid':
        ended = true;
        break;
    }
  }
  if (!ended) throw new MeshFileError(source.name, 'ASCII STL ends before "endsolid": the file is truncated');
  if (facets === 0) throw new MeshFileError(source.name, 'ASCII STL holds no facets (no triangles)');
  return out.array();
}
