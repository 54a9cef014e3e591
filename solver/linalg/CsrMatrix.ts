/**
 * Compressed sparse row matrix.
 * Row i holds columns `columns[rowOffsets[i] .. rowOffsets[i+1])`, ascending,
 * with values at the same positions. Square operators on a mesh are nV×nV.
 * Matrices assembled on one mesh share `rowOffsets`/`columns` (the pattern).
 */
export interface CsrMatrix {
  readonly rows: number;
  readonly cols: number;
  readonly rowOffsets: Uint32Array;
  readonly columns: Uint32Array;
  readonly values: Float64Array;
}

/** y = A·x (allocation-free with `out`). */
export function csrMultiply(a: CsrMatrix, x: Float64Array, out?: Float64Array): Float64Array {
  const y = out ?? new Float64Array(a.rows);
  const { rowOffsets: ro, columns: ci, values: va } = a;
  for (let i = 0; i < a.rows; i++) {
    let s = 0;
    const end = ro[i + 1];
    for (let p = ro[i]; p < end; p++) s += va[p] * x[ci[p]];
    y[i] = s;
  }
  return y;
}

/** The entry (i, j), 0 where it is outside the pattern (binary search in row i). */
export function csrEntry(a: CsrMatrix, i: number, j: number): number {
  let lo = a.rowOffsets[i], hi = a.rowOffsets[i + 1] - 1;
  while (lo <= hi) {
    const mid = (lo + hi) >> 1;
    const c = a.columns[mid];
    if (c === j) return a.values[mid];
    if (c < j) lo = mid + 1;
    else hi = mid - 1;
  }
  return 0;
}

/** αA + βB for two matrices with the same pattern (shares the pattern arrays). */
export function csrCombine(alpha: number, a: CsrMatrix, beta: number, b: CsrMatrix, out?: CsrMatrix): CsrMatrix {
  if (a.rowOffsets !== b.rowOffsets || a.columns !== b.columns) {
    throw new Error('csrCombine: the two matrices do not share a sparsity pattern');
  }
  const values = out?.values ?? new Float64Array(a.values.length);
  for (let p = 0; p < values.length; p++) values[p] = alpha * a.values[p] + beta * b.values[p];
  return out ?? { rows: a.rows, cols: a.cols, rowOffsets: a.rowOffsets, columns: a.columns, values };
}

/** A + diag(d) as a new matrix; the pattern must contain the diagonal. */
export function csrAddDiagonal(a: CsrMatrix, d: Float64Array | number): CsrMatrix {
  const values = a.values.slice();
  for (let i = 0; i < a.rows; i++) {
    let found = false;
    for (let p = a.rowOffsets[i]; p < a.rowOffsets[i + 1]; p++) {
      if (a.columns[p] === i) {
        values[p] += typeof d === 'number' ? d : d[i];
        found = true;
        break;
      }
    }
    if (!found) throw new Error(`csrAddDiagonal: row ${i} has no diagonal entry in the pattern`);
  }
  return { rows: a.rows, cols: a.cols, rowOffsets: a.rowOffsets, columns: a.columns, values };
}

/** Dense copy (for small reference checks only). */
export function csrToDense(a: CsrMatrix): number[][] {
  const out: number[][] = [];
  for (let i = 0; i < a.rows; i++) {
    const row = new Array<number>(a.cols).fill(0);
    for (let p = a.rowOffsets[i]; p < a.rowOffsets[i + 1]; p++) row[a.columns[p]] += a.values[p];
    out.push(row);
  }
  return out;
}
