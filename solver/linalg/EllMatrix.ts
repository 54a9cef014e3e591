import type { CsrMatrix } from './CsrMatrix.ts';

/**
 * A square mesh operator in hybrid ELLPACK form (Bell & Garland, "Implementing
 * sparse matrix-vector multiplication on throughput-oriented processors", SC 2009):
 * the diagonal apart, then every row's first `width` off-diagonal entries in a
 * fixed-width block (padded with zero weights pointing at the row itself), and
 * the rest of longer rows in a small CSR overflow. Fixed-width rows let the
 * generated kernels unroll the neighbour sum, which is what makes a JavaScript
 * sweep over a mesh fast.
 *
 * Column indices are stored pre-multiplied by `stride` (the number of species
 * interleaved in the state), so a kernel reads `state[column + s]` directly.
 * `ellValues` fills the values of any matrix with the CSR pattern the layout
 * came from (K, or a D-weighted K), so several share one set of columns.
 */
export interface EllLayout {
  readonly rows: number;
  readonly width: number;
  readonly stride: number;
  readonly columns: Int32Array;
  readonly overflowOffsets: Int32Array;
  readonly overflowColumns: Int32Array;
}

/** A layout with the map from the CSR pattern it came from, for filling values. */
export interface EllPattern extends EllLayout {
  /** CSR slot → ELL position: ≥ 0 block index, −1 − k overflow k, −2³¹ diagonal */
  readonly slotMap: Int32Array;
}

export interface EllValues {
  readonly diagonal: Float64Array;
  readonly weights: Float64Array;
  readonly overflow: Float64Array;
}

const DIAGONAL = -0x80000000;

/** Width that holds every row of most meshes: the largest off-diagonal count, at most 8. */
function chooseWidth(a: CsrMatrix): number {
  let widest = 0;
  for (let i = 0; i < a.rows; i++) widest = Math.max(widest, a.rowOffsets[i + 1] - a.rowOffsets[i] - 1);
  return Math.max(1, Math.min(8, widest));
}

export function ellPattern(a: CsrMatrix, stride: number, width = chooseWidth(a)): EllPattern {
  const n = a.rows;
  const { rowOffsets: ro, columns: ci } = a;
  const columns = new Int32Array(n * width);
  const overflowOffsets = new Int32Array(n + 1);
  const slotMap = new Int32Array(ci.length);
  let overflowCount = 0;
  for (let i = 0; i < n; i++) {
    const off = ro[i + 1] - ro[i] - 1;
    overflowCount += Math.max(0, off - width);
    overflowOffsets[i + 1] = overflowCount;
  }
  const overflowColumns = new Int32Array(overflowCount);
  for (let i = 0; i < n; i++) {
    let k = 0;
    let o = overflowOffsets[i];
    for (let p = ro[i]; p < ro[i + 1]; p++) {
      const j = ci[p];
      if (j === i) {
        slotMap[p] = DIAGONAL;
      } else if (k < width) {
        columns[i * width + k] = j * stride;
        slotMap[p] = i * width + k;
        k++;
      } else {
        overflowColumns[o] = j * stride;
        slotMap[p] = -1 - o;
        o++;
      }
    }
    for (; k < width; k++) columns[i * width + k] = i * stride;
  }
  return { rows: n, width, stride, columns, overflowOffsets, overflowColumns, slotMap };
}

/**
 * Values of `a` (same pattern as the matrix `m` was built from), each row times
 * rowScale[i]; into `out` when given (a moving surface refills in place).
 */
export function ellValues(m: EllPattern, a: CsrMatrix, rowScale?: Float64Array, out?: EllValues): EllValues {
  const n = m.rows;
  const diagonal = out?.diagonal ?? new Float64Array(n);
  const weights = out?.weights ?? new Float64Array(n * m.width);
  const overflow = out?.overflow ?? new Float64Array(m.overflowColumns.length);
  const { rowOffsets: ro, values: av } = a;
  if (a.columns.length !== m.slotMap.length) throw new Error('ellValues: the matrix does not have the pattern the layout was built from');
  for (let i = 0; i < n; i++) {
    const s = rowScale ? rowScale[i] : 1;
    for (let p = ro[i]; p < ro[i + 1]; p++) {
      const at = m.slotMap[p];
      if (at === DIAGONAL) diagonal[i] = s * av[p];
      else if (at >= 0) weights[at] = s * av[p];
      else overflow[-1 - at] = s * av[p];
    }
  }
  return { diagonal, weights, overflow };
}

/** The CSR matrix (pattern of `like`, the matrix the layout was built from) holding ELL values `v`. */
export function csrFromEll(m: EllPattern, v: EllValues, like: CsrMatrix): CsrMatrix {
  const { rowOffsets: ro } = like;
  const values = new Float64Array(like.columns.length);
  for (let i = 0; i < m.rows; i++) {
    for (let p = ro[i]; p < ro[i + 1]; p++) {
      const at = m.slotMap[p];
      values[p] = at === DIAGONAL ? v.diagonal[i] : at >= 0 ? v.weights[at] : v.overflow[-1 - at];
    }
  }
  return { ...like, values };
}

/** The layout alone (drops the slot map once all values are filled). */
export function ellLayout(m: EllPattern): EllLayout {
  const { rows, width, stride, columns, overflowOffsets, overflowColumns } = m;
  return { rows, width, stride, columns, overflowOffsets, overflowColumns };
}
