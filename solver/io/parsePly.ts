import { makeMesh } from '../mesh/Mesh.ts';
import { MeshFileError } from './MeshFileError.ts';
import type { ImportedMesh } from './parseMeshFile.ts';
import { readExactly, type ByteSource } from './ByteSource.ts';
import { LineReader, tokens } from './LineReader.ts';
import { GrowableIndices, checkVertexCount, checkTriangleCount } from './meshLimits.ts';

const TYPE_SIZE: Record<string, number> = {
  char: 1, uchar: 1, int8: 1, uint8: 1, short: 2, ushort: 2, int16: 2, uint16: 2,
  int: 4, uint: 4, int32: 4, uint32: 4, float: 4, float32: 4, double: 8, float64: 8,
};
/** Vertex properties that are geometry, normals, texture coordinates or colours, not per-vertex data. */
const STANDARD = new Set(['x', 'y', 'z', 'nx', 'ny', 'nz', 's', 't', 'u', 'v', 'red', 'green', 'blue', 'alpha']);
/** Names of the face element's list of corners. */
const CORNER_LISTS = new Set(['vertex_indices', 'vertex_index']);

interface PlyProperty {
  name: string;
  type: string;
  /** a list: the types of its count and of its items */
  list?: [string, string];
}

interface PlyHeader {
  format: 'ascii' | 'binary_little_endian' | 'binary_big_endian';
  headerBytes: number;
  /** lines of the header, end_header included */
  headerLines: number;
  elements: { name: string; count: number; props: PlyProperty[] }[];
  /** the header's comment lines, without the word "comment" */
  comments: string[];
}

const hasOwn = (o: object, k: string) => Object.prototype.hasOwnProperty.call(o, k);

/** Read and check the PLY header (Turk's format description), without the data. */
export function parsePlyHeader(bytes: Uint8Array, name: string): PlyHeader {
  const probe = new TextDecoder('latin1').decode(bytes.subarray(0, Math.min(bytes.length, 65536)));
  if (!probe.startsWith('ply')) throw new MeshFileError(name, 'does not start with "ply": not a PLY file');
  const end = probe.search(/end_header\r?\n/);
  if (end < 0) throw new MeshFileError(name, 'has no "end_header" line within its first 64 kB: the PLY header is incomplete or the file is truncated');
  const headerBytes = end + probe.slice(end).indexOf('\n') + 1;
  const lines = probe.slice(0, end).split(/\r?\n/);
  let format: PlyHeader['format'] | null = null;
  const elements: PlyHeader['elements'] = [];
  const comments: string[] = [];
  for (let i = 1; i < lines.length; i++) {
    const t = lines[i].trim().split(/\s+/);
    if (t[0] === 'comment') comments.push(lines[i].trim().slice('comment'.length).trim());
    else if (t[0] === 'format') {
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
        if (!hasOwn(TYPE_SIZE, t[2]) || !hasOwn(TYPE_SIZE, t[3])) throw new MeshFileError(name, `line ${i + 1}: unknown list type "${t[2]} ${t[3]}"`);
        el.props.push({ name: t[4], type: 'list', list: [t[2], t[3]] });
      } else {
        if (!hasOwn(TYPE_SIZE, t[1])) throw new MeshFileError(name, `line ${i + 1}: unknown property type "${t[1]}"`);
        el.props.push({ name: t[2], type: t[1] });
      }
    }
  }
  if (!format) throw new MeshFileError(name, 'has no "format" line in its header');
  return { format, headerBytes, headerLines: lines.length + 1, elements, comments };
}

/** What the reader keeps of one record: called with each scalar property value and each face's corners. */
interface RecordSink {
  scalar(element: number, record: number, property: number, value: number): void;
  list(element: number, record: number, property: number, values: number[]): void;
}

/**
 * PLY, ASCII or binary (either byte order), read by its own header: vertex
 * positions in the precision the file declares (float or double), faces from
 * `vertex_indices` (polygons fan-triangulated), and every other scalar vertex
 * property as per-vertex data (e.g. a morphogen field). ASCII is read line by
 * line; binary sizes are checked against the header before anything is
 * allocated for them, so a truncated or lying file is refused at once.
 */
