import { describe, expect, it } from 'vitest';
import numeric from 'numeric';
import { laplaceBeltramiEigenpairs } from '../../solver/fem/laplaceBeltramiEigenpairs.ts';
import { cotanStiffness } from '../../solver/fem/cotanStiffness.ts';
import { consistentMass } from '../../solver/fem/consistentMass.ts';
import { lumpedMass } from '../../solver/fem/lumpedMass.ts';
import { csrMultiply, csrToDense } from '../../solver/linalg/CsrMatrix.ts';
import { symmetricEigen } from '../../solver/linalg/symmetricEigen.ts';
import { icosphere } from '../../meshes/shapes/icosphere.ts';
import { rectangleGrid } from '../../meshes/shapes/patch.ts';
import { buildShape } from '../../meshes/shapes/index.ts';
import type { Mesh } from '../../solver/mesh/Mesh.ts';
import { observedOrder } from '../fixtures/meshes.ts';

/** Spherical harmonics: eigenvalues l(l+1) of −Δ on the unit sphere, multiplicity 2l+1. */
function sphereSpectrum(count: number): number[] {
  const out: number[] = [];
  for (let l = 0; out.length < count; l++) for (let k = 0; k < 2 * l + 1 && out.length < count; k++) out.push(l * (l + 1));
  return out;
}

/** Rectangle a×b with no-flux boundary: π²(m²/a² + n²/b²), cos·cos modes. */
function rectangleSpectrum(a: number, b: number, count: number): number[] {
  const out: number[] = [];
  for (let m = 0; m < 20; m++) for (let n = 0; n < 20; n++) out.push(Math.PI ** 2 * ((m * m) / (a * a) + (n * n) / (b * b)));
  return out.sort((x, y) => x - y).slice(0, count);
}

/**
 * Torus of revolution (centre radius R, tube radius r): with u = e^{imφ} f(θ),
 * ρ = R + r cos θ, the weak form is ∫ (ρ/r²) f′g′ + (m²/ρ) f g dθ = λ ∫ ρ f g dθ.
 * Solved by Fourier–Galerkin in θ with trapezoidal quadrature (spectrally
 * accurate for this smooth periodic problem): an independent reference.
 */
function torusSpectrum(R: number, r: number, count: number): number[] {
  const K = 24, N = 2 * K + 1, Q = 512;
  const basis = (j: number, t: number): [number, number] => {
    if (j === 0) return [1, 0];
    const k = Math.ceil(j / 2);
    return j % 2 ? [Math.cos(k * t), -k * Math.sin(k * t)] : [Math.sin(k * t), k * Math.cos(k * t)];
  };
  const all: number[] = [];
  for (let m = 0; m <= 12; m++) {
    const A = new Float64Array(N * N), B = new Float64Array(N * N);
    for (let q = 0; q < Q; q++) {
      const t = (2 * Math.PI * q) / Q, w = (2 * Math.PI) / Q, rho = R + r * Math.cos(t);
      const vals = Array.from({ length: N }, (_, j) => basis(j, t));
      for (let i = 0; i < N; i++)
        for (let j = 0; j < N; j++) {
          A[i * N + j] += w * ((rho / (r * r)) * vals[i][1] * vals[j][1] + ((m * m) / rho) * vals[i][0] * vals[j][0]);
          B[i * N + j] += w * rho * vals[i][0] * vals[j][0];
        }
    }
    // B = LLᵀ, C = L⁻¹AL⁻ᵀ
    const L = new Float64Array(N * N);
    for (let j = 0; j < N; j++) {
      let d = B[j * N + j];
      for (let k = 0; k < j; k++) d -= L[j * N + k] ** 2;
      L[j * N + j] = Math.sqrt(d);
      for (let i = j + 1; i < N; i++) {
        let s = B[i * N + j];
        for (let k = 0; k < j; k++) s -= L[i * N + k] * L[j * N + k];
        L[i * N + j] = s / L[j * N + j];
      }
    }
    const C = A.slice();
    for (let c = 0; c < N; c++) for (let i = 0; i < N; i++) { let s = C[i * N + c]; for (let k = 0; k < i; k++) s -= L[i * N + k] * C[k * N + c]; C[i * N + c] = s / L[i * N + i]; }
    for (let rr = 0; rr < N; rr++) for (let i = 0; i < N; i++) { let s = C[rr * N + i]; for (let k = 0; k < i; k++) s -= L[i * N + k] * C[rr * N + k]; C[rr * N + i] = s / L[i * N + i]; }
    const ev = symmetricEigen(C, N).values;
    for (const v of ev) for (let c = 0; c < (m === 0 ? 1 : 2); c++) all.push(v);
  }
  return all.sort((x, y) => x - y).slice(0, count);
}

function maxRelError(values: Float64Array, exact: number[], from = 1): number {
  let e = 0;
  for (let i = from; i < exact.length; i++) e = Math.max(e, Math.abs(values[i] - exact[i]) / exact[i]);
  return e;
}

function meshSize(mesh: Mesh): number {
  return Math.sqrt(1 / (mesh.positions.length / 3));
}

