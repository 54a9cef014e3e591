import { describe, expect, it } from 'vitest';
import numeric from 'numeric';
import { icosphere } from '../../meshes/shapes/icosphere.ts';
import { buildShape } from '../../meshes/shapes/index.ts';
import type { Mesh } from '../../solver/mesh/Mesh.ts';
import { compileKinetics } from '../../solver/kinetics/compileKinetics.ts';
import { ReactionDiffusionStepper, type StepperOptions } from '../../solver/integrate/ReactionDiffusionStepper.ts';
import { speciesField } from '../../solver/integrate/ReactionDiffusionSystem.ts';
import { lumpedMass } from '../../solver/fem/lumpedMass.ts';
import { laplaceBeltramiEigenpairs } from '../../solver/fem/laplaceBeltramiEigenpairs.ts';
import { observedOrder } from '../fixtures/meshes.ts';

function stepper(mesh: Mesh, species: string[], reactions: Record<string, string>, params: Record<string, number | Float64Array>, diffusion: (number | Float64Array)[], options: StepperOptions) {
  const kinetics = compileKinetics(species, reactions, Object.keys(params));
  return new ReactionDiffusionStepper({ mesh, kinetics, parameters: Object.values(params), diffusion }, options);
}

function total(st: ReactionDiffusionStepper, s: number): number {
  const m = st.mass, u = st.state, nS = st.speciesCount;
  let acc = 0;
  for (let i = 0; i < m.length; i++) acc += m[i] * u[i * nS + s];
  return acc;
}

describe('pure diffusion conserves Σ M u (K·1 = 0; Dziuk & Elliott, Acta Numerica 2013)', () => {
  const closed = icosphere(12, 1);
  const open = buildShape({ shape: 'dome', vertices: 1500 }).mesh;
  const schemes: [string, StepperOptions][] = [
    ['explicit', { scheme: 'explicit', dt: 2e-4 }],
    ['imex + CG', { scheme: 'imex', dt: 0.05 }],
    ['imex + Cholesky', { scheme: 'imex', dt: 0.05, solver: 'cholesky' }],
  ];
  for (const [where, mesh] of [['closed sphere', closed], ['open dome', open]] as const) {
    for (const [name, options] of schemes) {
      it(`${name} on a ${where}, constant and field diffusion`, () => {
        const n = mesh.positions.length / 3;
        const dField = new Float64Array(n);
        for (let i = 0; i < n; i++) dField[i] = 0.5 + 0.4 * mesh.positions[3 * i];
        const st = stepper(mesh, ['a', 'b'], { a: '0', b: '0' }, {}, [1, dField], options);
        for (let i = 0; i < n; i++) {
          const p = mesh.positions;
          st.state[2 * i] = Math.exp(-4 * ((p[3 * i] - 0.5) ** 2 + p[3 * i + 1] ** 2));
          st.state[2 * i + 1] = 1 + Math.sin(3 * p[3 * i + 2]);
        }
        const before = [total(st, 0), total(st, 1)];
        for (let k = 0; k < 50; k++) expect(st.step(k)).toBe(true);
        // round-off: 50 steps, each a sum over n terms of size ~1
        for (let s = 0; s < 2; s++) expect(Math.abs(total(st, s) - before[s])).toBeLessThan(1e-12 * Math.abs(before[s]) * Math.sqrt(n));
        // and the field really moved
        let moved = 0;
        for (let i = 0; i < n; i++) moved = Math.max(moved, Math.abs(st.previous[2 * i] - st.state[2 * i]));
        expect(moved).toBeGreaterThan(1e-6);
      });
    }
  }
});

describe('spherical-harmonic decay exp(−D l(l+1) t) on the unit sphere', () => {
  it('the measured rate converges to D·l(l+1) at second order in h', () => {
    // Y = 3z² − 1 (l = 2, eigenvalue 6). Backward Euler in time: with dt = 2e-5 its relative
    // error dt·λ/2 ≈ 6e-5 stays below the spatial O(h²) error on these meshes.
    const D = 1, T = 0.02, dt = 2e-5;
    const errors: number[] = [], hs: number[] = [];
    for (const nu of [6, 12, 24]) {
      const mesh = icosphere(nu, 1);
      const n = mesh.positions.length / 3;
      const st = stepper(mesh, ['u'], { u: '0' }, {}, [D], { scheme: 'imex', dt, tolerance: 1e-12 });
      const Y = new Float64Array(n);
      for (let i = 0; i < n; i++) Y[i] = 3 * mesh.positions[3 * i + 2] ** 2 - 1;
      st.state.set(Y);
      const m = st.mass;
      const project = (u: Float64Array) => { let s = 0; for (let i = 0; i < n; i++) s += m[i] * u[i] * Y[i]; return s; };
      const a0 = project(st.state);
      const steps = Math.round(T / dt);
      for (let k = 0; k < steps; k++) st.step(k * dt);
      const rate = -Math.log(project(st.state) / a0) / T;
      errors.push(Math.abs(rate - 6 * D) / 6);
      hs.push(1 / nu);
    }
    expect(observedOrder(errors[0], errors[1], hs[0], hs[1])).toBeGreaterThan(1.7);
    expect(observedOrder(errors[1], errors[2], hs[1], hs[2])).toBeGreaterThan(1.7);
    expect(errors[2]).toBeLessThan(5e-3);
  });
});

