import { describe, expect, it } from 'vitest';
import { icosphere } from '../../meshes/shapes/icosphere.ts';
import { buildShape } from '../../meshes/shapes/index.ts';
import type { Mesh } from '../../solver/mesh/Mesh.ts';
import { compileKinetics } from '../../solver/kinetics/compileKinetics.ts';
import { ReactionDiffusionStepper, type StepperOptions } from '../../solver/integrate/ReactionDiffusionStepper.ts';
import { affineGrowth } from '../../solver/growth/affineGrowth.ts';
import { normalGrowth } from '../../solver/growth/normalGrowth.ts';
import { scaleFactor, type GrowthLaw } from '../../solver/growth/GrowthLaw.ts';

function total(st: ReactionDiffusionStepper): number {
  let s = 0;
  for (let i = 0; i < st.mass.length; i++) s += st.mass[i] * st.state[i];
  return s;
}

/** Pure diffusion of one species while the surface moves by `law`, geometry updated every step. */
function diffuseWhileGrowing(mesh: Mesh, law: GrowthLaw, options: StepperOptions, steps: number, init: (x: number, y: number, z: number) => number) {
  const kinetics = compileKinetics(['u'], { u: '0' }, []);
  const st = new ReactionDiffusionStepper({ mesh, kinetics, parameters: [], diffusion: [0.05] }, { ...options, growing: true });
  const p = mesh.positions;
  for (let i = 0; i < p.length / 3; i++) st.state[i] = init(p[3 * i], p[3 * i + 1], p[3 * i + 2]);
  const next = new Float64Array(p.length);
  const before = total(st);
  for (let k = 0; k < steps; k++) {
    const t0 = k * options.dt, t1 = (k + 1) * options.dt;
    law.advance(st.surface, t0, t1, next);
    st.setGeometry(next.slice());
    st.step(t0);
  }
  return { st, before, after: total(st) };
}

describe('evolving-surface finite elements (Dziuk & Elliott, IMA J. Numer. Anal. 2007)', () => {
  const sphere = icosphere(10, 1);
  const paddle = buildShape({ shape: 'limb-bud', vertices: 2000 }).mesh;
  const laws: [string, Mesh, GrowthLaw][] = [
    ['uniform exponential growth of a sphere', sphere, affineGrowth(sphere.positions.slice(), [0.5, 0.5, 0.5], 'exponential', [0, 0, 0])],
    ['anisotropic growth of the paddle', paddle, affineGrowth(paddle.positions.slice(), [0.6, 0.1, 0], 'linear', [0, 0, 0])],
    ['normal growth fastest at the distal tip', paddle, normalGrowth((_i, x) => 0.3 * Math.max(0, x - 1.5), '0.3·max(0, x − 1.5)')],
    ['tangential expansion towards the tip', paddle, normalGrowth(undefined, 'expansion x', (_i, x) => x)],
  ];
  for (const [name, mesh, law] of laws) {
    for (const options of [{ scheme: 'explicit', dt: 1e-4 }, { scheme: 'imex', dt: 0.01 }, { scheme: 'imex', dt: 0.01, solver: 'cholesky' }] as StepperOptions[]) {
      it(`pure diffusion conserves Σ M(t)U(t) to round-off: ${name}, ${options.scheme}${options.solver ? ' + ' + options.solver : ''}`, () => {
        const steps = options.scheme === 'explicit' ? 300 : 60;
        const { before, after, st } = diffuseWhileGrowing(mesh, law, options, steps, (x, y, z) => 1 + 0.5 * Math.sin(3 * x) * Math.cos(2 * y + z));
        expect(Math.abs(after - before)).toBeLessThan(1e-12 * Math.abs(before) * Math.sqrt(st.vertexCount));
        // the surface did move
        let moved = 0;
        for (let i = 0; i < mesh.positions.length; i++) moved = Math.max(moved, Math.abs(st.surface.positions[i] - mesh.positions[i]));
        expect(moved).toBeGreaterThan(1e-3);
      });
    }
  }

  it('uniform growth dilutes a homogeneous concentration as u₀/ρ(t)² (analytic)', () => {
    const rate = 0.3;
    const law = affineGrowth(sphere.positions.slice(), [rate, rate, rate], 'logistic', [0, 0, 0], 3);
    const { st } = diffuseWhileGrowing(sphere, law, { scheme: 'imex', dt: 0.05 }, 40, () => 2);
    const rho = scaleFactor('logistic', rate, 40 * 0.05, 3);
    for (let i = 0; i < st.vertexCount; i++) expect(st.state[i]).toBeCloseTo(2 / (rho * rho), 12);
    expect(rho).toBeGreaterThan(1.5);
  });
});