describe('laplaceBeltramiEigenpairs', () => {
  it('unit sphere: l(l+1) with multiplicity 2l+1, converging at second order (P1 eigenvalue error O(h²))', () => {
    const errs: number[] = [];
    const hs: number[] = [];
    for (const nu of [8, 16, 32]) {
      const mesh = icosphere(nu);
      const r = laplaceBeltramiEigenpairs(mesh, { count: 25, method: 'sparse' });
      errs.push(maxRelError(r.values, sphereSpectrum(25)));
      hs.push(meshSize(mesh));
      expect(r.values[0]).toBeCloseTo(0, 8);
      if (nu >= 16) expect(r.clusters.map((c) => c.size)).toEqual([1, 3, 5, 7, 9]);
    }
    expect(observedOrder(errs[0], errs[1], hs[0], hs[1])).toBeGreaterThan(1.8);
    expect(observedOrder(errs[1], errs[2], hs[1], hs[2])).toBeGreaterThan(1.8);
    expect(errs[2]).toBeLessThan(3e-3);
  });

  it('eigenvectors are M-orthonormal and satisfy K φ = λ M φ', () => {
    const mesh = icosphere(10);
    const K = cotanStiffness(mesh);
    const M = consistentMass(mesh);
    const r = laplaceBeltramiEigenpairs(mesh, { count: 16, method: 'sparse' });
    for (let i = 0; i < 16; i++) {
      const Mi = csrMultiply(M, r.vectors[i]);
      for (let j = 0; j < 16; j++) {
        let d = 0;
        for (let k = 0; k < Mi.length; k++) d += Mi[k] * r.vectors[j][k];
        expect(Math.abs(d - (i === j ? 1 : 0))).toBeLessThan(1e-9);
      }
      const Ki = csrMultiply(K, r.vectors[i]);
      let res = 0, scale = 0;
      for (let k = 0; k < Ki.length; k++) { res = Math.max(res, Math.abs(Ki[k] - r.values[i] * Mi[k])); scale = Math.max(scale, Math.abs(Ki[k]) + Math.abs(Mi[k])); }
      expect(res).toBeLessThan(1e-8 * scale);
    }
  });

  it('flat rectangle 2×1 with no-flux edges: π²(m²/4 + n²), second-order convergence', () => {
    const exact = rectangleSpectrum(2, 1, 12);
    const errs: number[] = [];
    for (const cells of [8, 16, 32]) {
      const r = laplaceBeltramiEigenpairs(rectangleGrid(2, 1, 2 * cells, cells), { count: 12, method: 'sparse' });
      errs.push(maxRelError(r.values, exact));
    }
    expect(Math.log2(errs[0] / errs[1])).toBeGreaterThan(1.8);
    expect(Math.log2(errs[1] / errs[2])).toBeGreaterThan(1.8);
  });

  it('torus of revolution (R = 1, r = 0.4) against the separable Fourier–Galerkin reference, second order', () => {
    const exact = torusSpectrum(1, 0.4, 14);
    expect(exact[0]).toBeCloseTo(0, 10);
    const errs: number[] = [];
    const hs: number[] = [];
    for (const vertices of [1500, 6000, 24000]) {
      const mesh = buildShape({ shape: 'torus', params: { R: 1, r: 0.4 }, vertices }).mesh;
      const r = laplaceBeltramiEigenpairs(mesh, { count: 14, method: 'sparse' });
      errs.push(maxRelError(r.values, exact));
      hs.push(meshSize(mesh));
    }
    expect(observedOrder(errs[0], errs[1], hs[0], hs[1])).toBeGreaterThan(1.7);
    expect(observedOrder(errs[1], errs[2], hs[1], hs[2])).toBeGreaterThan(1.7);
  });

  for (const mass of ['consistent', 'lumped'] as const) {
    it(`small meshes (${mass} mass): sparse eigenpairs equal numeric's dense generalised solution to 1e-8`, () => {
      for (const mesh of [icosphere(3), rectangleGrid(1.5, 1, 9, 6)]) {
        const K = csrToDense(cotanStiffness(mesh));
        const n = K.length;
        let Md: number[][];
        if (mass === 'consistent') Md = csrToDense(consistentMass(mesh));
        else { const l = lumpedMass(mesh); Md = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? l[i] : 0))); }
        // M^{-1/2} from numeric's SVD of the SPD M, then the singular values of M^{-1/2} K M^{-1/2}
        const svdM = numeric.svd(Md);
        const Minvh = numeric.dot(numeric.dot(svdM.U, numeric.diag(svdM.S.map((s: number) => 1 / Math.sqrt(s)))), numeric.transpose(svdM.U)) as number[][];
        const C = numeric.dot(numeric.dot(Minvh, K), Minvh) as number[][];
        const ref = numeric.svd(C).S.slice().sort((a: number, b: number) => a - b);
        const count = 20;
        const r = laplaceBeltramiEigenpairs(mesh, { count, mass, method: 'sparse' });
        expect(r.method).toBe('sparse');
        const scale = ref[count - 1];
        for (let i = 0; i < count; i++) expect(Math.abs(r.values[i] - ref[i])).toBeLessThan(1e-8 * Math.max(ref[i], 1e-3 * scale));
        const dense = laplaceBeltramiEigenpairs(mesh, { count, mass, method: 'dense' });
        for (let i = 0; i < count; i++) expect(Math.abs(dense.values[i] - ref[i])).toBeLessThan(1e-8 * Math.max(ref[i], 1e-3 * scale));
      }
    });
  }

  it('refuses impossible requests with a clear message', () => {
    expect(() => laplaceBeltramiEigenpairs(icosphere(1), { count: 50 })).toThrow(/only 12 vertices/);
    expect(() => laplaceBeltramiEigenpairs(icosphere(1), { count: 0 })).toThrow(/positive whole number/);
  });
});
