import { makeMesh } from '../mesh/Mesh.ts';
import { MeshFileError } from './MeshFileError.ts';
import type { ImportedMesh } from './parseMeshFile.ts';

/**
 * Object File Format (ASCII OFF): `OFF`, then `nV nF nE`, then one line per
 * vertex `x y z` and one per face `k i1 … ik [colour…]` (extra numbers after the
 * k indices are ignored); polygons are fan-triangulated; `#` starts a comment.
 */
export function parseOff(bytes: Uint8Array, name: string): ImportedMesh {
  const text = new TextDecoder().decode(bytes);
  const lines: { no: number; tokens: string[] }[] = [];
  text.split(/\r?\n/).forEach((raw, i) => {
    const line = raw.replace(/#.*/, '').trim();
    if (line) lines.push({ no: i + 1, tokens: line.split(/\s+/) });
  });
  if (lines.length === 0 || lines[0].tokens[0] !== 'OFF') {
    const head = lines[0]?.tokens[0] ?? '';
    if (/^[A-Z]*OFF$/.test(head)) throw new MeshFileError(name, `OFF variant "${head}" is not supported; write plain OFF`);
    throw new MeshFileError(name, `does not start with the OFF keyword (found "${head.slice(0, 20)}"): not an OFF file`);
  }
  let li = 0;
  let counts = lines[0].tokens.slice(1);
  if (counts.length === 0) counts = lines[++li]?.tokens ?? [];
  const nV = Number(counts[0]), nF = Number(counts[1]);
  if (!Number.isInteger(nV) || !Number.isInteger(nF) || nV < 0 || nF < 0) {
    throw new MeshFileError(name, `line ${lines[li]?.no ?? 1}: expected "vertexCount faceCount edgeCount", got "${counts.join(' ')}"`);
  }
  li++;
  if (lines.length - li < nV + nF) {
    throw new MeshFileError(name, `declares ${nV} vertices and ${nF} faces but has only ${lines.length - li} data lines (the file is truncated)`);
  }
  const positions = new Float64Array(3 * nV);
  for (let v = 0; v < nV; v++, li++) {
    const { no, tokens } = lines[li];
    for (let k = 0; k < 3; k++) {
      const x = Number(tokens[k]);
      if (!Number.isFinite(x)) throw new MeshFileError(name, `line ${no}: vertex ${v} needs three finite coordinates, got "${tokens.join(' ')}"`);
      positions[3 * v + k] = x;
    }
  }
  const tri: number[] = [];
  let polygons = 0;
  for (let f = 0; f < nF; f++, li++) {
    const { no, tokens } = lines[li];
    const k = Number(tokens[0]);
    if (!Number.isInteger(k) || k < 3 || tokens.length < k + 1) {
      throw new MeshFileError(name, `line ${no}: face ${f} should read "k i1 … ik" with k ≥ 3, got "${tokens.join(' ')}"`);
    }
    const idx: number[] = [];
    for (let c = 1; c <= k; c++) {
      const i = Number(tokens[c]);
      if (!Number.isInteger(i) || i < 0 || i >= nV) {
        throw new MeshFileError(name, `line ${no}: face ${f} uses vertex ${tokens[c]}, but the file has vertices 0 to ${nV - 1}`);
      }
      idx.push(i);
    }
    if (k > 3) polygons++;
    for (let c = 1; c + 1 < k; c++) tri.push(idx[0], idx[c], idx[c + 1]);
  }
  if (tri.length === 0) throw new MeshFileError(name, `holds ${nV} vertices but no faces`);
  const notes = polygons > 0 ? [`triangulated ${polygons} polygons with more than three corners`] : [];
  return { mesh: makeMesh(positions, Uint32Array.from(tri)), format: 'off', vertexData: {}, notes };
}
