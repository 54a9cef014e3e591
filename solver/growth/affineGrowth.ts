import type { Mesh } from '../mesh/Mesh.ts';
import { scaleFactor, type GrowthLaw, type TimeCourse } from './GrowthLaw.ts';

/**
 * Growth by scaling about a centre along three orthonormal axes a₁, a₂, a₃
 * (default x, y, z): x(t) = c + Σ_k ρ_k(t)·a_k a_kᵀ(X − c). Uniform isotropic
 * when the three rates are equal, anisotropic (say, a proximal–distal
 * elongation) otherwise. Each ρ follows the time course.
 */
export function affineGrowth(reference: Float64Array, rates: [number, number, number], course: TimeCourse, centre: [number, number, number], capacity?: number, axes?: [number, number, number][]): GrowthLaw {
  const A = axes ?? [[1, 0, 0], [0, 1, 0], [0, 0, 1]];
  const uniform = rates[0] === rates[1] && rates[1] === rates[2];
  const scales = (t: number) => rates.map((r) => scaleFactor(course, r, t, capacity)) as [number, number, number];
  return {
    description: uniform
      ? `uniform ${course} scaling about (${centre.join(', ')}) at rate ${rates[0]}${course === 'logistic' ? `, up to ${capacity}×` : ''}`
      : `anisotropic ${course} scaling about (${centre.join(', ')}) at rates ${rates.map((r, k) => `${r} along (${A[k].map((x) => Number(x.toPrecision(4))).join(', ')})`).join(', ')}`,
    scaleAt: uniform ? (t) => scaleFactor(course, rates[0], t, capacity) : undefined,
    advance(_mesh: Mesh, _t0: number, t1: number, out: Float64Array) {
      const s = scales(t1);
      for (let i = 0; i < reference.length; i += 3) {
        const d = [reference[i] - centre[0], reference[i + 1] - centre[1], reference[i + 2] - centre[2]];
        out[i] = centre[0]; out[i + 1] = centre[1]; out[i + 2] = centre[2];
        for (let k = 0; k < 3; k++) {
          const a = A[k];
          const f = s[k] * (a[0] * d[0] + a[1] * d[1] + a[2] * d[2]);
          out[i] += f * a[0]; out[i + 1] += f * a[1]; out[i + 2] += f * a[2];
        }
      }
    },
    maxSpeed(_mesh: Mesh, t0: number, t1: number) {
      const a = scales(t0), b = scales(t1);
      let far = 0;
      for (let i = 0; i < reference.length; i += 3) {
        const d = [reference[i] - centre[0], reference[i + 1] - centre[1], reference[i + 2] - centre[2]];
        let s2 = 0;
        for (let k = 0; k < 3; k++) s2 += ((b[k] - a[k]) * (A[k][0] * d[0] + A[k][1] * d[1] + A[k][2] * d[2])) ** 2;
        far = Math.max(far, Math.sqrt(s2));
      }
      return far / Math.max(t1 - t0, 1e-300);
    },
  };
}
