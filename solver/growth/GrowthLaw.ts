import type { Mesh } from '../mesh/Mesh.ts';

/**
 * How the tissue moves. `advance` takes the positions at time t0 and returns
 * (into `out`) the positions at t1 > t0. Analytic laws compute them from the
 * reference surface; field laws integrate the velocity from t0.
 */
export interface GrowthLaw {
  /** one line for records and logs */
  readonly description: string;
  advance(mesh: Mesh, t0: number, t1: number, out: Float64Array): void;
  /** for a similarity (uniform scaling): the linear scale factor at time t, so eigenvalues go as λ(0)/ρ(t)² */
  readonly similarity?: (t: number) => number;
}

export type TimeCourse = 'exponential' | 'linear' | 'logistic';

/**
 * Linear scale factor ρ(t) with ρ(0) = 1 and initial relative rate r:
 * exponential e^{rt}; linear 1 + rt; logistic with carrying scale K:
 * K / (1 + (K − 1)e^{−rKt/(K−1)}), whose initial rate is also r.
 */
export function scaleFactor(course: TimeCourse, rate: number, t: number, capacity = 2): number {
  switch (course) {
    case 'exponential': return Math.exp(rate * t);
    case 'linear': return 1 + rate * t;
    case 'logistic': {
      const k = capacity;
      return k / (1 + (k - 1) * Math.exp((-rate * k * t) / (k - 1)));
    }
  }
}
