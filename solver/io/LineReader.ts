import type { ByteSource } from './ByteSource.ts';
import { MeshFileError } from './MeshFileError.ts';

/** Bytes read at a time. */
const CHUNK = 1 << 20;
/** Longest line a text mesh file may have. */
const MAX_LINE = 1 << 20;

/**
 * The lines of a text file (UTF-8, LF or CRLF), read from a byte source one
 * megabyte at a time: memory stays bounded whatever the file's size, and a
 * file that is not text (a NUL byte, a line longer than a megabyte) is refused
 * as soon as it shows it, with the line named.
 */
export class LineReader {
  /** 1-based number of the line last returned */
  lineNumber = 0;
  private lines: string[] = [];
  private index = 0;
  private carry = '';
  private position: number;
  private ended = false;
  private readonly decoder = new TextDecoder('utf-8');
  private readonly chunk: Uint8Array;

  constructor(private readonly source: ByteSource, start = 0, private readonly format = 'text') {
    this.position = start;
    this.chunk = new Uint8Array(Math.min(CHUNK, Math.max(1, source.size - start)));
  }

  /** The next line (without its line break), or null at the end of the file. */
  next(): string | null {
    while (this.index >= this.lines.length) {
      if (this.ended) return null;
      this.fill();
    }
    this.lineNumber++;
    return this.lines[this.index++];
  }

  private fill(): void {
    const n = this.position < this.source.size ? this.source.read(this.chunk, this.position) : 0;
    if (n <= 0) {
      this.ended = true;
      const last = this.carry + this.decoder.decode();
      this.lines = last.length ? [last] : [];
      this.index = 0;
      this.carry = '';
      return;
    }
    const bytes = this.chunk.subarray(0, n);
    const nul = bytes.indexOf(0);
    if (nul >= 0) throw new MeshFileError(this.source.name, `holds binary data (a zero byte at byte ${this.position + nul}, after line ${this.lineNumber + this.lines.length - this.index}): it is not ${this.format} text`);
    this.position += n;
    const text = this.carry + this.decoder.decode(bytes, { stream: true });
    const parts = text.split(/\r?\n/);
    this.carry = parts.pop()!;
    if (this.carry.length > MAX_LINE) throw new MeshFileError(this.source.name, `line ${this.lineNumber + parts.length + 1} is longer than ${MAX_LINE} characters: it is not ${this.format} text`);
    this.lines = parts;
    this.index = 0;
  }
}

/** Split a line into whitespace-separated tokens. */
export const tokens = (line: string): string[] => {
  const t = line.trim();
  return t === '' ? [] : t.split(/\s+/);
};