/** numeric's Dormand–Prince integrator for systems (its type declaration covers the scalar case only) */
const dopri = numeric.dopri as unknown as (x0: number, x1: number, y0: number[], f: (x: number, y: number[]) => number[], tol: number, maxit: number) => { at(x: number): number[] };

describe('reaction only: matches a high-accuracy ODE solution (numeric.dopri, Dormand–Prince 5(4))', () => {
  it('forward Euler (both schemes with D = 0) converges at first order in dt', () => {
    // Brusselator a = 1, b = 2.5: a limit cycle, so the trajectory is not trivial.
    const mesh = icosphere(2, 1);
    const n = mesh.positions.length / 3;
    const T = 2;
    const start = (i: number) => [1 + 0.5 * mesh.positions[3 * i], 2 + 0.5 * mesh.positions[3 * i + 1]];
    const reference: number[][] = [];
    for (let i = 0; i < n; i++) {
      const sol = dopri(0, T, start(i), (_t, y) => [1 - 3.5 * y[0] + y[0] * y[0] * y[1], 2.5 * y[0] - y[0] * y[0] * y[1]], 1e-12, 100000);
      reference.push(sol.at(T));
    }
    for (const scheme of ['explicit', 'imex'] as const) {
      const errs: number[] = [];
      for (const dt of [0.01, 0.005]) {
        const st = stepper(mesh, ['u', 'v'], { u: 'a - (b + 1)*u + u^2*v', v: 'b*u - u^2*v' }, { a: 1, b: 2.5 }, [0, 0], { scheme, dt });
        for (let i = 0; i < n; i++) st.state.set(start(i), 2 * i);
        for (let k = 0; k < Math.round(T / dt); k++) st.step(k * dt);
        let e = 0;
        for (let i = 0; i < n; i++) e = Math.max(e, Math.abs(st.state[2 * i] - reference[i][0]), Math.abs(st.state[2 * i + 1] - reference[i][1]));
        errs.push(e);
      }
      const order = Math.log2(errs[0] / errs[1]);
      expect(order, scheme).toBeGreaterThan(0.9);
      expect(order, scheme).toBeLessThan(1.1);
      expect(errs[1], scheme).toBeLessThan(0.05);
    }
  });
});

describe('linear growth along one surface eigenmode (Murray, Mathematical Biology II, ch. 2 dispersion relation)', () => {
  it('a small perturbation along φ_j grows at the largest eigenvalue of J − λ_j·diag(D)', () => {
    // Schnakenberg a = 0.1, b = 0.9, d = 10 (Murray's Turing set) with γ = 30 on the unit sphere.
    const mesh = icosphere(8, 1);
    const n = mesh.positions.length / 3;
    const gamma = 30, a = 0.1, b = 0.9, d = 10;
    const u0 = a + b, v0 = b / (u0 * u0);
    const eig = laplaceBeltramiEigenpairs(mesh, { count: 25, mass: 'lumped' });
    // f_u = γ(−1 + 2u₀v₀), f_v = γu₀², g_u = −2γu₀v₀, g_v = −γu₀²
    const J = [gamma * (-1 + 2 * u0 * v0), gamma * u0 * u0, -2 * gamma * u0 * v0, -gamma * u0 * u0];
    // unstable band γL < λ < γM with L = 0.2, M = 0.5 (Murray's worked values): 6 < λ < 15,
    // so l = 3 (λ = 12) grows and l = 4 (λ = 20) decays (l ≤ 2 give complex pairs)
    const rates: number[] = [];
    for (const j of [12, 20]) {
      const lam = eig.values[j];
      const A = [J[0] - lam, J[1], J[2], J[3] - d * lam];
      const tr = A[0] + A[3], det = A[0] * A[3] - A[1] * A[2];
      const disc = tr * tr - 4 * det;
      if (disc < 0) continue;
      const sigma = (tr + Math.sqrt(disc)) / 2;
      const w = [A[1], sigma - A[0]]; // eigenvector of A for sigma
      const dt = 1e-4, steps = 200, eps = 1e-7;
      const st = stepper(mesh, ['u', 'v'], { u: 'gamma*(a - u + u^2*v)', v: 'gamma*(b - u^2*v)' }, { gamma, a, b }, [1, d], { scheme: 'explicit', dt });
      const phi = eig.vectors[j];
      for (let i = 0; i < n; i++) { st.state[2 * i] = u0 + eps * w[0] * phi[i]; st.state[2 * i + 1] = v0 + eps * w[1] * phi[i]; }
      const m = lumpedMass(mesh);
      const amp = () => { let s = 0; const u = speciesField(st.state, 2, 0); for (let i = 0; i < n; i++) s += m[i] * (u[i] - u0) * phi[i]; return s; };
      const A0 = amp();
      for (let k = 0; k < steps; k++) st.step(k * dt);
      const measured = Math.log(amp() / A0) / (steps * dt);
      // forward Euler multiplies the eigen-direction by exactly 1 + dt·σ per step (φ_j is an
      // eigenvector of the lumped discrete operator); nonlinearity is O(eps).
      expect(measured).toBeCloseTo(Math.log(1 + dt * sigma) / dt, 4);
      // and σ itself within the first-order time error dt·σ²/2 (plus the eigensolver's tolerance)
      expect(Math.abs(measured - sigma)).toBeLessThan(dt * sigma * sigma + 1e-5);
      rates.push(sigma);
    }
    expect(rates.length).toBe(2);
    expect(rates[0]).toBeGreaterThan(0);
    expect(rates[1]).toBeLessThan(0);
  });
});