describe('exact solution on an exponentially expanding sphere', () => {
  it('converges at second order in space (solution derived below)', async () => {
    // R(t) = e^{rt}, material velocity v = r·x, ∇_Γ·v = 2r. The conservation law
    // ∂•u + u∇_Γ·v = DΔ_Γu has the solution u = A(t)·Y(x/R) for a degree-l harmonic Y
    // (material points keep x/R), with A′ = −(2r + D·l(l+1)/R²)A, so
    // A(t) = A₀·exp(−2rt − D·l(l+1)(1 − e^{−2rt})/(2r)). Here Y = 3ẑ² − 1, l = 2.
    const { observedOrder } = await import('../fixtures/meshes.ts');
    const r = 2, D = 1, T = 0.02, dt = 2e-5;
    const exact = Math.exp(-2 * r * T - (D * 6 * (1 - Math.exp(-2 * r * T))) / (2 * r));
    const errors: number[] = [], hs: number[] = [];
    for (const nu of [6, 12, 24]) {
      const mesh = icosphere(nu, 1);
      const n = mesh.positions.length / 3;
      const law = affineGrowth(mesh.positions.slice(), [r, r, r], 'exponential', [0, 0, 0]);
      const kinetics = compileKinetics(['u'], { u: '0' }, []);
      const st = new ReactionDiffusionStepper({ mesh, kinetics, parameters: [], diffusion: [D] }, { scheme: 'imex', dt, tolerance: 1e-12, growing: true });
      const Y = new Float64Array(n);
      for (let i = 0; i < n; i++) Y[i] = 3 * mesh.positions[3 * i + 2] ** 2 - 1; // unit sphere: ẑ = z
      st.state.set(Y);
      const next = new Float64Array(3 * n);
      const steps = Math.round(T / dt);
      for (let k = 0; k < steps; k++) {
        law.advance(st.surface, k * dt, (k + 1) * dt, next);
        st.setGeometry(next.slice());
        st.step(k * dt);
      }
      let uy = 0, yy = 0;
      for (let i = 0; i < n; i++) { uy += st.mass[i] * st.state[i] * Y[i]; yy += st.mass[i] * Y[i] * Y[i]; }
      errors.push(Math.abs(uy / yy - exact) / exact);
      hs.push(1 / nu);
    }
    expect(observedOrder(errors[0], errors[1], hs[0], hs[1])).toBeGreaterThan(1.7);
    expect(observedOrder(errors[1], errors[2], hs[1], hs[2])).toBeGreaterThan(1.7);
    expect(errors[2]).toBeLessThan(2e-4);
  });
});

describe('tangential expansion', () => {
  it('grows each vertex area at the local rate g − ḡ, converging as the mesh is refined', async () => {
    // g = z on the unit sphere: ḡ = 0, so area should change at the relative rate z
    const { lumpedMass } = await import('../../solver/fem/lumpedMass.ts');
    const errs: number[] = [];
    for (const nu of [8, 16]) {
      const mesh = icosphere(nu, 1);
      const law = normalGrowth(undefined, 'expansion z', (_i, _x, _y, z) => z);
      const dt = 1e-4;
      const next = new Float64Array(mesh.positions.length);
      law.advance(mesh, 0, dt, next);
      const m0 = lumpedMass(mesh), m1 = lumpedMass({ positions: next, triangles: mesh.triangles });
      let e = 0, area0 = 0, area1 = 0;
      for (let i = 0; i < m0.length; i++) {
        area0 += m0[i]; area1 += m1[i];
        e += m0[i] * ((m1[i] / m0[i] - 1) / dt - mesh.positions[3 * i + 2]) ** 2;
      }
      e = Math.sqrt(e / area0); // area-weighted RMS error of the local rate
      // total area unchanged to second order (pure redistribution)
      expect(Math.abs(area1 / area0 - 1)).toBeLessThan(dt * dt * 10);
      errs.push(e);
    }
    // the vertex-averaged gradient is first-order accurate pointwise, better in the mean:
    // the RMS error of the local rate must at least halve when h halves
    expect(errs[1]).toBeLessThan(errs[0] / 2);
    expect(errs[1]).toBeLessThan(0.01);
  });
});

describe('anisotropic growth along chosen axes', () => {
  it('stretches the chosen direction only: a unit sphere becomes an ellipsoid along (1, 1, 0)/√2', () => {
    const sphere = icosphere(6, 1);
    const s = Math.SQRT1_2;
    const law = affineGrowth(sphere.positions.slice(), [Math.log(2), 0, 0], 'exponential', [0, 0, 0], undefined, [[s, s, 0], [-s, s, 0], [0, 0, 1]]);
    const out = new Float64Array(sphere.positions.length);
    law.advance(sphere, 0, 1, out); // ρ = 2 along the first axis
    for (let i = 0; i < out.length; i += 3) {
      const along = (out[i] + out[i + 1]) * s, across = (-out[i] + out[i + 1]) * s;
      // on the ellipsoid (along/2)² + across² + z² = 1
      expect((along / 2) ** 2 + across ** 2 + out[i + 2] ** 2).toBeCloseTo(1, 12);
    }
  });
});
