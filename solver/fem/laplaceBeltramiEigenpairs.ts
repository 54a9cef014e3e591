import type { Mesh } from '../mesh/Mesh.ts';
import { csrAddDiagonal, csrCombine, type CsrMatrix } from '../linalg/CsrMatrix.ts';
import { SparseCholesky } from '../linalg/SparseCholesky.ts';
import { blockLanczos } from '../linalg/blockLanczos.ts';
import { symmetricEigen } from '../linalg/symmetricEigen.ts';
import { cotanStiffness } from './cotanStiffness.ts';
import { consistentMass } from './consistentMass.ts';
import { lumpedMass } from './lumpedMass.ts';

export type MassKind = 'consistent' | 'lumped';

export interface EigenpairOptions {
  /** how many of the lowest eigenpairs */
  count: number;
  /** mass matrix of the generalised problem (default consistent: the Galerkin eigenvalues) */
  mass?: MassKind;
  /** 'dense' for small meshes, 'sparse' shift-invert block Lanczos, 'auto' picks by size */
  method?: 'auto' | 'sparse' | 'dense';
  /** Lanczos residual tolerance, relative (default 1e-10) */
  tolerance?: number;
  /** Lanczos block size: the largest multiplicity resolved together (default 6) */
  block?: number;
  seed?: number;
  /** eigenvalues closer than this relative gap are reported as one cluster (default 0.01) */
  clusterTolerance?: number;
  onProgress?: (converged: number, wanted: number) => void;
  /** a stiffness and lumped mass to use instead of the mesh's cotangent ones (an intrinsic Delaunay Laplacian); implies mass 'lumped' */
  operators?: { stiffness: CsrMatrix; mass: Float64Array };
}

export interface EigenCluster {
  /** index of the first eigenvalue of the cluster */
  first: number;
  /** multiplicity: how many eigenvalues lie within the cluster tolerance */
  size: number;
  mean: number;
}

export interface Eigenpairs {
  /** ascending eigenvalues λ of K φ = λ M φ (the first is 0 on each closed or open component) */
  values: Float64Array;
  /** M-orthonormal eigenvectors (φᵢᵀ M φⱼ = δᵢⱼ), one Float64Array(nV) each */
  vectors: Float64Array[];
  clusters: EigenCluster[];
  method: 'sparse' | 'dense';
  /** shift σ of the shift-invert operator (K − σM)⁻¹M (sparse method) */
  shift: number;
  /** factorisation and Lanczos statistics (sparse method) */
  stats: { factorNonZeros: number; operatorApplications: number; restarts: number };
}

/** Below this vertex count 'auto' uses the dense solver. */
export const DENSE_EIGEN_MAX_VERTICES = 400;

/**
 * The lowest `count` eigenpairs of the P1 Laplace–Beltrami operator,
 * K φ = λ M φ with K = cotanStiffness and M = consistent (default) or lumped mass.
 * Sparse method: shift-invert with σ = −1/area (so K − σM is positive definite
 * even with the constant null space), one sparse Cholesky factorisation, block
 * Lanczos in the M inner product; eigenvalues are λ = σ + 1/θ.
 */
export function laplaceBeltramiEigenpairs(mesh: Mesh, options: EigenpairOptions): Eigenpairs {
  const n = mesh.positions.length / 3;
  const count = options.count;
  if (!Number.isInteger(count) || count < 1) throw new Error(`laplaceBeltramiEigenpairs: count must be a positive whole number, got ${count}`);
  if (count > n) throw new Error(`laplaceBeltramiEigenpairs: asked for ${count} eigenpairs but the mesh has only ${n} vertices`);
  const K = options.operators?.stiffness ?? cotanStiffness(mesh);
  const massKind = options.operators ? 'lumped' : options.mass ?? 'consistent';
  const Mc = massKind === 'consistent' ? consistentMass(mesh) : null;
  const Ml = massKind === 'lumped' ? options.operators?.mass ?? lumpedMass(mesh) : null;
  const block = options.block ?? 6;
  const method = options.method ?? 'auto';
  const useDense = method === 'dense' || (method === 'auto' && (n <= DENSE_EIGEN_MAX_VERTICES || count + 5 * block > n / 2));
  const clusterTol = options.clusterTolerance ?? 0.01;
  if (useDense) {
    const { values, vectors } = denseGeneralised(K, Mc, Ml, n, count);
    return {
      values, vectors, clusters: clusterEigenvalues(values, clusterTol), method: 'dense', shift: 0,
      stats: { factorNonZeros: 0, operatorApplications: 0, restarts: 0 },
    };
  }
  let area = 0;
  if (Mc) for (let p = 0; p < Mc.values.length; p++) area += Mc.values[p];
  else for (let i = 0; i < n; i++) area += Ml![i];
  const sigma = -1 / area;
  // A = K − σM on K's pattern (the consistent mass shares it)
  const A = Mc ? csrCombine(1, K, -sigma, Mc) : csrAddDiagonal(K, Ml!.map((m) => -sigma * m));
  const chol = new SparseCholesky(A);
  const rhs = new Float64Array(n * block);
  const work = new Float64Array(n * block);
  /** out = M x for r interleaved vectors */
  const applyMass = (x: Float64Array, r: number, out: Float64Array) => {
    if (Mc) {
      const { rowOffsets: ro, columns: ci, values: va } = Mc;
      for (let i = 0; i < n; i++) {
        const o = i * r;
        for (let c = 0; c < r; c++) out[o + c] = 0;
        for (let p = ro[i]; p < ro[i + 1]; p++) {
          const v = va[p], j = ci[p] * r;
          for (let c = 0; c < r; c++) out[o + c] += v * x[j + c];
        }
      }
    } else {
      for (let i = 0; i < n; i++) for (let c = 0; c < r; c++) out[i * r + c] = Ml![i] * x[i * r + c];
    }
  };
  const result = blockLanczos(
    {
      size: n,
      apply(x, r, out) {
        // out = (K − σM)⁻¹ M x
        applyMass(x, r, rhs);
        chol.solveMany(rhs, r, out, work);
      },
      applyInner: applyMass,
    },
    count,
    { block, tolerance: options.tolerance ?? 1e-10, seed: options.seed, onProgress: options.onProgress },
  );
  const values = new Float64Array(count);
  for (let k = 0; k < count; k++) values[k] = sigma + 1 / result.values[k];
  // λ ascending = θ descending already; clamp round-off below zero
  for (let k = 0; k < count; k++) if (values[k] < 0 && values[k] > -1e-9 * Math.abs(values[count - 1])) values[k] = 0;
  return {
    values,
    vectors: result.vectors,
    clusters: clusterEigenvalues(values, clusterTol),
    method: 'sparse',
    shift: sigma,
    stats: { factorNonZeros: chol.factorNonZeros, operatorApplications: result.operatorApplications, restarts: result.restarts },
  };
}

