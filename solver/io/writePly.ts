import type { Mesh } from '../mesh/Mesh.ts';

export interface PlyWriteOptions {
  /** 'binary' (little-endian, default) or 'ascii' */
  encoding?: 'binary' | 'ascii';
  /** per-vertex sRGB colours, Uint8Array(3·nV), written as uchar red green blue */
  colors?: Uint8Array;
  /** per-vertex scalar fields, written as float properties after the colours (double where a value would overflow float) */
  properties?: Record<string, ArrayLike<number>>;
  comments?: string[];
}

const NAME = /^[A-Za-z_][A-Za-z0-9_]*$/;

/** True when some finite value is beyond single precision's range (it would be written as infinity). */
function overflowsFloat(values: ArrayLike<number>): boolean {
  for (let i = 0; i < values.length; i++) if (Number.isFinite(values[i]) && !Number.isFinite(Math.fround(values[i]))) return true;
  return false;
}

/**
 * PLY (Turk 1994): vertex x y z as float, optional uchar colours, optional
 * scalar properties as float — as double where a finite value would overflow
 * single precision, so a field about to blow up is kept finite —, faces as
 * `list uchar int vertex_indices`.
 */
export function writePly(mesh: Mesh, options: PlyWriteOptions = {}): Uint8Array {
  const nV = mesh.positions.length / 3;
  const nF = mesh.triangles.length / 3;
  const props = Object.entries(options.properties ?? {});
  for (const [name, values] of props) {
    if (!NAME.test(name)) throw new Error(`writePly: property name "${name}" must be letters, digits and underscores`);
    if (values.length !== nV) throw new Error(`writePly: property "${name}" has ${values.length} values for ${nV} vertices`);
  }
  const colors = options.colors;
  if (colors && colors.length !== 3 * nV) throw new Error(`writePly: ${colors.length} colour bytes for ${nV} vertices (need ${3 * nV})`);
  const binary = (options.encoding ?? 'binary') === 'binary';
  let header = `ply\nformat ${binary ? 'binary_little_endian' : 'ascii'} 1.0\n`;
  for (const c of options.comments ?? []) header += `comment ${c.replace(/\n/g, ' ')}\n`;
  header += `element vertex ${nV}\nproperty float x\nproperty float y\nproperty float z\n`;
  if (colors) header += 'property uchar red\nproperty uchar green\nproperty uchar blue\n';
  const wide = props.map(([, values]) => overflowsFloat(values));
  props.forEach(([name], k) => (header += `property ${wide[k] ? 'double' : 'float'} ${name}\n`));
  header += `element face ${nF}\nproperty list uchar int vertex_indices\nend_header\n`;
  const head = new TextEncoder().encode(header);
  const p = mesh.positions;
  const t = mesh.triangles;
  if (!binary) {
    const lines: string[] = [];
    for (let v = 0; v < nV; v++) {
      let line = `${Math.fround(p[3 * v])} ${Math.fround(p[3 * v + 1])} ${Math.fround(p[3 * v + 2])}`;
      if (colors) line += ` ${colors[3 * v]} ${colors[3 * v + 1]} ${colors[3 * v + 2]}`;
      props.forEach(([, values], k) => (line += ` ${wide[k] ? values[v] : Math.fround(values[v])}`));
      lines.push(line);
    }
    for (let f = 0; f < nF; f++) lines.push(`3 ${t[3 * f]} ${t[3 * f + 1]} ${t[3 * f + 2]}`);
    const body = new TextEncoder().encode(lines.join('\n') + '\n');
    const out = new Uint8Array(head.length + body.length);
    out.set(head);
    out.set(body, head.length);
    return out;
  }
  const vertexBytes = 12 + (colors ? 3 : 0) + wide.reduce((a, w) => a + (w ? 8 : 4), 0);
  const out = new Uint8Array(head.length + nV * vertexBytes + nF * 13);
  out.set(head);
  const view = new DataView(out.buffer);
  let o = head.length;
  for (let v = 0; v < nV; v++) {
    view.setFloat32(o, p[3 * v], true);
    view.setFloat32(o + 4, p[3 * v + 1], true);
    view.setFloat32(o + 8, p[3 * v + 2], true);
    o += 12;
    if (colors) {
      out[o] = colors[3 * v];
      out[o + 1] = colors[3 * v + 1];
      out[o + 2] = colors[3 * v + 2];
      o += 3;
    }
    for (let k = 0; k < props.length; k++) {
      if (wide[k]) {
        view.setFloat64(o, props[k][1][v], true);
        o += 8;
      } else {
        view.setFloat32(o, props[k][1][v], true);
        o += 4;
      }
    }
  }
  for (let f = 0; f < nF; f++) {
    out[o] = 3;
    view.setInt32(o + 1, t[3 * f], true);
    view.setInt32(o + 5, t[3 * f + 1], true);
    view.setInt32(o + 9, t[3 * f + 2], true);
    o += 13;
  }
  return out;
}
