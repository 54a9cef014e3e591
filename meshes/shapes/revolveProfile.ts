import type { Mesh } from '../../solver/mesh/Mesh.ts';
import { loftRings, ringCount, ROW_SPACING, type Ring } from './loftRings.ts';

/**
 * Surface of revolution about the z axis from a meridian given by arc length:
 * `profile(s)` = [ρ, z] for s in [0, length]. An end with ρ = 0 becomes a pole,
 * any other end an open boundary circle. Rings are spaced ≈ h·√3/2 apart with
 * ≈ 2πρ/h points, alternately staggered, so triangles are near-equilateral.
 */
export function revolveProfile(profile: (s: number) => [number, number], length: number, h: number): Mesh {
  const K = Math.max(2, Math.round(length / (h * ROW_SPACING)));
  const rings: Ring[] = [];
  let startPole: [number, number, number] | undefined;
  let endPole: [number, number, number] | undefined;
  for (let k = 0; k <= K; k++) {
    const [rho, z] = profile((k / K) * length);
    if (rho <= 1e-12 * length) {
      if (k === 0) startPole = [0, 0, z];
      else if (k === K) endPole = [0, 0, z];
      continue;
    }
    const n = ringCount(2 * Math.PI * rho, h, 3);
    const phase = (k % 2) * 0.5;
    const pts = new Float64Array(3 * n);
    for (let i = 0; i < n; i++) {
      const a = (2 * Math.PI * (i + phase)) / n;
      pts[3 * i] = rho * Math.cos(a);
      pts[3 * i + 1] = rho * Math.sin(a);
      pts[3 * i + 2] = z;
    }
    rings.push({ points: pts, phase });
  }
  return loftRings(rings, { startPole, endPole });
}
