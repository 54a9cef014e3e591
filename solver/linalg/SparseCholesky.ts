import type { CsrMatrix } from './CsrMatrix.ts';
import { nestedDissectionOrder } from './nestedDissectionOrder.ts';

/**
 * Sparse Cholesky factorisation P·A·Pᵀ = L·Lᵀ of a symmetric positive definite
 * CSR matrix (both triangles stored, as the mesh operators are).
 *
 * Two tiers: `new SparseCholesky(A)` analyses the pattern once (nested-dissection
 * order, elimination tree, column counts) and factorises; `refactor(A)` reuses the
 * analysis for new values on the same pattern (a moved mesh, a new time step);
 * `solve` and `solveMany` run the triangular solves without allocating.
 *
 * Numerics: up-looking (row-by-row) factorisation over the elimination tree
 * (T. Davis, "Direct Methods for Sparse Linear Systems", SIAM 2006, ch. 4).
 * L is stored by column with the diagonal first.
 */
export class SparseCholesky {
  readonly size: number;
  /** order[k] = original index eliminated k-th; inverse in `position`. */
  readonly order: Uint32Array;
  readonly position: Uint32Array;
  readonly parent: Int32Array;
  readonly colOffsets: Uint32Array;
  readonly rowIndices: Uint32Array;
  readonly values: Float64Array;
  // upper triangle of P·A·Pᵀ by column, with a map to A's value slots
  private readonly cOffsets: Uint32Array;
  private readonly cRows: Uint32Array;
  private readonly cSlot: Uint32Array;
  private readonly work: Float64Array;
  private readonly stack: Uint32Array;
  private readonly mark: Int32Array;
  private readonly fill: Uint32Array;
  private readonly rowOffsets: Uint32Array;

  constructor(a: CsrMatrix, order?: Uint32Array) {
    const n = a.rows;
    if (a.cols !== n) throw new Error(`SparseCholesky: matrix is ${a.rows}×${a.cols}, not square`);
    this.size = n;
    this.rowOffsets = a.rowOffsets;
    this.order = order ?? nestedDissectionOrder(n, a.rowOffsets, a.columns);
    const pos = new Uint32Array(n);
    for (let k = 0; k < n; k++) pos[this.order[k]] = k;
    this.position = pos;

    // C = upper triangle of PAPᵀ, column-compressed (row ≤ column).
    const cnt = new Uint32Array(n + 1);
    for (let i = 0; i < n; i++) {
      const pi = pos[i];
      for (let p = a.rowOffsets[i]; p < a.rowOffsets[i + 1]; p++) {
        const pj = pos[a.columns[p]];
        if (pi <= pj) cnt[pj + 1]++;
      }
    }
    for (let j = 0; j < n; j++) cnt[j + 1] += cnt[j];
    const cRows = new Uint32Array(cnt[n]);
    const cSlot = new Uint32Array(cnt[n]);
    {
      const f = cnt.slice(0, n);
      for (let i = 0; i < n; i++) {
        const pi = pos[i];
        for (let p = a.rowOffsets[i]; p < a.rowOffsets[i + 1]; p++) {
          const pj = pos[a.columns[p]];
          if (pi <= pj) {
            const q = f[pj]++;
            cRows[q] = pi;
            cSlot[q] = p;
          }
        }
      }
    }
    this.cOffsets = cnt;
    this.cRows = cRows;
    this.cSlot = cSlot;

    // Elimination tree (Liu) with path compression.
    const parent = new Int32Array(n).fill(-1);
    const ancestor = new Int32Array(n).fill(-1);
    for (let k = 0; k < n; k++) {
      for (let p = cnt[k]; p < cnt[k + 1]; p++) {
        let i = cRows[p];
        while (i !== -1 && i < k) {
          const next = ancestor[i];
          ancestor[i] = k;
          if (next === -1) parent[i] = k;
          i = next;
        }
      }
    }
    this.parent = parent;

    // Column counts by walking every row's pattern (row subtrees).
    this.mark = new Int32Array(n).fill(-1);
    this.stack = new Uint32Array(n);
    const colCount = new Uint32Array(n).fill(1);
    for (let k = 0; k < n; k++) {
      const top = this.rowPattern(k);
      for (let t = top; t < n; t++) colCount[this.stack[t]]++;
    }
    const colOffsets = new Uint32Array(n + 1);
    for (let j = 0; j < n; j++) colOffsets[j + 1] = colOffsets[j] + colCount[j];
    this.colOffsets = colOffsets;
    this.rowIndices = new Uint32Array(colOffsets[n]);
    this.values = new Float64Array(colOffsets[n]);
    this.work = new Float64Array(n);
    this.fill = new Uint32Array(n);
    this.refactor(a);
  }

  /** Non-zeros of L (diagonal included). */
  get factorNonZeros(): number {
    return this.colOffsets[this.size];
  }

