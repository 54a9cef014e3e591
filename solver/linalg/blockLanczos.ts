import { seededRandom } from './seededRandom.ts';
import { symmetricEigen } from './symmetricEigen.ts';
import { basisDots, basisSubtract, basisCombine, mulUpper } from './basisKernels.ts';

/**
 * A linear operator that is self-adjoint in the inner product ⟨x, y⟩ = xᵀBy
 * (B symmetric positive definite), whose largest eigenvalues are wanted.
 * Blocks of r vectors are stored interleaved: x[i·r + c] is entry i of vector c.
 */
export interface SelfAdjointOperator {
  readonly size: number;
  /** out = Op·x for a block of r vectors */
  apply(x: Float64Array, r: number, out: Float64Array): void;
  /** out = B·x for a block of r vectors */
  applyInner(x: Float64Array, r: number, out: Float64Array): void;
}

export interface LanczosOptions {
  /** vectors per block: at least the largest multiplicity wanted (default 6) */
  block?: number;
  /** basis size at which to restart (rounded to whole blocks; default max(2·count, count + 4·block)) */
  maxBasis?: number;
  /** converged when ‖Op·y − θy‖_B ≤ tolerance·|θ| (default 1e-10) */
  tolerance?: number;
  maxRestarts?: number;
  seed?: number;
  /** called after each Rayleigh–Ritz step with (converged, wanted) */
  onProgress?: (converged: number, wanted: number) => void;
}

export interface LanczosResult {
  /** largest eigenvalues, descending */
  values: Float64Array;
  /** B-orthonormal eigenvectors, one Float64Array(n) each */
  vectors: Float64Array[];
  /** residual norms ‖Op·y − θy‖_B */
  residuals: Float64Array;
  restarts: number;
  operatorApplications: number;
}

/**
 * Largest `count` eigenpairs of a B-self-adjoint operator by block Lanczos with
 * full B-reorthogonalisation (block classical Gram–Schmidt, twice) and thick
 * restarts (K. Wu & H. Simon, SIAM J. Matrix Anal. Appl. 22 (2000) 602–616, in
 * block form). T = VᵀB·Op·V is formed from the orthogonalisation coefficients;
 * the new block is B-orthonormalised by Cholesky QR, twice. A restart keeps the
 * best Ritz vectors and the pending block. Eigenvalues of multiplicity up to
 * `block` converge together.
 */
