import { PLYLoader } from 'three/examples/jsm/loaders/PLYLoader.js';
import { makeMesh } from '../mesh/Mesh.ts';
import { MeshFileError } from './MeshFileError.ts';
import type { ImportedMesh } from './parseMeshFile.ts';

const TYPE_SIZE: Record<string, number> = {
  char: 1, uchar: 1, int8: 1, uint8: 1, short: 2, ushort: 2, int16: 2, uint16: 2,
  int: 4, uint: 4, int32: 4, uint32: 4, float: 4, float32: 4, double: 8, float64: 8,
};
/** properties three.js's loader reads itself */
const STANDARD = new Set(['x', 'y', 'z', 'nx', 'ny', 'nz', 's', 't', 'u', 'v', 'red', 'green', 'blue', 'alpha']);

interface PlyHeader {
  format: 'ascii' | 'binary_little_endian' | 'binary_big_endian';
  headerBytes: number;
  elements: { name: string; count: number; props: { name: string; type: string; list?: [string, string] }[] }[];
}

/** Read and check the PLY header (Turk's format description), without the data. */
export function parsePlyHeader(bytes: Uint8Array, name: string): PlyHeader {
  const probe = new TextDecoder('latin1').decode(bytes.subarray(0, Math.min(bytes.length, 65536)));
  if (!probe.startsWith('ply')) throw new MeshFileError(name, 'does not start with "ply": not a PLY file');
  const end = probe.search(/end_header\r?\n/);
  if (end < 0) throw new MeshFileError(name, 'has no "end_header" line: the PLY header is incomplete or the file is truncated');
  const headerBytes = end + probe.slice(end).indexOf('\n') + 1;
  const lines = probe.slice(0, end).split(/\r?\n/);
  let format: PlyHeader['format'] | null = null;
  const elements: PlyHeader['elements'] = [];
  for (let i = 1; i < lines.length; i++) {
    const t = lines[i].trim().split(/\s+/);
    if (t[0] === 'format') {
      if (t[1] !== 'ascii' && t[1] !== 'binary_little_endian' && t[1] !== 'binary_big_endian') {
        throw new MeshFileError(name, `line ${i + 1}: unknown PLY format "${t[1]}"`);
      }
      format = t[1];
    } else if (t[0] === 'element') {
      const count = Number(t[2]);
      if (!Number.isInteger(count) || count < 0) throw new MeshFileError(name, `line ${i + 1}: element "${t[1]}" has an invalid count "${t[2]}"`);
      elements.push({ name: t[1], count, props: [] });
    } else if (t[0] === 'property') {
      const el = elements[elements.length - 1];
      if (!el) throw new MeshFileError(name, `line ${i + 1}: property before any element`);
      if (t[1] === 'list') {
        if (!TYPE_SIZE[t[2]] || !TYPE_SIZE[t[3]]) throw new MeshFileError(name, `line ${i + 1}: unknown list type "${t[2]} ${t[3]}"`);
        el.props.push({ name: t[4], type: 'list', list: [t[2], t[3]] });
      } else {
        if (!TYPE_SIZE[t[1]]) throw new MeshFileError(name, `line ${i + 1}: unknown property type "${t[1]}"`);
        el.props.push({ name: t[2], type: t[1] });
      }
    }
  }
  if (!format) throw new MeshFileError(name, 'has no "format" line in its header');
  return { format, headerBytes, elements };
}

/**
 * PLY, ASCII or binary (either byte order), read with three.js's PLYLoader after
 * checking the header and the data length ourselves, so truncated files get a
 * clear error. Scalar vertex properties other than position, normal, texture
 * coordinates and colour come back as per-vertex data (e.g. a morphogen field).
 * Coordinates pass through single precision (three.js stores them as float32).
 */
export function parsePly(bytes: Uint8Array, name: string): ImportedMesh {
  const header = parsePlyHeader(bytes, name);
  const vertexEl = header.elements.find((e) => e.name === 'vertex');
  const faceEl = header.elements.find((e) => e.name === 'face');
  if (!vertexEl) throw new MeshFileError(name, 'declares no "vertex" element');
  for (const c of ['x', 'y', 'z']) {
    if (!vertexEl.props.some((p) => p.name === c)) throw new MeshFileError(name, `vertex element has no "${c}" property`);
  }
  if (!faceEl || faceEl.count === 0) throw new MeshFileError(name, `holds ${vertexEl.count} vertices but no faces (a point cloud, not a surface)`);
  const body = bytes.length - header.headerBytes;
  if (header.format === 'ascii') {
    const text = new TextDecoder().decode(bytes.subarray(header.headerBytes));
    let lines = 0;
    for (const l of text.split(/\r?\n/)) if (l.trim()) lines++;
    const need = header.elements.reduce((s, e) => s + e.count, 0);
    if (lines < need) throw new MeshFileError(name, `declares ${need} data lines (${vertexEl.count} vertices, ${faceEl.count} faces) but holds ${lines}: the file is truncated`);
  } else {
    let min = 0;
    for (const el of header.elements) {
      let rec = 0;
      for (const p of el.props) rec += p.list ? TYPE_SIZE[p.list[0]] + 3 * TYPE_SIZE[p.list[1]] : TYPE_SIZE[p.type];
      min += rec * el.count;
    }
    if (body < min) throw new MeshFileError(name, `needs at least ${min} bytes of data for ${vertexEl.count} vertices and ${faceEl.count} faces but holds ${body}: the file is truncated`);
  }
  const custom = vertexEl.props.filter((p) => !p.list && !STANDARD.has(p.name)).map((p) => p.name);
  const loader = new PLYLoader();
  loader.setCustomPropertyNameMapping(Object.fromEntries(custom.map((c) => [`data:${c}`, [c]])));
  let geometry;
  try {
    const buf = bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength) as ArrayBuffer;
    geometry = loader.parse(buf);
  } catch (e) {
    throw new MeshFileError(name, `could not be parsed as PLY (${(e as Error).message}); the data does not match the header`);
  }
  const pos = geometry.getAttribute('position');
  const index = geometry.getIndex();
  if (!pos || pos.count !== vertexEl.count) {
    throw new MeshFileError(name, `header declares ${vertexEl.count} vertices but ${pos ? pos.count : 0} were read`);
  }
  if (!index || index.count < 3 * faceEl.count) {
    throw new MeshFileError(name, `header declares ${faceEl.count} faces but ${index ? index.count / 3 : 0} triangles were read`);
  }
  const positions = new Float64Array(pos.array as ArrayLike<number>);
  for (let i = 0; i < positions.length; i++) {
    if (!Number.isFinite(positions[i])) {
      throw new MeshFileError(name, `vertex ${Math.floor(i / 3)} has a coordinate that is not a finite number`);
    }
  }
  const triangles = Uint32Array.from(index.array as ArrayLike<number>);
  for (let c = 0; c < triangles.length; c++) {
    if (triangles[c] >= vertexEl.count) {
      throw new MeshFileError(name, `face ${Math.floor(c / 3)} uses vertex ${triangles[c]}, but the file has ${vertexEl.count} vertices`);
    }
  }
  const vertexData: Record<string, Float64Array> = {};
  for (const c of custom) {
    const attr = geometry.getAttribute(`data:${c}`);
    if (attr) vertexData[c] = new Float64Array(attr.array as ArrayLike<number>);
  }
  const notes = triangles.length > 3 * faceEl.count ? ['triangulated polygons with more than three corners'] : [];
  return { mesh: makeMesh(positions, triangles), format: 'ply', vertexData, notes };
}
