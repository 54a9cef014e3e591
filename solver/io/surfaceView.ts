import type { Mesh } from '../mesh/Mesh.ts';
import { vertexNormals } from '../mesh/vertexNormals.ts';

/** Named viewing directions: azimuth about z and elevation above the xy-plane, in degrees. */
export const VIEW_PRESETS: Readonly<Record<string, { azimuth: number; elevation: number }>> = {
  front: { azimuth: -90, elevation: 0 },
  back: { azimuth: 90, elevation: 0 },
  left: { azimuth: 180, elevation: 0 },
  right: { azimuth: 0, elevation: 0 },
  top: { azimuth: -90, elevation: 90 },
  bottom: { azimuth: -90, elevation: -90 },
  iso: { azimuth: -60, elevation: 30 },
};

export interface ProjectedSurface {
  /** screen x, y (pixels, y down) and depth (larger is nearer) per vertex */
  x: Float64Array;
  y: Float64Array;
  depth: Float64Array;
  /** Lambert shading factor per vertex, in [ambient, 1] */
  shade: Float64Array;
}

/**
 * Orthographic view of a surface from a direction (azimuth, elevation), fitted
 * into a `width`×`height` pixel box with a margin. Shading is a headlight
 * (light from the viewer): ambient + (1 − ambient)·|n·d|, so both sides of a
 * thin sheet read and colours stay recognisable. `fixedScale` (pixels per
 * unit) replaces the fit, so panels of a growing surface share one scale.
 */
type Box = { left: number; top: number; width: number; height: number };
type View = { azimuth: number; elevation: number };

/** Viewing direction d (towards the viewer), screen right r and screen up u = d × r. */
function viewAxes(view: View): { d: number[]; r: number[]; u: number[] } {
  const az = (view.azimuth * Math.PI) / 180, el = (view.elevation * Math.PI) / 180;
  const d = [Math.cos(el) * Math.cos(az), Math.cos(el) * Math.sin(az), Math.sin(el)];
  const r = [-Math.sin(az), Math.cos(az), 0];
  return { d, r, u: [d[1] * r[2] - d[2] * r[1], d[2] * r[0] - d[0] * r[2], d[0] * r[1] - d[1] * r[0]] };
}

/** Screen extent of a surface along r and u: [minX, maxX, minY, maxY]. */
function screenExtent(mesh: Mesh, view: View): [number, number, number, number] {
  const { r, u } = viewAxes(view);
  const p = mesh.positions;
  let minX = Infinity, maxX = -Infinity, minY = Infinity, maxY = -Infinity;
  for (let i = 0; i < p.length; i += 3) {
    const x = r[0] * p[i] + r[1] * p[i + 1] + r[2] * p[i + 2], y = u[0] * p[i] + u[1] * p[i + 1] + u[2] * p[i + 2];
    minX = Math.min(minX, x); maxX = Math.max(maxX, x); minY = Math.min(minY, y); maxY = Math.max(maxY, y);
  }
  return [minX, maxX, minY, maxY];
}

const MARGIN = 0.05;

/** Pixels per unit that fit the surface, seen from `view`, into `box` with a margin. */
export function fitScale(mesh: Mesh, view: View, box: Box): number {
  const [minX, maxX, minY, maxY] = screenExtent(mesh, view);
  return Math.min(box.width / ((maxX - minX) * (1 + 2 * MARGIN) || 1), box.height / ((maxY - minY) * (1 + 2 * MARGIN) || 1));
}

export function projectSurface(mesh: Mesh, view: View, box: Box, ambient = 0.35, fixedScale?: number): ProjectedSurface {
  const { d, r, u } = viewAxes(view);
  const p = mesh.positions, n = p.length / 3;
  const sx = new Float64Array(n), sy = new Float64Array(n), depth = new Float64Array(n), shade = new Float64Array(n);
  const [minX, maxX, minY, maxY] = screenExtent(mesh, view);
  const scale = fixedScale ?? fitScale(mesh, view, box);
  const cx = (minX + maxX) / 2, cy = (minY + maxY) / 2;
  for (let i = 0; i < n; i++) {
    const X = p[3 * i], Y = p[3 * i + 1], Z = p[3 * i + 2];
    sx[i] = box.left + box.width / 2 + (r[0] * X + r[1] * Y + r[2] * Z - cx) * scale;
    sy[i] = box.top + box.height / 2 - (u[0] * X + u[1] * Y + u[2] * Z - cy) * scale;
    depth[i] = d[0] * X + d[1] * Y + d[2] * Z;
  }
  const normals = vertexNormals(mesh);
  for (let i = 0; i < n; i++) shade[i] = ambient + (1 - ambient) * Math.abs(normals[3 * i] * d[0] + normals[3 * i + 1] * d[1] + normals[3 * i + 2] * d[2]);
  return { x: sx, y: sy, depth, shade };
}

/** Round tick values covering [lo, hi] (about `count` of them). */
export function niceTicks(lo: number, hi: number, count = 5): number[] {
  if (!(hi > lo)) return [lo];
  const raw = (hi - lo) / count;
  const mag = Math.pow(10, Math.floor(Math.log10(raw)));
  const step = [1, 2, 2.5, 5, 10].map((m) => m * mag).find((s) => s >= raw)!;
  const out: number[] = [];
  for (let v = Math.ceil(lo / step - 1e-9) * step; v <= hi + 1e-9 * step; v += step) out.push(Number(v.toPrecision(12)));
  return out;
}

export function tickLabel(v: number): string {
  if (v === 0) return '0';
  const a = Math.abs(v);
  return a >= 1e4 || a < 1e-3 ? v.toExponential(1) : String(Number(v.toPrecision(4)));
}