export function blockLanczos(op: SelfAdjointOperator, count: number, options: LanczosOptions = {}): LanczosResult {
  const n = op.size;
  const b = Math.max(1, Math.min(options.block ?? 6, n));
  if (count < 1 || count > n) throw new Error(`blockLanczos: asked for ${count} eigenpairs of a ${n}×${n} operator`);
  let m = options.maxBasis ?? Math.max(2 * count, count + 4 * b);
  m = Math.min(Math.ceil(m / b) * b, Math.floor((n - 2 * b) / b) * b);
  if (m < count + b) {
    throw new Error(`blockLanczos: the operator (size ${n}) is too small for ${count} eigenpairs with block ${b}; use a dense solver`);
  }
  const tol = options.tolerance ?? 1e-10;
  const maxRestarts = options.maxRestarts ?? 300;
  const rand = seededRandom(options.seed ?? 12345);
  const mm = m + b; // a restart may leave the basis off a block boundary
  const V: Float64Array[] = [];
  const T = new Float64Array(mm * mm); // column-major, upper triangle: T[i + c·mm], i ≤ c
  const X = new Float64Array(n * b);
  const Y = new Float64Array(n * b);
  const Z = new Float64Array(n * b);
  const H = new Float64Array((mm + b) * b);
  const H2 = new Float64Array((mm + b) * b);
  const R = new Float64Array(b * b);
  let applications = 0;

  const Zc = new Float64Array(n * b); // column-major copy of a block: Zc[c·n + k]
  const Yc = new Float64Array(n * b);
  const toColumns = (x: Float64Array, out: Float64Array) => {
    for (let k = 0; k < n; k++) for (let c = 0; c < b; c++) out[c * n + k] = x[k * b + c];
  };
  const toInterleaved = (x: Float64Array, out: Float64Array) => {
    for (let k = 0; k < n; k++) for (let c = 0; c < b; c++) out[k * b + c] = x[c * n + k];
  };
  /**
   * Orthogonalise block y against V[0..upto) twice (classical Gram–Schmidt),
   * adding the coefficients into `h` (if given). With `localFrom`, the first pass
   * only runs over V[localFrom..upto): in exact arithmetic Op·v of a Lanczos block
   * has no component on older vectors, so the full second pass only removes
   * round-off (the three-term recurrence plus full reorthogonalisation).
   */
  const orthogonalise = (upto: number, y: Float64Array, h: Float64Array | null, localFrom = 0) => {
    if (h) h.fill(0, 0, upto * b);
    for (let pass = 0; pass < 2; pass++) {
      const from = pass === 0 ? localFrom : 0;
      op.applyInner(y, b, Z);
      toColumns(Z, Zc);
      basisDots(V, from, upto - from, Zc, n, b, H2);
      toColumns(y, Yc);
      basisSubtract(V, from, upto - from, H2, Yc, n, b);
      toInterleaved(Yc, y);
      if (h) for (let q = 0; q < (upto - from) * b; q++) h[from * b + q] += H2[q];
    }
  };
  /**
   * B-orthonormalise the block y in place (Cholesky QR); returns the upper
   * triangular R (y_before = y_after·R) and marks columns with no new direction.
   */
  const cholQr = (y: Float64Array, r: Float64Array, deficient: Uint8Array): void => {
    op.applyInner(y, b, Z);
    const G = new Float64Array(b * b);
    for (let k = 0; k < n; k++) {
      const o = k * b;
      for (let c = 0; c < b; c++) {
        const yc = y[o + c];
        for (let d = c; d < b; d++) G[c * b + d] += yc * Z[o + d];
      }
    }
    r.fill(0);
    let scale = 0;
    for (let c = 0; c < b; c++) scale = Math.max(scale, G[c * b + c]);
    for (let c = 0; c < b; c++) {
      for (let d = c; d < b; d++) {
        let s = G[c * b + d];
        for (let q = 0; q < c; q++) s -= r[q * b + c] * r[q * b + d];
        if (d === c) {
          if (!(s > 1e-24 * Math.max(scale, 1e-300)) || deficient[c]) {
            deficient[c] = 1;
            r[c * b + c] = 0;
            break;
          }
          r[c * b + c] = Math.sqrt(s);
        } else r[c * b + d] = s / r[c * b + c];
      }
    }
    // y ← y R⁻¹ on the non-deficient columns
    for (let k = 0; k < n; k++) {
      const o = k * b;
      for (let c = 0; c < b; c++) {
        if (deficient[c]) continue;
        let s = y[o + c];
        for (let q = 0; q < c; q++) if (!deficient[q]) s -= y[o + q] * r[q * b + c];
        y[o + c] = s / r[c * b + c];
      }
    }
  };
  /** Turn the block into B-orthonormal vectors orthogonal to V; returns R. */
  const orthonormalise = (upto: number, y: Float64Array, rOut: Float64Array) => {
    const deficient = new Uint8Array(b);
    const r1 = new Float64Array(b * b);
    const r2 = new Float64Array(b * b);
    cholQr(y, r1, deficient);
    for (let attempt = 0; deficient.some((d) => d === 1); attempt++) {
      if (attempt > 5) throw new Error('blockLanczos: cannot extend the basis (operator rank exhausted)');
      // replace directions the operator did not supply by random ones
      for (let c = 0; c < b; c++) if (deficient[c]) for (let k = 0; k < n; k++) y[k * b + c] = rand() - 0.5;
      orthogonalise(upto, y, null);
      const again = new Uint8Array(b);
      cholQr(y, r2, again);
      if (!again.some((d) => d === 1)) {
        // the replaced columns carry no coupling
        for (let c = 0; c < b; c++) if (deficient[c]) for (let q = 0; q < b; q++) r1[q * b + c] = 0;
        deficient.fill(0);
        // fold r2 in below
        mulUpper(r2, r1, b, rOut);
        r1.set(rOut);
      }
    }
    // second Cholesky QR for orthogonality to working precision
    const none = new Uint8Array(b);
    cholQr(y, r2, none);
    mulUpper(r2, r1, b, rOut);
  };
  const appendBlock = (y: Float64Array) => {
    for (let c = 0; c < b; c++) {
      const v = new Float64Array(n);
      for (let k = 0; k < n; k++) v[k] = y[k * b + c];
      V.push(v);
    }
  };

  // Starting block: random, orthonormalised.
  for (let k = 0; k < n * b; k++) Y[k] = rand() - 0.5;
  orthonormalise(0, Y, R);
  appendBlock(Y);
  let processed = 0;
  let restarts = 0;
  let restartedAt = 0;

  for (;;) {
    while (processed < m) {
      const c0 = processed;
      for (let k = 0; k < n; k++) for (let c = 0; c < b; c++) X[k * b + c] = V[c0 + c][k];
      op.apply(X, b, Y);
      applications += b;
      const upto = V.length; // = c0 + b
      // right after a restart the block couples to every kept Ritz vector
      orthogonalise(upto, Y, H, c0 === restartedAt ? 0 : Math.max(0, c0 - b));
      for (let c = 0; c < b; c++) for (let i = 0; i <= c0 + c; i++) T[i + (c0 + c) * mm] = H[i * b + c];
      orthonormalise(upto, Y, R);
      appendBlock(Y);
      processed += b;
    }
    const msize = processed;
    const Ts = new Float64Array(msize * msize);
    for (let c = 0; c < msize; c++)
      for (let i = 0; i <= c; i++) {
        const v = T[i + c * mm];
        Ts[i * msize + c] = v;
        Ts[c * msize + i] = v;
      }
    const eig = symmetricEigen(Ts, msize);
    const values = new Float64Array(msize);
    const ritz = new Float64Array(msize * msize); // ritz[i·msize + k]: component i of Ritz vector k
    for (let k = 0; k < msize; k++) {
      values[k] = eig.values[msize - 1 - k];
      for (let i = 0; i < msize; i++) ritz[i * msize + k] = eig.vectors[i * msize + (msize - 1 - k)];
    }
    // ‖Op·y_k − θ_k y_k‖ = ‖R · s_k(last block rows)‖
    const residual = new Float64Array(msize);
    for (let k = 0; k < msize; k++) {
      let s2 = 0;
      for (let r = 0; r < b; r++) {
        let s = 0;
        for (let c = r; c < b; c++) s += R[r * b + c] * ritz[(msize - b + c) * msize + k];
        s2 += s * s;
      }
      residual[k] = Math.sqrt(s2);
    }
    let converged = 0;
    while (converged < count && residual[converged] <= tol * Math.abs(values[converged])) converged++;
    options.onProgress?.(converged, count);
    if (converged >= count || restarts >= maxRestarts) {
      if (converged < count) {
        throw new Error(
          `blockLanczos: only ${converged} of ${count} eigenpairs converged after ${restarts} restarts (worst residual ${residual[count - 1].toExponential(2)}); ask for fewer modes or a looser tolerance`,
        );
      }
      return {
        values: values.slice(0, count),
        vectors: basisCombine(V, ritz, msize, count, n),
        residuals: residual.slice(0, count),
        restarts,
        operatorApplications: applications,
      };
    }
    const keep = Math.min(msize - b, Math.max(count + b, Math.floor((msize + count) / 2)));
    const kept = basisCombine(V, ritz, msize, keep, n);
    const pending = V.slice(msize, msize + b);
    V.length = 0;
    for (const v of kept) V.push(v);
    for (const v of pending) V.push(v);
    T.fill(0);
    for (let k = 0; k < keep; k++) T[k + k * mm] = values[k];
    processed = keep;
    restartedAt = keep;
    restarts++;
  }
}