export function parsePly(source: ByteSource): ImportedMesh {
  const name = source.name;
  const header = parsePlyHeader(readExactly(source, 0, Math.min(source.size, 65536), 'the PLY header'), name);
  const vertexIndex = header.elements.findIndex((e) => e.name === 'vertex');
  const faceIndex = header.elements.findIndex((e) => e.name === 'face');
  if (vertexIndex < 0) throw new MeshFileError(name, 'declares no "vertex" element');
  const vertexEl = header.elements[vertexIndex];
  const coordinate = ['x', 'y', 'z'].map((c) => vertexEl.props.findIndex((p) => p.name === c && !p.list));
  coordinate.forEach((p, k) => { if (p < 0) throw new MeshFileError(name, `vertex element has no "${'xyz'[k]}" property`); });
  const faceEl = header.elements[faceIndex];
  if (!faceEl || faceEl.count === 0) throw new MeshFileError(name, `holds ${vertexEl.count} vertices but no faces (a point cloud, not a surface)`);
  const cornerList = faceEl.props.findIndex((p) => p.list && CORNER_LISTS.has(p.name));
  if (cornerList < 0) throw new MeshFileError(name, 'the face element has no "vertex_indices" list');
  checkVertexCount(name, vertexEl.count);
  const nV = vertexEl.count;
  // every record takes at least one byte per property (binary) or two characters per value (ASCII)
  let least = 0;
  for (const el of header.elements) {
    let rec = 0;
    for (const p of el.props) rec += header.format === 'ascii' ? 2 * (p.list ? 4 : 1) : p.list ? TYPE_SIZE[p.list[0]] + 3 * TYPE_SIZE[p.list[1]] : TYPE_SIZE[p.type];
    least += rec * el.count;
  }
  if (header.headerBytes + least > source.size) {
    throw new MeshFileError(name, `needs at least ${least} bytes of data for ${nV} vertices and ${faceEl.count} faces but holds ${source.size - header.headerBytes}: the file is truncated`);
  }
  const positions = new Float64Array(3 * nV);
  const custom = vertexEl.props.map((p, k) => ({ p, k })).filter(({ p }) => !p.list && !STANDARD.has(p.name));
  const vertexData: Record<string, Float64Array> = {};
  const dataOf: (Float64Array | undefined)[] = vertexEl.props.map(() => undefined);
  for (const { p, k } of custom) dataOf[k] = vertexData[p.name] = new Float64Array(nV);
  const axisOf = vertexEl.props.map((_, k) => coordinate.indexOf(k));
  const tri = new GrowableIndices();
  let polygons = 0;
  const sink: RecordSink = {
    scalar(element, record, property, value) {
      if (element !== vertexIndex) return;
      const axis = axisOf[property];
      if (axis >= 0) {
        if (!Number.isFinite(value)) throw new MeshFileError(name, `vertex ${record} has a coordinate that is not a finite number`);
        positions[3 * record + axis] = value;
      } else {
        const data = dataOf[property];
        if (data) data[record] = value;
      }
    },
    list(element, record, property, corners) {
      if (element !== faceIndex || property !== cornerList) return;
      if (corners.length < 3) throw new MeshFileError(name, `face ${record} has ${corners.length} corners; a face needs at least three`);
      for (const c of corners) {
        if (!Number.isInteger(c) || c < 0 || c >= nV) throw new MeshFileError(name, `face ${record} uses vertex ${c}, but the file has ${nV} vertices`);
      }
      if (corners.length > 3) polygons++;
      checkTriangleCount(name, tri.length / 3 + corners.length - 2);
      for (let k = 1; k + 1 < corners.length; k++) tri.push3(corners[0], corners[k], corners[k + 1]);
    },
  };
  if (header.format === 'ascii') readAsciiBody(source, header, sink);
  else readBinaryBody(source, header, sink);
  const notes = polygons > 0 ? [`triangulated ${polygons} polygons with more than three corners`] : [];
  return { mesh: makeMesh(positions, tri.array()), format: 'ply', vertexData, notes, comments: header.comments };
}