/** Group ascending eigenvalues whose neighbours lie within `relTol` (relative to the larger). */
export function clusterEigenvalues(values: Float64Array, relTol: number): EigenCluster[] {
  const clusters: EigenCluster[] = [];
  const scale = Math.abs(values[values.length - 1]) || 1;
  let first = 0;
  for (let i = 1; i <= values.length; i++) {
    const split =
      i === values.length || values[i] - values[i - 1] > relTol * Math.max(Math.abs(values[i]), 1e-9 * scale);
    if (split) {
      let s = 0;
      for (let k = first; k < i; k++) s += values[k];
      clusters.push({ first, size: i - first, mean: s / (i - first) });
      first = i;
    }
  }
  return clusters;
}

/** Dense generalised solve through the Cholesky factor of M (small meshes). */
function denseGeneralised(
  K: CsrMatrix, Mc: CsrMatrix | null, Ml: Float64Array | null, n: number, count: number,
): { values: Float64Array; vectors: Float64Array[] } {
  const M = new Float64Array(n * n);
  if (Mc) {
    for (let i = 0; i < n; i++) for (let p = Mc.rowOffsets[i]; p < Mc.rowOffsets[i + 1]; p++) M[i * n + Mc.columns[p]] = Mc.values[p];
  } else for (let i = 0; i < n; i++) M[i * n + i] = Ml![i];
  // M = L Lᵀ (lower L in place)
  for (let j = 0; j < n; j++) {
    let d = M[j * n + j];
    for (let k = 0; k < j; k++) d -= M[j * n + k] * M[j * n + k];
    if (!(d > 0)) throw new Error(`laplaceBeltramiEigenpairs: the mass matrix is singular at vertex ${j} (is it unreferenced?)`);
    const ljj = Math.sqrt(d);
    M[j * n + j] = ljj;
    for (let i = j + 1; i < n; i++) {
      let s = M[i * n + j];
      for (let k = 0; k < j; k++) s -= M[i * n + k] * M[j * n + k];
      M[i * n + j] = s / ljj;
    }
  }
  const C = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let p = K.rowOffsets[i]; p < K.rowOffsets[i + 1]; p++) C[i * n + K.columns[p]] = K.values[p];
  // C ← L⁻¹ C L⁻ᵀ: solve on columns, then on rows
  for (let c = 0; c < n; c++) {
    for (let i = 0; i < n; i++) {
      let s = C[i * n + c];
      for (let k = 0; k < i; k++) s -= M[i * n + k] * C[k * n + c];
      C[i * n + c] = s / M[i * n + i];
    }
  }
  for (let r = 0; r < n; r++) {
    for (let i = 0; i < n; i++) {
      let s = C[r * n + i];
      for (let k = 0; k < i; k++) s -= M[i * n + k] * C[r * n + k];
      C[r * n + i] = s / M[i * n + i];
    }
  }
  for (let i = 0; i < n; i++) for (let j = 0; j < i; j++) { const v = 0.5 * (C[i * n + j] + C[j * n + i]); C[i * n + j] = v; C[j * n + i] = v; }
  const eig = symmetricEigen(C, n);
  const values = eig.values.slice(0, count);
  for (let k = 0; k < count; k++) if (values[k] < 0 && values[k] > -1e-12 * Math.abs(eig.values[n - 1])) values[k] = 0;
  const vectors: Float64Array[] = [];
  for (let k = 0; k < count; k++) {
    // φ = L⁻ᵀ y
    const phi = new Float64Array(n);
    for (let i = 0; i < n; i++) phi[i] = eig.vectors[i * n + k];
    for (let i = n - 1; i >= 0; i--) {
      let s = phi[i];
      for (let r = i + 1; r < n; r++) s -= M[r * n + i] * phi[r];
      phi[i] = s / M[i * n + i];
    }
    vectors.push(phi);
  }
  return { values, vectors };
}
