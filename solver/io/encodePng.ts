import { PNG } from 'pngjs';
import { crc32 } from './crc32.ts';
import type { Rgba } from './surfaceRaster.ts';

/** An RGBA image as PNG bytes, with its resolution in a pHYs chunk when `dpi` is given. */
export function encodePng(image: Rgba, dpi?: number): Uint8Array {
  const png = new PNG({ width: image.width, height: image.height });
  png.data.set(image.data);
  const bytes = new Uint8Array(PNG.sync.write(png, { colorType: 6 }));
  return dpi ? withPhys(bytes, dpi) : bytes;
}

/** Insert a pHYs chunk (pixels per metre) after IHDR: the PNG standard's way to record DPI (§11.3.5.3). */
export function withPhys(png: Uint8Array, dpi: number): Uint8Array {
  const ppm = Math.round(dpi / 0.0254);
  const chunk = new Uint8Array(4 + 4 + 9 + 4);
  const view = new DataView(chunk.buffer);
  view.setUint32(0, 9);
  chunk.set([0x70, 0x48, 0x59, 0x73], 4); // "pHYs"
  view.setUint32(8, ppm);
  view.setUint32(12, ppm);
  chunk[16] = 1; // unit: metre
  view.setUint32(17, crc32(chunk.subarray(4, 17)));
  const ihdrEnd = 8 + 4 + 4 + 13 + 4;
  const out = new Uint8Array(png.length + chunk.length);
  out.set(png.subarray(0, ihdrEnd), 0);
  out.set(chunk, ihdrEnd);
  out.set(png.subarray(ihdrEnd), ihdrEnd + chunk.length);
  return out;
}

/** Bytes as base64 (for a data: URI), in Node or a browser. */
export function base64(bytes: Uint8Array): string {
  const B = (globalThis as { Buffer?: { from(b: Uint8Array): { toString(enc: string): string } } }).Buffer;
  if (B) return B.from(bytes).toString('base64');
  let s = '';
  for (let i = 0; i < bytes.length; i += 0x8000) s += String.fromCharCode(...bytes.subarray(i, i + 0x8000));
  return btoa(s);
}
