import { describe, expect, it } from 'vitest';
import { cotanStiffness } from '../../solver/fem/cotanStiffness.ts';
import { consistentMass } from '../../solver/fem/consistentMass.ts';
import { csrMultiply } from '../../solver/linalg/CsrMatrix.ts';
import { SparseCholesky } from '../../solver/linalg/SparseCholesky.ts';
import { icosphere } from '../../meshes/shapes/icosphere.ts';

/**
 * Dziuk's surface test problem (G. Dziuk, LNM 1357, 1988; Dziuk & Elliott, Acta
 * Numerica 22, 2013): −Δ_Γ u + u = f on the unit sphere with u = xyz, a degree-3
 * spherical harmonic (−Δ_Γ u = 12u), so f = 13xyz. P1 surface FEM: L² error
 * O(h²), H¹ error O(h). Errors are integrated with a 6-point (degree-4) Dunavant
 * rule on each flat triangle against the exact solution at the lifted point.
 */
const QUAD: [number, number, number, number][] = [
  [0.445948490915965, 0.445948490915965, 0.108103018168070, 0.223381589678011],
  [0.445948490915965, 0.108103018168070, 0.445948490915965, 0.223381589678011],
  [0.108103018168070, 0.445948490915965, 0.445948490915965, 0.223381589678011],
  [0.091576213509771, 0.091576213509771, 0.816847572980459, 0.109951743655322],
  [0.091576213509771, 0.816847572980459, 0.091576213509771, 0.109951743655322],
  [0.816847572980459, 0.091576213509771, 0.091576213509771, 0.109951743655322],
];

function solveAndMeasure(nu: number) {
  const mesh = icosphere(nu);
  const p = mesh.positions;
  const n = p.length / 3;
  const K = cotanStiffness(mesh);
  const M = consistentMass(mesh);
  const f = new Float64Array(n);
  for (let i = 0; i < n; i++) f[i] = 13 * p[3 * i] * p[3 * i + 1] * p[3 * i + 2];
  const rhs = csrMultiply(M, f);
  const A = { ...K, values: K.values.map((v, k) => v + M.values[k]) };
  const U = new SparseCholesky(A).solve(rhs);
  let l2 = 0, h1 = 0;
  const t = mesh.triangles;
  for (let tri = 0; tri < t.length; tri += 3) {
    const ia = t[tri], ib = t[tri + 1], ic = t[tri + 2];
    const a = [p[3 * ia], p[3 * ia + 1], p[3 * ia + 2]], b = [p[3 * ib], p[3 * ib + 1], p[3 * ib + 2]], c = [p[3 * ic], p[3 * ic + 1], p[3 * ic + 2]];
    const e1 = [b[0] - a[0], b[1] - a[1], b[2] - a[2]], e2 = [c[0] - a[0], c[1] - a[1], c[2] - a[2]];
    const nrm = [e1[1] * e2[2] - e1[2] * e2[1], e1[2] * e2[0] - e1[0] * e2[2], e1[0] * e2[1] - e1[1] * e2[0]];
    const area2 = Math.hypot(nrm[0], nrm[1], nrm[2]);
    // P1 gradient on the flat triangle: Σ U_i ∇φ_i, ∇φ_a = n × (c − b) / (2A) etc.
    const grad = [0, 0, 0];
    const edges: [number, number[], number[]][] = [[U[ia], b, c], [U[ib], c, a], [U[ic], a, b]];
    for (const [u, from, to] of edges) {
      const d = [to[0] - from[0], to[1] - from[1], to[2] - from[2]];
      const g = [nrm[1] * d[2] - nrm[2] * d[1], nrm[2] * d[0] - nrm[0] * d[2], nrm[0] * d[1] - nrm[1] * d[0]];
      for (let k = 0; k < 3; k++) grad[k] += (u * g[k]) / (area2 * area2);
    }
    for (const [la, lb, lc, w] of QUAD) {
      const x = [la * a[0] + lb * b[0] + lc * c[0], la * a[1] + lb * b[1] + lc * c[1], la * a[2] + lb * b[2] + lc * c[2]];
      const r = Math.hypot(x[0], x[1], x[2]);
      const y = [x[0] / r, x[1] / r, x[2] / r]; // lifted point on the sphere
      const uh = la * U[ia] + lb * U[ib] + lc * U[ic];
      const u = y[0] * y[1] * y[2];
      // exact surface gradient: (I − yyᵀ)∇(xyz)
      const g = [y[1] * y[2], y[0] * y[2], y[0] * y[1]];
      const dot = g[0] * y[0] + g[1] * y[1] + g[2] * y[2];
      const sg = [g[0] - dot * y[0], g[1] - dot * y[1], g[2] - dot * y[2]];
      const wA = w * area2 * 0.5;
      l2 += wA * (u - uh) ** 2;
      h1 += wA * ((sg[0] - grad[0]) ** 2 + (sg[1] - grad[1]) ** 2 + (sg[2] - grad[2]) ** 2);
    }
  }
  return { l2: Math.sqrt(l2), h1: Math.sqrt(h1) };
}

describe('surface Poisson problem (Dziuk 1988)', () => {
  it('L² error O(h²) and H¹ error O(h) over three refinements', () => {
    const r = [8, 16, 32, 64].map(solveAndMeasure);
    for (let k = 0; k + 1 < r.length; k++) {
      expect(Math.log2(r[k].l2 / r[k + 1].l2)).toBeGreaterThan(1.8);
      expect(Math.log2(r[k].h1 / r[k + 1].h1)).toBeGreaterThan(0.9);
    }
    expect(r[3].l2).toBeLessThan(1e-3);
  });
});
