import { makeMesh } from '../mesh/Mesh.ts';
import { MeshFileError } from './MeshFileError.ts';
import type { ImportedMesh } from './parseMeshFile.ts';
import type { ByteSource } from './ByteSource.ts';
import { LineReader, tokens } from './LineReader.ts';
import { GrowableIndices, checkVertexCount, checkTriangleCount } from './meshLimits.ts';

/**
 * Object File Format (ASCII OFF): `OFF`, then `nV nF nE`, then one line per
 * vertex `x y z` and one per face `k i1 … ik [colour…]` (extra numbers after the
 * k indices are ignored); polygons are fan-triangulated; `#` starts a comment.
 * Read line by line; the declared counts are checked against the file's size
 * before anything is allocated for them.
 */
export function parseOff(source: ByteSource): ImportedMesh {
  const name = source.name;
  const reader = new LineReader(source, 0, 'OFF');
  /** the next line that is not blank or a comment, as tokens */
  const next = (): string[] | null => {
    for (let raw = reader.next(); raw !== null; raw = reader.next()) {
      const t = tokens(raw.replace(/#.*/, ''));
      if (t.length) return t;
    }
    return null;
  };
  const first = next();
  const head = first?.[0] ?? '';
  if (head !== 'OFF') {
    if (/^[A-Z]*OFF$/.test(head)) throw new MeshFileError(name, `OFF variant "${head}" is not supported; write plain OFF`);
    throw new MeshFileError(name, `does not start with the OFF keyword (found "${head.slice(0, 20)}"): not an OFF file`);
  }
  let counts = first!.slice(1);
  if (counts.length === 0) counts = next() ?? [];
  const nV = Number(counts[0]), nF = Number(counts[1]);
  if (!Number.isInteger(nV) || !Number.isInteger(nF) || nV < 0 || nF < 0) {
    throw new MeshFileError(name, `line ${reader.lineNumber}: expected "vertexCount faceCount edgeCount", got "${counts.join(' ').slice(0, 80)}"`);
  }
  // every vertex line takes at least 6 bytes ("0 0 0\n"), every face line at least 8
  if (6 * nV + 8 * nF > source.size) throw new MeshFileError(name, `declares ${nV} vertices and ${nF} faces, more than its ${source.size} bytes can hold: the file is truncated or its counts are wrong`);
  checkVertexCount(name, nV);
  const positions = new Float64Array(3 * nV);
  for (let v = 0; v < nV; v++) {
    const t = next();
    if (!t) throw new MeshFileError(name, `declares ${nV} vertices and ${nF} faces but ends after vertex ${v} (the file is truncated)`);
    for (let k = 0; k < 3; k++) {
      const x = Number(t[k]);
      if (!Number.isFinite(x)) throw new MeshFileError(name, `line ${reader.lineNumber}: vertex ${v} needs three finite coordinates, got "${t.join(' ').slice(0, 80)}"`);
      positions[3 * v + k] = x;
    }
  }
  const tri = new GrowableIndices();
  let polygons = 0;
  for (let f = 0; f < nF; f++) {
    const t = next();
    if (!t) throw new MeshFileError(name, `declares ${nV} vertices and ${nF} faces but ends after face ${f} (the file is truncated)`);
    const k = Number(t[0]);
    if (!Number.isInteger(k) || k < 3 || t.length < k + 1) {
      throw new MeshFileError(name, `line ${reader.lineNumber}: face ${f} should read "k i1 … ik" with k ≥ 3, got "${t.join(' ').slice(0, 80)}"`);
    }
    const idx: number[] = [];
    for (let c = 1; c <= k; c++) {
      const i = Number(t[c]);
      if (!Number.isInteger(i) || i < 0 || i >= nV) {
        throw new MeshFileError(name, `line ${reader.lineNumber}: face ${f} uses vertex ${t[c].slice(0, 20)}, but the file has vertices 0 to ${nV - 1}`);
      }
      idx.push(i);
    }
    if (k > 3) polygons++;
    checkTriangleCount(name, tri.length / 3 + k - 2);
    for (let c = 1; c + 1 < k; c++) tri.push3(idx[0], idx[c], idx[c + 1]);
  }
  if (tri.length === 0) throw new MeshFileError(name, `holds ${nV} vertices but no faces`);
  const notes = polygons > 0 ? [`triangulated ${polygons} polygons with more than three corners`] : [];
  return { mesh: makeMesh(positions, tri.array()), format: 'off', vertexData: {}, notes };
}
