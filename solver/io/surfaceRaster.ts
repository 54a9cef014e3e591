import type { Mesh } from '../mesh/Mesh.ts';
import { colorizeField, type ColormapName } from './colormap.ts';
import { projectSurface } from './surfaceView.ts';

/** How the surface is lit: flat colours exactly as on the colour bar, a gentle darkening towards the silhouette, or a full headlight. */
export type Shading = 'none' | 'soft' | 'headlight';
export const SHADINGS: readonly Shading[] = ['none', 'soft', 'headlight'];

/**
 * The shade factor's floor for each shading: colour × (floor + (1 − floor)·|n·d|). `soft` keeps
 * every colour within 15 % of its lightness on the bar (no hue moves off it visibly); `headlight`
 * reads the shape best but darkens bright colours at the silhouette by up to 65 %.
 */
export const SHADING_AMBIENT: Readonly<Record<Shading, number>> = { none: 1, soft: 0.85, headlight: 0.35 };

export interface RasterPanel {
  mesh: Mesh;
  values: ArrayLike<number>;
  box: { left: number; top: number; width: number; height: number };
}

/** An RGBA image, straight (not premultiplied) alpha, rows top to bottom. */
export interface Rgba {
  width: number;
  height: number;
  data: Uint8Array;
}

/**
 * The coloured surfaces of several panels drawn into one transparent image of
 * `width`×`height` pixels: z-buffered triangles with Gouraud-interpolated
 * colours and shade, 2×2 supersampled, so edges are antialiased in the alpha
 * channel. One scale (pixels per unit) for every panel.
 */
export function rasterSurfaces(panels: readonly RasterPanel[], width: number, height: number, o: { colormap: ColormapName; range: [number, number]; view: { azimuth: number; elevation: number }; scale: number; shading: Shading }): Rgba {
  const ss = 2;
  const W = width * ss, H = height * ss;
  const rgb = new Float32Array(W * H * 3);
  const covered = new Uint8Array(W * H);
  const zbuf = new Float64Array(W * H).fill(-Infinity);
  const ambient = SHADING_AMBIENT[o.shading];
  for (const panel of panels) {
    const box = { left: panel.box.left * ss, top: panel.box.top * ss, width: panel.box.width * ss, height: panel.box.height * ss };
    const v = projectSurface(panel.mesh, o.view, box, ambient, o.scale * ss);
    const colors = colorizeField(panel.values, o.colormap, o.range);
    const tri = panel.mesh.triangles;
    for (let t = 0; t < tri.length; t += 3) {
      const a = tri[t], b = tri[t + 1], c = tri[t + 2];
      const x0 = v.x[a], y0 = v.y[a], x1 = v.x[b], y1 = v.y[b], x2 = v.x[c], y2 = v.y[c];
      const den = (y1 - y2) * (x0 - x2) + (x2 - x1) * (y0 - y2);
      if (den === 0) continue;
      const minX = Math.max(0, Math.floor(Math.min(x0, x1, x2))), maxX = Math.min(W - 1, Math.ceil(Math.max(x0, x1, x2)));
      const minY = Math.max(0, Math.floor(Math.min(y0, y1, y2))), maxY = Math.min(H - 1, Math.ceil(Math.max(y0, y1, y2)));
      for (let py = minY; py <= maxY; py++) {
        for (let px = minX; px <= maxX; px++) {
          const qx = px + 0.5, qy = py + 0.5;
          const w0 = ((y1 - y2) * (qx - x2) + (x2 - x1) * (qy - y2)) / den;
          const w1 = ((y2 - y0) * (qx - x2) + (x0 - x2) * (qy - y2)) / den;
          const w2 = 1 - w0 - w1;
          if (w0 < -1e-9 || w1 < -1e-9 || w2 < -1e-9) continue;
          const z = w0 * v.depth[a] + w1 * v.depth[b] + w2 * v.depth[c];
          const p = py * W + px;
          if (z <= zbuf[p]) continue;
          zbuf[p] = z;
          covered[p] = 1;
          const s = w0 * v.shade[a] + w1 * v.shade[b] + w2 * v.shade[c];
          for (let d = 0; d < 3; d++) rgb[3 * p + d] = (w0 * colors[3 * a + d] + w1 * colors[3 * b + d] + w2 * colors[3 * c + d]) * s;
        }
      }
    }
  }
  // 2×2 box filter: colour averaged over the covered subsamples, alpha = the covered share
  const data = new Uint8Array(width * height * 4);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      let n = 0, r = 0, g = 0, b = 0;
      for (let sy = 0; sy < ss; sy++) {
        for (let sx = 0; sx < ss; sx++) {
          const p = (y * ss + sy) * W + x * ss + sx;
          if (!covered[p]) continue;
          n++; r += rgb[3 * p]; g += rgb[3 * p + 1]; b += rgb[3 * p + 2];
        }
      }
      if (!n) continue;
      const o4 = 4 * (y * width + x);
      data[o4] = Math.round(r / n); data[o4 + 1] = Math.round(g / n); data[o4 + 2] = Math.round(b / n);
      data[o4 + 3] = Math.round((255 * n) / (ss * ss));
    }
  }
  return { width, height, data };
}
