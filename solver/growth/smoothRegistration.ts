import { SurfaceProjector } from '../mesh/surfaceProjector.ts';
import { meshTopology } from '../mesh/meshTopology.ts';
import { vertexSparsityPattern } from '../fem/vertexSparsityPattern.ts';
import { SparseCholesky } from '../linalg/SparseCholesky.ts';
import type { CsrMatrix } from '../linalg/CsrMatrix.ts';
import { LANDMARK_WEIGHT, type SurfaceCorrespondences } from './surfaceCorrespondences.ts';
import type { StageLandmark } from './mapOntoSurface.ts';

/** Membrane stiffness of the smooth registration, lowered in steps: the length over which a displacement is smoothed, as a fraction of √(area). */
export const REGISTRATION_STIFFNESS_LENGTHS = [0.3, 0.15, 0.08, 0.04, 0.02] as const;
/** Registration rounds (closest points, then a solve) at each stiffness. */
export const REGISTRATION_ROUNDS = 2;

/**
 * Move the source's positions x (in place, from where the global map put
 * them) smoothly towards the target: each round, with the correspondences
 * of the current positions, X minimises
 *   Σ wᵢ|xᵢ − cᵢ|² + Σ vⱼ|x(ξⱼ) − yⱼ|² + Σ λ|x(ℓ) − L|² + α Σ_edges |(xₐ − x_b) − (x⁰ₐ − x⁰_b)|²
 * (closest points both ways, landmarks, and a membrane stiffness on the
 * displacement from x⁰ = x at the start), with α lowered in steps as in
 * non-rigid ICP (Amberg, Romdhani & Vetter, CVPR 2007, there with per-vertex
 * affine maps). The normal equations live on the mesh's vertex pattern (a
 * target point couples the corners of the triangle it lands in): one sparse
 * Cholesky refactorisation and three solves per round.
 */
export function smoothRegistration(x: Float64Array, corr: SurfaceCorrespondences, landmarks: readonly StageLandmark[], onRound: () => void): void {
  const { source, target } = corr;
  const n = source.positions.length / 3, m = target.positions.length / 3;
  const x0 = Float64Array.from(x);
  const pattern = vertexSparsityPattern(source);
  const topo = meshTopology(source);
  const nnz = pattern.columns.length;
  // the graph Laplacian (uniform weights): always positive semi-definite, whatever the triangles' shapes
  const laplacian = new Float64Array(nnz);
  for (let e = 0; e < topo.edgeCount; e++) {
    const a = topo.edges[2 * e], b = topo.edges[2 * e + 1];
    laplacian[pattern.edgeSlots[2 * e]] = -1;
    laplacian[pattern.edgeSlots[2 * e + 1]] = -1;
    laplacian[pattern.diagonalSlots[a]] += 1;
    laplacian[pattern.diagonalSlots[b]] += 1;
  }
  const a: CsrMatrix = { rows: n, cols: n, rowOffsets: pattern.rowOffsets, columns: pattern.columns, values: new Float64Array(nnz) };
  const lx0 = new Float64Array(3 * n);
  for (let i = 0; i < n; i++) {
    for (let s = pattern.rowOffsets[i]; s < pattern.rowOffsets[i + 1]; s++) {
      const j = pattern.columns[s], v = laplacian[s];
      lx0[3 * i] += v * x0[3 * j]; lx0[3 * i + 1] += v * x0[3 * j + 1]; lx0[3 * i + 2] += v * x0[3 * j + 2];
    }
  }
  const rhs = new Float64Array(3 * n), work = new Float64Array(3 * n);
  const slot = (i: number, j: number) => {
    if (i === j) return pattern.diagonalSlots[i];
    let lo = pattern.rowOffsets[i], hi = pattern.rowOffsets[i + 1] - 1;
    while (lo <= hi) {
      const mid = (lo + hi) >> 1, c = pattern.columns[mid];
      if (c === j) return mid;
      if (c < j) lo = mid + 1; else hi = mid - 1;
    }
    return -1;
  };
  /** a point of the source (corners k, weights w) drawn to y with a weight */
  const addPoint = (k: ArrayLike<number>, w: ArrayLike<number>, weight: number, y0: number, y1: number, y2: number) => {
    for (let r = 0; r < 3; r++) {
      const wr = weight * w[r];
      if (wr === 0) continue;
      rhs[3 * k[r]] += wr * y0; rhs[3 * k[r] + 1] += wr * y1; rhs[3 * k[r] + 2] += wr * y2;
      for (let c = 0; c < 3; c++) {
        const s = slot(k[r], k[c]);
        if (s >= 0) a.values[s] += wr * w[c];
      }
    }
  };
  const allSource = iota(n), allTarget = iota(m);
  const { closest, closestWeight, backCorners, backWeights, backWeight } = corr;
  const y = target.positions;
  let chol: SparseCholesky | undefined;
  const onMoving = new SurfaceProjector({ positions: x, triangles: source.triangles });
  for (const length of REGISTRATION_STIFFNESS_LENGTHS) {
    const alpha = (length * length) / 1.73; // Σ_edges |Δd|² ≈ 1.73 ∫|∇d|² on a regular mesh; the data terms sum to 1 over the area
    for (let round = 0; round < REGISTRATION_ROUNDS; round++) {
      corr.sourceToTarget(x, allSource, corr.wSource);
      onMoving.refit(x);
      corr.targetToSource(onMoving, x, corr.xNormals, allTarget, corr.wTarget);
      for (let s = 0; s < nnz; s++) a.values[s] = alpha * laplacian[s];
      for (let i = 0; i < 3 * n; i++) rhs[i] = alpha * lx0[i];
      for (let i = 0; i < n; i++) {
        const w = closestWeight[i];
        a.values[pattern.diagonalSlots[i]] += w + 1e-12;
        rhs[3 * i] += w * closest[3 * i]; rhs[3 * i + 1] += w * closest[3 * i + 1]; rhs[3 * i + 2] += w * closest[3 * i + 2];
      }
      for (let j = 0; j < m; j++) if (backWeight[j] > 0) addPoint(backCorners.subarray(3 * j, 3 * j + 3), backWeights.subarray(3 * j, 3 * j + 3), backWeight[j], y[3 * j], y[3 * j + 1], y[3 * j + 2]);
      for (const l of landmarks) addPoint(l.corners, l.weights, LANDMARK_WEIGHT, l.target[0], l.target[1], l.target[2]);
      chol = chol ? chol.refactor(a) : new SparseCholesky(a);
      chol.solveMany(rhs, 3, x, work);
      onRound();
    }
  }
}

function iota(n: number): Uint32Array {
  const out = new Uint32Array(n);
  for (let i = 0; i < n; i++) out[i] = i;
  return out;
}
