/**
 * The dense kernels of block Lanczos on its basis V (n-vectors): inner
 * products with a block, subtracting the projection, recombining at a restart.
 * Rows are swept in chunks that stay in L1 cache, four basis vectors at a time,
 * so each pass over a block of right-hand sides reads V once.
 */

/** Rows per chunk in the blocked basis loops: the block chunk stays in L1 cache. */
const CHUNK = 512;

/**
 * One cache-blocked sweep over the basis vectors V[from … from + upto) against
 * a block of b columns of length n (column-major): either the inner products
 * h[i·b + c] = V[from + i]ᵀ x_c (`subtract` false; h is overwritten), or the
 * projection removed, x_c −= Σ_i V[from + i]·h[i·b + c] (`subtract` true).
 * The two are each other's transpose and share one loop nest: rows in chunks
 * that stay in L1 cache, four basis vectors at a time, so each pass over the
 * block reads V once.
 */
function basisSweep(V: readonly Float64Array[], from: number, upto: number, x: Float64Array, n: number, b: number, h: Float64Array, subtract: boolean): void {
  if (!subtract) h.fill(0, 0, upto * b);
  for (let k0 = 0; k0 < n; k0 += CHUNK) {
    const k1 = Math.min(n, k0 + CHUNK);
    let i = 0;
    for (; i + 3 < upto; i += 4) {
      const v0 = V[from + i], v1 = V[from + i + 1], v2 = V[from + i + 2], v3 = V[from + i + 3];
      for (let c = 0; c < b; c++) {
        const off = c * n;
        if (subtract) {
          const h0 = h[i * b + c], h1 = h[(i + 1) * b + c], h2 = h[(i + 2) * b + c], h3 = h[(i + 3) * b + c];
          for (let k = k0; k < k1; k++) x[off + k] -= h0 * v0[k] + h1 * v1[k] + h2 * v2[k] + h3 * v3[k];
        } else {
          let s0 = 0, s1 = 0, s2 = 0, s3 = 0;
          for (let k = k0; k < k1; k++) {
            const xk = x[off + k];
            s0 += v0[k] * xk;
            s1 += v1[k] * xk;
            s2 += v2[k] * xk;
            s3 += v3[k] * xk;
          }
          h[i * b + c] += s0;
          h[(i + 1) * b + c] += s1;
          h[(i + 2) * b + c] += s2;
          h[(i + 3) * b + c] += s3;
        }
      }
    }
    for (; i < upto; i++) {
      const v = V[from + i];
      for (let c = 0; c < b; c++) {
        const off = c * n;
        if (subtract) {
          const hc = h[i * b + c];
          for (let k = k0; k < k1; k++) x[off + k] -= hc * v[k];
        } else {
          let s0 = 0;
          for (let k = k0; k < k1; k++) s0 += v[k] * x[off + k];
          h[i * b + c] += s0;
        }
      }
    }
  }
}

/** h[i·b + c] = V[from + i]ᵀ z_c for i < upto (z column-major, b columns of n). */
export function basisDots(V: readonly Float64Array[], from: number, upto: number, z: Float64Array, n: number, b: number, h: Float64Array): void {
  basisSweep(V, from, upto, z, n, b, h, false);
}

/** y_c −= Σ_i V[from + i]·h[i·b + c] for i < upto (y column-major). */
export function basisSubtract(V: readonly Float64Array[], from: number, upto: number, h: Float64Array, y: Float64Array, n: number, b: number): void {
  basisSweep(V, from, upto, y, n, b, h, true);
}

/** out = A·B for upper triangular b×b matrices (row-major). */
export function mulUpper(a: Float64Array, bm: Float64Array, b: number, out: Float64Array): void {
  out.fill(0);
  for (let i = 0; i < b; i++)
    for (let j = i; j < b; j++) {
      let s = 0;
      for (let k = i; k <= j; k++) s += a[i * b + k] * bm[k * b + j];
      out[i * b + j] = s;
    }
}

/** Columns Σ_i V[i]·S[i, k] for k < count; four basis vectors per sweep. */
export function basisCombine(V: readonly Float64Array[], S: Float64Array, msize: number, count: number, n: number): Float64Array[] {
  const out: Float64Array[] = [];
  for (let k = 0; k < count; k++) out.push(new Float64Array(n));
  for (let k0 = 0; k0 < n; k0 += CHUNK) {
    const k1 = Math.min(n, k0 + CHUNK);
    let i = 0;
    for (; i + 3 < msize; i += 4) {
      const v0 = V[i], v1 = V[i + 1], v2 = V[i + 2], v3 = V[i + 3];
      for (let k = 0; k < count; k++) {
        const s0 = S[i * msize + k], s1 = S[(i + 1) * msize + k], s2 = S[(i + 2) * msize + k], s3 = S[(i + 3) * msize + k];
        const o = out[k];
        for (let q = k0; q < k1; q++) o[q] += s0 * v0[q] + s1 * v1[q] + s2 * v2[q] + s3 * v3[q];
      }
    }
    for (; i < msize; i++) {
      const v = V[i];
      for (let k = 0; k < count; k++) {
        const s = S[i * msize + k];
        const o = out[k];
        for (let q = k0; q < k1; q++) o[q] += s * v[q];
      }
    }
  }
  return out;
}
