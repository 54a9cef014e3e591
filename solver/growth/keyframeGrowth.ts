import type { Mesh } from '../mesh/Mesh.ts';
import type { GrowthLaw } from './GrowthLaw.ts';

export type KeyframeInterpolation = 'linear' | 'cubic';

/**
 * Growth through a sequence of stages of one surface (same vertices and
 * triangles), each at its time; the first is the start (t = 0). Between stages
 * the positions are interpolated piecewise linearly, or by cubic Hermite
 * segments with finite-difference (Catmull–Rom) tangents for non-uniform
 * times, which makes the motion C¹. After the last stage the surface stays.
 */
export function keyframeGrowth(times: readonly number[], stages: readonly Float64Array[], interpolation: KeyframeInterpolation, description: string): GrowthLaw {
  const k = stages.length;
  const tangent = (j: number, i: number): number => {
    if (interpolation === 'linear') return 0;
    const a = Math.max(0, j - 1), b = Math.min(k - 1, j + 1);
    if (a === b) return 0;
    return (stages[b][i] - stages[a][i]) / (times[b] - times[a]);
  };
  const at = (t: number, out: Float64Array) => {
    if (t <= times[0]) { out.set(stages[0]); return; }
    if (t >= times[k - 1]) { out.set(stages[k - 1]); return; }
    let j = 0;
    while (times[j + 1] < t) j++;
    const h = times[j + 1] - times[j];
    const s = (t - times[j]) / h;
    const p0 = stages[j], p1 = stages[j + 1];
    if (interpolation === 'linear') {
      for (let i = 0; i < out.length; i++) out[i] = p0[i] + s * (p1[i] - p0[i]);
      return;
    }
    const h00 = 2 * s ** 3 - 3 * s ** 2 + 1, h10 = s ** 3 - 2 * s ** 2 + s, h01 = -2 * s ** 3 + 3 * s ** 2, h11 = s ** 3 - s ** 2;
    for (let i = 0; i < out.length; i++) out[i] = h00 * p0[i] + h10 * h * tangent(j, i) + h01 * p1[i] + h11 * h * tangent(j + 1, i);
  };
  return {
    description,
    advance(_mesh: Mesh, _t0: number, t1: number, out: Float64Array) {
      at(t1, out);
    },
  };
}