  /**
   * Pattern of row k of L (excluding the diagonal) into stack[top..n): the union
   * of elimination-tree paths from each non-zero of column k of C up to k.
   */
  private rowPattern(k: number): number {
    const n = this.size;
    const { cOffsets, cRows, parent, mark, stack } = this;
    let top = n;
    mark[k] = k;
    for (let p = cOffsets[k]; p < cOffsets[k + 1]; p++) {
      let i = cRows[p];
      if (i > k) continue;
      let len = 0;
      while (mark[i] !== k) {
        stack[len++] = i;
        mark[i] = k;
        i = parent[i];
      }
      while (len > 0) stack[--top] = stack[--len];
    }
    return top;
  }

  /** Numeric factorisation for new values on the analysed pattern. */
  refactor(a: CsrMatrix): this {
    if (a.rows !== this.size || a.rowOffsets[a.rows] !== this.rowOffsets[this.size]) {
      throw new Error(`SparseCholesky.refactor: expected the analysed ${this.size}×${this.size} pattern with ${this.rowOffsets[this.size]} entries, got ${a.rows}×${a.cols} with ${a.rowOffsets[a.rows]}`);
    }
    const n = this.size;
    const av = a.values;
    const { cOffsets, cRows, cSlot, colOffsets: lp, rowIndices: li, values: lx, work: x, fill: c, stack } = this;
    this.mark.fill(-1);
    for (let j = 0; j < n; j++) c[j] = lp[j];
    for (let k = 0; k < n; k++) {
      const top = this.rowPattern(k);
      x[k] = 0;
      for (let p = cOffsets[k]; p < cOffsets[k + 1]; p++) x[cRows[p]] += av[cSlot[p]];
      let d = x[k];
      x[k] = 0;
      for (let t = top; t < n; t++) {
        const i = stack[t];
        const lki = x[i] / lx[lp[i]];
        x[i] = 0;
        const end = c[i];
        for (let p = lp[i] + 1; p < end; p++) x[li[p]] -= lx[p] * lki;
        d -= lki * lki;
        const q = c[i]++;
        li[q] = k;
        lx[q] = lki;
      }
      if (!(d > 0)) {
        throw new Error(
          `SparseCholesky: the matrix is not positive definite (pivot ${d.toExponential(3)} at original row ${this.order[k]})`,
        );
      }
      const q = c[k]++;
      li[q] = k;
      lx[q] = Math.sqrt(d);
    }
    return this;
  }

  /** Solve A·x = b; `out` may be `b` itself. */
  solve(b: Float64Array, out?: Float64Array): Float64Array {
    const n = this.size;
    const x = out ?? new Float64Array(n);
    const y = this.work;
    const { order, colOffsets: lp, rowIndices: li, values: lx } = this;
    for (let k = 0; k < n; k++) y[k] = b[order[k]];
    for (let j = 0; j < n; j++) {
      const yj = (y[j] /= lx[lp[j]]);
      if (yj === 0) continue;
      for (let p = lp[j] + 1; p < lp[j + 1]; p++) y[li[p]] -= lx[p] * yj;
    }
    for (let j = n - 1; j >= 0; j--) {
      let s = y[j];
      for (let p = lp[j] + 1; p < lp[j + 1]; p++) s -= lx[p] * y[li[p]];
      y[j] = s / lx[lp[j]];
    }
    for (let k = 0; k < n; k++) x[order[k]] = y[k];
    return x;
  }

  /**
   * Solve for `r` right-hand sides at once, stored interleaved: b[i·r + c] is
   * entry i of right-hand side c. `work` must hold n·r numbers. Reads L once for
   * all of them, so it is several times faster than r calls to `solve`.
   */
  solveMany(b: Float64Array, r: number, out: Float64Array, work: Float64Array): Float64Array {
    const n = this.size;
    const { order, colOffsets: lp, rowIndices: li, values: lx } = this;
    const y = work;
    for (let k = 0; k < n; k++) {
      const s = order[k] * r;
      for (let c = 0; c < r; c++) y[k * r + c] = b[s + c];
    }
    for (let j = 0; j < n; j++) {
      const inv = 1 / lx[lp[j]];
      const jr = j * r;
      for (let c = 0; c < r; c++) y[jr + c] *= inv;
      for (let p = lp[j] + 1; p < lp[j + 1]; p++) {
        const l = lx[p];
        const ir = li[p] * r;
        for (let c = 0; c < r; c++) y[ir + c] -= l * y[jr + c];
      }
    }
    for (let j = n - 1; j >= 0; j--) {
      const jr = j * r;
      for (let p = lp[j] + 1; p < lp[j + 1]; p++) {
        const l = lx[p];
        const ir = li[p] * r;
        for (let c = 0; c < r; c++) y[jr + c] -= l * y[ir + c];
      }
      const inv = 1 / lx[lp[j]];
      for (let c = 0; c < r; c++) y[jr + c] *= inv;
    }
    for (let k = 0; k < n; k++) {
      const s = order[k] * r;
      for (let c = 0; c < r; c++) out[s + c] = y[k * r + c];
    }
    return out;
  }
}
