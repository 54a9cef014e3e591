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
    similarity: uniform ? (t: number) => scaleFactor(course, rates[0], t, capacity) : undefined,
    description: uniform
      ? `uniform ${course} scaling about (${centre.join(', ')}) at rate ${rates[0]}${course === 'logistic' ? `, up to ${capacity}×` : ''}`
      : `anisotropic ${course} scaling about (${centre.join(', ')}) at rates ${rates.map((r, k) => `${r} along (${A[k].map((x) => Number(x.toPrecision(4))).join(', ')})`).join(', ')}`,
    advance(_mesh: Mesh, _t0: number, t1: number, out: Float64Array) {
      const s = scales(t1);
      // the linear map Σ_k ρ_k a_k a_kᵀ, once
      const L = new Float64Array(9);
      for (let k = 0; k < 3; k++) for (let r = 0; r < 3; r++) for (let c = 0; c < 3; c++) L[3 * r + c] += s[k] * A[k][r] * A[k][c];
      for (let i = 0; i < reference.length; i += 3) {
        const dx = reference[i] - centre[0], dy = reference[i + 1] - centre[1], dz = reference[i + 2] - centre[2];
        out[i] = centre[0] + L[0] * dx + L[1] * dy + L[2] * dz;
        out[i + 1] = centre[1] + L[3] * dx + L[4] * dy + L[5] * dz;
        out[i + 2] = centre[2] + L[6] * dx + L[7] * dy + L[8] * dz;
      }
    },
  };
}
