import { describe, expect, it } from 'vitest';
import numeric from 'numeric';
import { SparseCholesky } from '../../solver/linalg/SparseCholesky.ts';
import { nestedDissectionOrder } from '../../solver/linalg/nestedDissectionOrder.ts';
import { blockLanczos } from '../../solver/linalg/blockLanczos.ts';
import { symmetricEigen } from '../../solver/linalg/symmetricEigen.ts';
import { csrMultiply, csrToDense } from '../../solver/linalg/CsrMatrix.ts';
import { seededRandom } from '../../solver/linalg/seededRandom.ts';
import { cotanStiffness } from '../../solver/fem/cotanStiffness.ts';
import { consistentMass } from '../../solver/fem/consistentMass.ts';
import { buildShape } from '../../meshes/shapes/index.ts';
import { icosphere } from '../../meshes/shapes/icosphere.ts';

describe('SparseCholesky', () => {
  it('solves (K + M)x = b on a limb bud to round-off (seed 3), and refactor reuses the analysis', () => {
    const mesh = buildShape({ shape: 'limb-bud', vertices: 3000 }).mesh;
    const K = cotanStiffness(mesh), M = consistentMass(mesh);
    const A = { ...K, values: K.values.map((v, i) => v + M.values[i]) };
    const rand = seededRandom(3);
    const b = Float64Array.from({ length: A.rows }, () => rand() - 0.5);
    const chol = new SparseCholesky(A);
    const x = chol.solve(b);
    const r = csrMultiply(A, x);
    let err = 0, nb = 0;
    for (let i = 0; i < b.length; i++) { err = Math.max(err, Math.abs(r[i] - b[i])); nb = Math.max(nb, Math.abs(b[i])); }
    expect(err).toBeLessThan(1e-11 * nb);
    // new values, same pattern
    const A2 = { ...A, values: K.values.map((v, i) => 0.1 * v + M.values[i]) };
    const x2 = chol.refactor(A2).solve(b);
    const r2 = csrMultiply(A2, x2);
    for (let i = 0; i < b.length; i++) expect(Math.abs(r2[i] - b[i])).toBeLessThan(1e-11 * nb);
    // several right-hand sides at once equal single solves
    const B = new Float64Array(3 * A.rows);
    for (let i = 0; i < A.rows; i++) for (let c = 0; c < 3; c++) B[3 * i + c] = c === 1 ? b[i] : rand();
    const X = chol.solveMany(B, 3, new Float64Array(3 * A.rows), new Float64Array(3 * A.rows));
    for (let i = 0; i < A.rows; i++) expect(X[3 * i + 1]).toBeCloseTo(x2[i], 12);
  });

  it('matches numeric.solve on a small system and refuses an indefinite matrix', () => {
    const mesh = icosphere(2);
    const K = cotanStiffness(mesh), M = consistentMass(mesh);
    const A = { ...K, values: K.values.map((v, i) => v + 2 * M.values[i]) };
    const b = Float64Array.from({ length: A.rows }, (_, i) => Math.cos(i));
    const x = new SparseCholesky(A).solve(b);
    const ref = numeric.solve(csrToDense(A), Array.from(b));
    for (let i = 0; i < x.length; i++) expect(x[i]).toBeCloseTo(ref[i], 10);
    const bad = { ...K, values: K.values.map((v, i) => v - 5 * M.values[i]) };
    expect(() => new SparseCholesky(bad)).toThrow(/not positive definite/);
  });

  it('nested dissection returns a permutation and keeps fill far below the dense n²/2', () => {
    const mesh = icosphere(24);
    const K = cotanStiffness(mesh);
    const order = nestedDissectionOrder(K.rows, K.rowOffsets, K.columns);
    expect(Array.from(order).sort((a, b) => a - b)).toEqual(Array.from({ length: K.rows }, (_, i) => i));
    const M = consistentMass(mesh);
    const A = { ...K, values: K.values.map((v, i) => v + M.values[i]) };
    const chol = new SparseCholesky(A, order);
    // planar-graph nested dissection: O(n log n) fill (George 1973); 40·n·log2(n) is generous
    expect(chol.factorNonZeros).toBeLessThan(40 * K.rows * Math.log2(K.rows));
  });
});

describe('blockLanczos', () => {
  it('finds the largest eigenvalues of a diagonal operator with multiplicities up to the block size (seed 11)', () => {
    const n = 400;
    const d = Float64Array.from({ length: n }, (_, i) => 1 / (1 + i));
    // a 5-fold and a 3-fold top eigenvalue
    for (let i = 0; i < 5; i++) d[i] = 2;
    for (let i = 5; i < 8; i++) d[i] = 1.5;
    const weights = Float64Array.from({ length: n }, (_, i) => 1 + (i % 7));
    const r = blockLanczos(
      {
        size: n,
        apply: (x, rr, out) => { for (let i = 0; i < n; i++) for (let c = 0; c < rr; c++) out[i * rr + c] = d[i] * x[i * rr + c]; },
        applyInner: (x, rr, out) => { for (let i = 0; i < n; i++) for (let c = 0; c < rr; c++) out[i * rr + c] = weights[i] * x[i * rr + c]; },
      },
      12,
      { block: 6, seed: 11 },
    );
    const want = [2, 2, 2, 2, 2, 1.5, 1.5, 1.5, 1 / 9, 1 / 10, 1 / 11, 1 / 12];
    for (let k = 0; k < 12; k++) expect(r.values[k]).toBeCloseTo(want[k], 10);
    // B-orthonormal
    for (let a = 0; a < 12; a++)
      for (let b = 0; b < 12; b++) {
        let s = 0;
        for (let i = 0; i < n; i++) s += r.vectors[a][i] * weights[i] * r.vectors[b][i];
        expect(s).toBeCloseTo(a === b ? 1 : 0, 9);
      }
  });
});

describe('symmetricEigen', () => {
  it('agrees with numeric.eig on a random symmetric matrix (seed 5)', () => {
    const n = 30;
    const rand = seededRandom(5);
    const a = new Float64Array(n * n);
    for (let i = 0; i < n; i++) for (let j = 0; j <= i; j++) { const v = rand() - 0.5; a[i * n + j] = v; a[j * n + i] = v; }
    const { values } = symmetricEigen(a, n);
    const rows = Array.from({ length: n }, (_, i) => Array.from(a.subarray(i * n, i * n + n)));
    const ref = (numeric.eig(rows).lambda.x as number[]).slice().sort((x, y) => x - y);
    for (let i = 0; i < n; i++) expect(values[i]).toBeCloseTo(ref[i], 11);
  });
});
