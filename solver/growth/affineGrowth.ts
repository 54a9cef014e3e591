import type { Mesh } from '../mesh/Mesh.ts';
import { scaleFactor, type GrowthLaw, type TimeCourse } from './GrowthLaw.ts';

/**
 * Growth by scaling about a centre, x(t) = c + diag(ρ_x(t), ρ_y(t), ρ_z(t))(X − c):
 * uniform isotropic when the three rates are equal, anisotropic (say, a
 * proximal–distal elongation along x) otherwise. Each ρ follows the time course.
 */
export function affineGrowth(reference: Float64Array, rates: [number, number, number], course: TimeCourse, centre: [number, number, number], capacity?: number): GrowthLaw {
  const uniform = rates[0] === rates[1] && rates[1] === rates[2];
  const scales = (t: number) => rates.map((r) => scaleFactor(course, r, t, capacity)) as [number, number, number];
  return {
    description: uniform
      ? `uniform ${course} scaling about (${centre.join(', ')}) at rate ${rates[0]}${course === 'logistic' ? `, up to ${capacity}×` : ''}`
      : `anisotropic ${course} scaling about (${centre.join(', ')}) at rates x ${rates[0]}, y ${rates[1]}, z ${rates[2]}`,
    scaleAt: uniform ? (t) => scaleFactor(course, rates[0], t, capacity) : undefined,
    advance(_mesh: Mesh, _t0: number, t1: number, out: Float64Array) {
      const s = scales(t1);
      for (let i = 0; i < reference.length; i += 3) {
        out[i] = centre[0] + s[0] * (reference[i] - centre[0]);
        out[i + 1] = centre[1] + s[1] * (reference[i + 1] - centre[1]);
        out[i + 2] = centre[2] + s[2] * (reference[i + 2] - centre[2]);
      }
    },
    maxSpeed(_mesh: Mesh, t0: number, t1: number) {
      const a = scales(t0), b = scales(t1);
      let far = 0;
      for (let i = 0; i < reference.length; i += 3) {
        far = Math.max(far, Math.hypot((b[0] - a[0]) * (reference[i] - centre[0]), (b[1] - a[1]) * (reference[i + 1] - centre[1]), (b[2] - a[2]) * (reference[i + 2] - centre[2])));
      }
      return far / Math.max(t1 - t0, 1e-300);
    },
  };
}
