import { MeshFileError } from './MeshFileError.ts';
import { MAX_SHAPE_VERTICES } from '../defaults.ts';

/** Refuse a file holding more vertices than a mesh may have. */
export function checkVertexCount(name: string, count: number): void {
  if (count > MAX_SHAPE_VERTICES) throw new MeshFileError(name, `holds more than ${MAX_SHAPE_VERTICES} vertices, the most a mesh may have: coarsen it first`);
}

/** A Float64Array that grows by doubling (numbers read from a text file, three at a time). */
export class GrowableFloats {
  private data = new Float64Array(3 * 1024);
  length = 0;
  push3(a: number, b: number, c: number): void {
    if (this.length + 3 > this.data.length) {
      const next = new Float64Array(2 * this.data.length);
      next.set(this.data);
      this.data = next;
    }
    this.data[this.length++] = a;
    this.data[this.length++] = b;
    this.data[this.length++] = c;
  }
  /** the values pushed, trimmed */
  array(): Float64Array {
    return this.data.slice(0, this.length);
  }
}

/** A Uint32Array that grows by doubling (triangle corners, three at a time). */
export class GrowableIndices {
  private data = new Uint32Array(3 * 2048);
  length = 0;
  push3(a: number, b: number, c: number): void {
    if (this.length + 3 > this.data.length) {
      const next = new Uint32Array(2 * this.data.length);
      next.set(this.data);
      this.data = next;
    }
    this.data[this.length++] = a;
    this.data[this.length++] = b;
    this.data[this.length++] = c;
  }
  array(): Uint32Array {
    return this.data.slice(0, this.length);
  }
}

/** Refuse a file holding more triangles than a mesh within the vertex limit can have (about two per vertex, with a margin). */
export function checkTriangleCount(name: string, count: number): void {
  if (count > 4 * MAX_SHAPE_VERTICES) throw new MeshFileError(name, `holds more than ${4 * MAX_SHAPE_VERTICES} triangles, more than a mesh of at most ${MAX_SHAPE_VERTICES} vertices can have: coarsen it first`);
}
