import type { Eigenpairs } from '../fem/laplaceBeltramiEigenpairs.ts';
import { growthRate } from './dispersion.ts';

export interface SurfaceModeRate {
  index: number;
  eigenvalue: number;
  rate: number;
}

export interface PredictedPattern {
  /** first index of the fastest-growing eigenvalue cluster (a multiple eigenvalue counts once) */
  index: number;
  eigenvalue: number;
  rate: number;
  multiplicity: number;
}

/**
 * Growth rate of every computed surface mode: the largest real eigenvalue of
 * J − λ_j·diag(D) with λ_j the mode's Laplace–Beltrami eigenvalue. The modes
 * with positive rate are those in the unstable band; the fastest cluster is the
 * predicted initial pattern (Chaplain, Ganesh & Graham, J. Math. Biol. 42 (2001)).
 */
export function surfaceModeRates(jacobian: readonly number[], diffusion: readonly number[], eig: Eigenpairs): { rates: SurfaceModeRate[]; unstable: SurfaceModeRate[]; predicted: PredictedPattern | null } {
  const rates = Array.from(eig.values, (eigenvalue, index) => ({ index, eigenvalue, rate: growthRate(jacobian, diffusion, eigenvalue) }));
  let predicted: PredictedPattern | null = null;
  for (const c of eig.clusters) {
    if (c.first === 0 && c.mean < 1e-9 * (eig.values[eig.values.length - 1] || 1)) continue; // the constant mode
    const rate = growthRate(jacobian, diffusion, c.mean);
    if (rate > 0 && (!predicted || rate > predicted.rate)) predicted = { index: c.first, eigenvalue: c.mean, rate, multiplicity: c.size };
  }
  return { rates, unstable: rates.filter((r) => r.rate > 0 && r.index > 0), predicted };
}
