import { describe, expect, it } from 'vitest';
import { cotanStiffness } from '../../solver/fem/cotanStiffness.ts';
import { consistentMass } from '../../solver/fem/consistentMass.ts';
import { lumpedMass } from '../../solver/fem/lumpedMass.ts';
import { csrEntry, csrMultiply } from '../../solver/linalg/CsrMatrix.ts';
import { meshTopology } from '../../solver/mesh/meshTopology.ts';
import { meshArea } from '../../solver/mesh/triangleAreas.ts';
import { makeMesh } from '../../solver/mesh/Mesh.ts';
import { seededRandom } from '../../solver/linalg/seededRandom.ts';
import { icosphere } from '../../meshes/shapes/icosphere.ts';
import { rectangleGrid } from '../../meshes/shapes/patch.ts';
import { buildShape } from '../../meshes/shapes/index.ts';
import { equilateralTriangle } from '../fixtures/meshes.ts';

const fixtures = {
  sphere: () => icosphere(6),
  torus: () => buildShape({ shape: 'torus', vertices: 800 }).mesh,
  patch: () => rectangleGrid(2, 1, 8, 4),
  'limb-bud': () => buildShape({ shape: 'limb-bud', vertices: 800 }).mesh,
};

describe('cotanStiffness', () => {
  it('hand-derived values on an equilateral triangle: K_ij = −½cot 60° = −1/(2√3), K_ii = 1/√3', () => {
    const K = cotanStiffness(equilateralTriangle());
    expect(csrEntry(K, 0, 1)).toBeCloseTo(-1 / (2 * Math.sqrt(3)), 14);
    expect(csrEntry(K, 2, 1)).toBeCloseTo(-1 / (2 * Math.sqrt(3)), 14);
    expect(csrEntry(K, 0, 0)).toBeCloseTo(1 / Math.sqrt(3), 14);
  });

  it('hand-derived values on a right triangle (0,0),(1,0),(0,1): the hypotenuse weight is 0', () => {
    const K = cotanStiffness(makeMesh(Float64Array.from([0, 0, 0, 1, 0, 0, 0, 1, 0]), Uint32Array.from([0, 1, 2])));
    // ∇φ1 = (1,0), ∇φ2 = (0,1), area ½: K12 = 0, K01 = −½, K00 = 1
    expect(csrEntry(K, 1, 2)).toBeCloseTo(0, 15);
    expect(csrEntry(K, 0, 1)).toBeCloseTo(-0.5, 15);
    expect(csrEntry(K, 0, 0)).toBeCloseTo(1, 15);
  });

  for (const [name, make] of Object.entries(fixtures)) {
    it(`${name}: symmetric, K·1 = 0, nnz = nV + 2nE, positive semi-definite`, () => {
      const mesh = make();
      const K = cotanStiffness(mesh);
      const topo = meshTopology(mesh);
      expect(K.values.length).toBe(topo.vertexCount + 2 * topo.edgeCount);
      const ones = new Float64Array(K.rows).fill(1);
      const k1 = csrMultiply(K, ones);
      let scale = 0;
      for (const v of K.values) scale = Math.max(scale, Math.abs(v));
      for (const v of k1) expect(Math.abs(v)).toBeLessThan(1e-13 * scale);
      for (let i = 0; i < K.rows; i++)
        for (let p = K.rowOffsets[i]; p < K.rowOffsets[i + 1]; p++) expect(csrEntry(K, K.columns[p], i)).toBe(K.values[p]);
      const rand = seededRandom(7);
      for (let trial = 0; trial < 5; trial++) {
        const x = Float64Array.from({ length: K.rows }, () => rand() - 0.5);
        const y = csrMultiply(K, x);
        let e = 0;
        for (let i = 0; i < x.length; i++) e += x[i] * y[i];
        expect(e).toBeGreaterThan(0);
      }
    });
  }

  it('Dirichlet energy of a linear function on a flat patch is exact: fᵀKf = ∫|∇f|² = |g|²·area', () => {
    const m = rectangleGrid(2, 1, 7, 5);
    const K = cotanStiffness(m);
    const f = new Float64Array(K.rows);
    for (let i = 0; i < f.length; i++) f[i] = 3 * m.positions[3 * i] - 2 * m.positions[3 * i + 1];
    const kf = csrMultiply(K, f);
    let e = 0;
    for (let i = 0; i < f.length; i++) e += f[i] * kf[i];
    expect(e).toBeCloseTo(13 * 2, 11);
  });

  it('is invariant under uniform scaling; reassembly into `out` gives the same matrix', () => {
    const m = icosphere(4);
    const K = cotanStiffness(m);
    const scaled = { positions: m.positions.map((x) => 3.7 * x), triangles: m.triangles };
    const K2 = cotanStiffness(scaled);
    for (let p = 0; p < K.values.length; p++) expect(K2.values[p]).toBeCloseTo(K.values[p], 12);
    const again = cotanStiffness(m, K2);
    expect(again).toBe(K2);
    for (let p = 0; p < K.values.length; p++) expect(K2.values[p]).toBe(K.values[p]);
  });
});

describe('mass matrices', () => {
  for (const [name, make] of Object.entries(fixtures)) {
    it(`${name}: 1ᵀM1 = mesh area for both; consistent row sums equal the lumped mass`, () => {
      const mesh = make();
      const A = meshArea(mesh);
      const M = consistentMass(mesh);
      const L = lumpedMass(mesh);
      let sM = 0, sL = 0;
      for (const v of M.values) sM += v;
      for (const v of L) sL += v;
      expect(sM).toBeCloseTo(A, 11);
      expect(sL).toBeCloseTo(A, 11);
      const rows = csrMultiply(M, new Float64Array(M.rows).fill(1));
      for (let i = 0; i < rows.length; i++) expect(rows[i]).toBeCloseTo(L[i], 14);
    });
  }

  it('hand-derived consistent mass of one triangle: A/6 on, A/12 off the diagonal', () => {
    const M = consistentMass(equilateralTriangle());
    const A = Math.sqrt(3) / 4;
    expect(csrEntry(M, 1, 1)).toBeCloseTo(A / 6, 15);
    expect(csrEntry(M, 0, 2)).toBeCloseTo(A / 12, 15);
  });

  it('scales with the square of a uniform scaling', () => {
    const m = icosphere(4);
    const s = 2.5;
    const L = lumpedMass(m);
    const L2 = lumpedMass({ positions: m.positions.map((x) => s * x), triangles: m.triangles });
    for (let i = 0; i < L.length; i++) expect(L2[i]).toBeCloseTo(s * s * L[i], 13);
  });
});