/** One line per record: scalars in order, a list as its count then its items; `float` values rounded to single precision as declared. */
function readAsciiBody(source: ByteSource, header: PlyHeader, sink: RecordSink): void {
  const reader = new LineReader(source, header.headerBytes, 'PLY');
  const declared = header.elements.map((e) => `${e.count} ${e.name}`).join(', ');
  const items: number[] = [];
  header.elements.forEach((el, e) => {
    for (let r = 0; r < el.count; r++) {
      let t: string[] = [];
      for (let raw = reader.next(); raw !== null; raw = reader.next()) {
        t = tokens(raw);
        if (t.length) break;
      }
      if (!t.length) throw new MeshFileError(source.name, `declares ${declared} but ends at ${el.name} ${r}: the file is truncated`);
      let at = 0;
      const value = (type: string): number => {
        if (at >= t.length) throw new MeshFileError(source.name, `line ${header.headerLines + reader.lineNumber}: ${el.name} ${r} has too few values`);
        const v = Number(t[at++]);
        if (Number.isNaN(v)) throw new MeshFileError(source.name, `line ${header.headerLines + reader.lineNumber}: ${el.name} ${r} has "${t[at - 1].slice(0, 20)}" where a number should be`);
        return type === 'float' || type === 'float32' ? Math.fround(v) : v;
      };
      el.props.forEach((p, k) => {
        if (p.list) {
          const n = value(p.list[0]);
          if (!Number.isInteger(n) || n < 0) throw new MeshFileError(source.name, `line ${header.headerLines + reader.lineNumber}: ${el.name} ${r} has a list of ${n} items`);
          items.length = 0;
          for (let q = 0; q < n; q++) items.push(value(p.list[1]));
          sink.list(e, r, k, items);
        } else sink.scalar(e, r, k, value(p.type));
      });
    }
  });
}

/** Records packed in the declared types and byte order, read a megabyte at a time. */
function readBinaryBody(source: ByteSource, header: PlyHeader, sink: RecordSink): void {
  const little = header.format === 'binary_little_endian';
  const chunkSize = 1 << 20;
  let buffer: Uint8Array = new Uint8Array(0), view = new DataView(buffer.buffer), start = header.headerBytes, at = 0;
  /** make sure `need` bytes are available at `at` */
  const ensure = (need: number, what: string) => {
    if (at + need <= buffer.length) return;
    const from = start + at;
    const length = Math.max(need, Math.min(chunkSize, source.size - from));
    buffer = readExactly(source, from, length, what);
    view = new DataView(buffer.buffer);
    start = from;
    at = 0;
  };
  const read = (type: string, what: string): number => {
    const size = TYPE_SIZE[type];
    ensure(size, what);
    const o = at;
    at += size;
    switch (type) {
      case 'char': case 'int8': return view.getInt8(o);
      case 'uchar': case 'uint8': return view.getUint8(o);
      case 'short': case 'int16': return view.getInt16(o, little);
      case 'ushort': case 'uint16': return view.getUint16(o, little);
      case 'int': case 'int32': return view.getInt32(o, little);
      case 'uint': case 'uint32': return view.getUint32(o, little);
      case 'float': case 'float32': return view.getFloat32(o, little);
      default: return view.getFloat64(o, little);
    }
  };
  const items: number[] = [];
  header.elements.forEach((el, e) => {
    for (let r = 0; r < el.count; r++) {
      const what = `${el.name} ${r}`;
      el.props.forEach((p, k) => {
        if (p.list) {
          const n = read(p.list[0], what);
          if (n < 0) throw new MeshFileError(source.name, `${what} has a list of ${n} items`);
          items.length = 0;
          for (let q = 0; q < n; q++) items.push(read(p.list[1], what));
          sink.list(e, r, k, items);
        } else sink.scalar(e, r, k, read(p.type, what));
      });
    }
  });
}
