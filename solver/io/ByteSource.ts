import { MeshFileError } from './MeshFileError.ts';

/**
 * Bytes of a file read on demand: a file on disk read piece by piece (Node,
 * `fileByteSource` in meshFiles.ts) or bytes already in memory (a browser's
 * opened file). Readers never need the whole file as one string, so files far
 * larger than a JavaScript string can hold are read, or refused, in bounded
 * memory.
 */
export interface ByteSource {
  /** the file's name, for messages */
  readonly name: string;
  readonly size: number;
  /** copy up to `into.length` bytes from `position` into `into`; returns how many were copied */
  read(into: Uint8Array, position: number): number;
}

/** A byte source over bytes in memory. */
export function memoryByteSource(bytes: Uint8Array, name: string): ByteSource {
  return {
    name,
    size: bytes.length,
    read(into, position) {
      const n = Math.max(0, Math.min(into.length, bytes.length - position));
      into.set(bytes.subarray(position, position + n));
      return n;
    },
  };
}

/** Exactly `length` bytes from `position`, or a "truncated" error naming what was being read. */
export function readExactly(source: ByteSource, position: number, length: number, what: string): Uint8Array {
  if (position + length > source.size) throw new MeshFileError(source.name, `${what} needs ${length} bytes from byte ${position}, but the file ends at byte ${source.size}: it is truncated`);
  const out = new Uint8Array(length);
  let done = 0;
  while (done < length) {
    const n = source.read(out.subarray(done), position + done);
    if (n <= 0) throw new MeshFileError(source.name, `${what}: the file ended after ${position + done} bytes: it is truncated`);
    done += n;
  }
  return out;
}
