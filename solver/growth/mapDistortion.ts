import { lumpedMass } from '../fem/lumpedMass.ts';
import { triangleAreas } from '../mesh/triangleAreas.ts';

/** Percentiles of a per-triangle measure. */
export interface Spread {
  min: number;
  p5: number;
  p50: number;
  p95: number;
  max: number;
}

/** How a map of one surface onto another (same triangles) stretches and shears them. */
export interface MapDistortion {
  /** each triangle's area after over its area before */
  areaRatio: Spread;
  /** each triangle's largest change of an angle, in degrees */
  angleChange: Spread;
}

/** Distortion of the map x ↦ y of a triangulated surface (positions before and after, same triangles). */
export function mapDistortion(triangles: Uint32Array, before: Float64Array, after: Float64Array): MapDistortion {
  const a0 = triangleAreas({ positions: before, triangles }), a1 = triangleAreas({ positions: after, triangles });
  const nF = a0.length;
  const ratio = new Float64Array(nF), angle = new Float64Array(nF);
  const angles0 = new Float64Array(3), angles1 = new Float64Array(3);
  for (let t = 0; t < nF; t++) {
    ratio[t] = a0[t] > 0 ? a1[t] / a0[t] : Infinity;
    triangleAngles(before, triangles, t, angles0);
    triangleAngles(after, triangles, t, angles1);
    angle[t] = Math.max(Math.abs(angles1[0] - angles0[0]), Math.abs(angles1[1] - angles0[1]), Math.abs(angles1[2] - angles0[2])) * (180 / Math.PI);
  }
  return { areaRatio: spread(ratio), angleChange: spread(angle) };
}

/** Each vertex's share of area (lumped mass) after over before: where the tissue grew, for painting. */
export function vertexAreaRatio(triangles: Uint32Array, before: Float64Array, after: Float64Array): Float64Array {
  const m0 = lumpedMass({ positions: before, triangles }), m1 = lumpedMass({ positions: after, triangles });
  const ratio = new Float64Array(m0.length);
  for (let i = 0; i < m0.length; i++) ratio[i] = m0[i] > 0 ? m1[i] / m0[i] : 1;
  return ratio;
}

/** min, 5th, 50th, 95th percentile and max (nearest rank). */
export function spread(values: Float64Array): Spread {
  const s = Float64Array.from(values).sort();
  const at = (q: number) => (s.length ? s[Math.min(s.length - 1, Math.max(0, Math.ceil(q * s.length) - 1))] : NaN);
  return { min: s[0] ?? NaN, p5: at(0.05), p50: at(0.5), p95: at(0.95), max: s[s.length - 1] ?? NaN };
}

function triangleAngles(x: Float64Array, tri: Uint32Array, t: number, out: Float64Array): void {
  for (let k = 0; k < 3; k++) {
    const a = 3 * tri[3 * t + k], b = 3 * tri[3 * t + ((k + 1) % 3)], c = 3 * tri[3 * t + ((k + 2) % 3)];
    const ux = x[b] - x[a], uy = x[b + 1] - x[a + 1], uz = x[b + 2] - x[a + 2];
    const vx = x[c] - x[a], vy = x[c + 1] - x[a + 1], vz = x[c + 2] - x[a + 2];
    const cross = Math.hypot(uy * vz - uz * vy, uz * vx - ux * vz, ux * vy - uy * vx);
    out[k] = Math.atan2(cross, ux * vx + uy * vy + uz * vz);
  }
}
