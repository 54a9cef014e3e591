import type { ReactionDiffusionSystem } from './ReactionDiffusionSystem.ts';
import { diffusionStiffness } from './diffusionStiffness.ts';
import type { CsrMatrix } from '../linalg/CsrMatrix.ts';
import { seededRandom } from '../linalg/seededRandom.ts';

export interface ExplicitStepLimit {
  /**
   * Steps above this are certainly unstable: 2/(D·λ̃) with λ̃ a Rayleigh-quotient
   * (lower) estimate of λ_max(M⁻¹K), so 2/(D·λ̃) ≥ 2/(D·λ_max).
   */
  readonly unstableAbove: number;
  /**
   * Steps up to this keep the diffusion update a convex combination of
   * neighbouring values (stable and positivity-preserving):
   * 1/(D·max_i K_ii/m_i), valid when every off-diagonal of K is ≤ 0,
   * otherwise half the Gershgorin bound 2/(D·max_i Σ_j|K_ij|/m_i).
   */
  readonly safeUpTo: number;
  /** the estimate of D·λ_max(M⁻¹K) behind `unstableAbove` */
  readonly largestRate: number;
}

/**
 * Forward-Euler stability of m·u' = −D·K·u (lumped mass m) needs
 * dt ≤ 2/(D·λ_max(M⁻¹K)). λ_max is estimated by power iteration on the
 * symmetric M^{-1/2} K M^{-1/2}; the positivity bound comes from the rows.
 * `coefficient` is D (a number) or, for a D-weighted K, 1.
 */
export function explicitStepLimit(k: CsrMatrix, mass: Float64Array, coefficient = 1, iterations = 150, seed = 1): ExplicitStepLimit {
  const n = k.rows;
  const { rowOffsets: ro, columns: ci, values: kv } = k;
  let diagonalBound = 0, rowSumBound = 0;
  let allNonPositive = true;
  for (let i = 0; i < n; i++) {
    let diag = 0, abs = 0;
    for (let p = ro[i]; p < ro[i + 1]; p++) {
      if (ci[p] === i) diag = kv[p];
      else if (kv[p] > 0) allNonPositive = false;
      abs += Math.abs(kv[p]);
    }
    diagonalBound = Math.max(diagonalBound, diag / mass[i]);
    rowSumBound = Math.max(rowSumBound, abs / mass[i]);
  }
  const rowBound = allNonPositive ? diagonalBound : rowSumBound;
  const safeUpTo = rowBound > 0 ? 1 / (coefficient * rowBound) : Infinity;
  const invSqrt = new Float64Array(n);
  for (let i = 0; i < n; i++) invSqrt[i] = 1 / Math.sqrt(mass[i]);
  const rand = seededRandom(seed);
  let x = new Float64Array(n);
  let y = new Float64Array(n);
  for (let i = 0; i < n; i++) x[i] = rand() - 0.5;
  let rq = 0;
  for (let it = 0; it < iterations; it++) {
    let norm = 0;
    for (let i = 0; i < n; i++) norm += x[i] * x[i];
    norm = Math.sqrt(norm);
    if (norm === 0) break;
    for (let i = 0; i < n; i++) x[i] /= norm;
    let xy = 0;
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let p = ro[i]; p < ro[i + 1]; p++) s += kv[p] * invSqrt[ci[p]] * x[ci[p]];
      y[i] = invSqrt[i] * s;
      xy += x[i] * y[i];
    }
    rq = xy;
    const t = x; x = y; y = t;
  }
  const largestRate = coefficient * rq;
  return { unstableAbove: largestRate > 0 ? 2 / largestRate : Infinity, safeUpTo, largestRate };
}

/**
 * The explicit-step bounds of a whole system: the tightest over the species
 * (constant D on the shared K; a field D on its own D-weighted K).
 */
export function systemExplicitLimit(system: ReactionDiffusionSystem, stiffness: CsrMatrix, mass: Float64Array): ExplicitStepLimit {
  const candidates: ExplicitStepLimit[] = [];
  const dMax = Math.max(0, ...system.diffusion.map((d) => (typeof d === 'number' ? d : 0)));
  if (dMax > 0) candidates.push(explicitStepLimit(stiffness, mass, dMax));
  for (const d of system.diffusion) {
    if (typeof d === 'number') continue;
    const k = diffusionStiffness(system.mesh, d, stiffness).matrix;
    candidates.push(explicitStepLimit(k, mass, 1));
  }
  return candidates.reduce(
    (w, c) => ({ unstableAbove: Math.min(w.unstableAbove, c.unstableAbove), safeUpTo: Math.min(w.safeUpTo, c.safeUpTo), largestRate: Math.max(w.largestRate, c.largestRate) }),
    { unstableAbove: Infinity, safeUpTo: Infinity, largestRate: 0 },
  );
}
