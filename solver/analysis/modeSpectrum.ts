import type { Eigenpairs } from '../fem/laplaceBeltramiEigenpairs.ts';

export interface ClusterPower {
  first: number;
  size: number;
  eigenvalue: number;
  /** Σ a_j² over the cluster's modes */
  power: number;
}

export interface ModeSpectrum {
  /** a_j = φ_jᵀ M f for every computed mode (φ_j M-orthonormal) */
  coefficients: Float64Array;
  clusters: ClusterPower[];
  /** the non-constant cluster with the most power, and its share of the power in the computed non-constant modes */
  dominant: (ClusterPower & { fraction: number }) | null;
}

/**
 * Project a field on the surface eigenmodes (computed with the same mass
 * matrix `mass`, diagonal/lumped here) and sum the power per eigenvalue
 * cluster. The dominant non-constant cluster gives the pattern's wavenumber
 * k² (wavelength 2π/k), to set beside the predicted fastest eigenvalue.
 */
export function modeSpectrum(field: ArrayLike<number>, mass: Float64Array, eig: Eigenpairs): ModeSpectrum {
  const n = mass.length;
  const coefficients = new Float64Array(eig.vectors.length);
  for (let j = 0; j < eig.vectors.length; j++) {
    const phi = eig.vectors[j];
    let s = 0;
    for (let i = 0; i < n; i++) s += mass[i] * phi[i] * field[i];
    coefficients[j] = s;
  }
  const clusters = eig.clusters.map((c) => {
    let power = 0;
    for (let j = c.first; j < c.first + c.size; j++) power += coefficients[j] * coefficients[j];
    return { first: c.first, size: c.size, eigenvalue: c.mean, power };
  });
  const varying = clusters.filter((c) => c.first > 0);
  const total = varying.reduce((a, c) => a + c.power, 0);
  let dominant: ModeSpectrum['dominant'] = null;
  for (const c of varying) if (c.power > 0 && (!dominant || c.power > dominant.power)) dominant = { ...c, fraction: c.power / total };
  return { coefficients, clusters, dominant };
}
