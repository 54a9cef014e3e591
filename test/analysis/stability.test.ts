import { describe, expect, it } from 'vitest';
import numeric from 'numeric';
import { smallMatrixEigenvalues } from '../../solver/analysis/smallMatrixEigenvalues.ts';
import { turingAnalysis, growthRate } from '../../solver/analysis/dispersion.ts';
import { numericalSteadyStates } from '../../solver/analysis/steadyStates.ts';
import { surfaceModeRates } from '../../solver/analysis/surfaceModeRates.ts';
import { modeSpectrum } from '../../solver/analysis/modeSpectrum.ts';
import { compileKinetics } from '../../solver/kinetics/compileKinetics.ts';
import { laplaceBeltramiEigenpairs } from '../../solver/fem/laplaceBeltramiEigenpairs.ts';
import { lumpedMass } from '../../solver/fem/lumpedMass.ts';
import { icosphere } from '../../meshes/shapes/icosphere.ts';
import { seededRandom } from '../../solver/linalg/seededRandom.ts';

/** Schnakenberg Jacobian at (a + b, b/(a + b)²), unscaled (Murray, Mathematical Biology II, ch. 2). */
function schnakenbergJ(a: number, b: number, gamma = 1): number[] {
  const u = a + b, v = b / (u * u);
  return [gamma * (-1 + 2 * u * v), gamma * u * u, -2 * gamma * u * v, -gamma * u * u];
}

describe('eigenvalues of small matrices', () => {
  it('match numeric.eig on random 2×2 … 6×6 matrices', () => {
    const r = seededRandom(3);
    for (const n of [2, 3, 4, 5, 6]) {
      for (let t = 0; t < 20; t++) {
        const A = Array.from({ length: n }, () => Array.from({ length: n }, () => 4 * r() - 2));
        const ours = smallMatrixEigenvalues(A.flat(), n);
        const E = numeric.eig(A).lambda;
        const re = E.x as number[], im = (E.y ?? re.map(() => 0)) as number[];
        re.forEach((x, i) => {
          const nearest = Math.min(...ours.map(([p, q]) => Math.hypot(p - x, q - im[i])));
          expect(nearest).toBeLessThan(1e-9);
        });
      }
    }
  });
});

describe('Turing analysis (Murray, Mathematical Biology II, ch. 2)', () => {
  it('Schnakenberg a = 0.1, b = 0.9, d = 10: all four conditions, band γ(0.2, 0.5), d_c from d²f_u² + 2(2f_v g_u − f_u g_v)d + g_v² = 0', () => {
    // f_u = 0.8, f_v = 1, g_u = −1.8, g_v = −1, det J = 1: L, M = [(d f_u + g_v) ∓ √((d f_u + g_v)² − 4d det J)]/(2d) = (7 ∓ 3)/20
    for (const gamma of [1, 200]) {
      const t = turingAnalysis(schnakenbergJ(0.1, 0.9, gamma), [1, 10]);
      expect(t.unstable).toBe(true);
      expect(t.conditions).toEqual({ traceNegative: true, determinantPositive: true, diffusionDriven: true, discriminantPositive: true });
      expect(t.band![0]).toBeCloseTo(0.2 * gamma, 10);
      expect(t.band![1]).toBeCloseTo(0.5 * gamma, 10);
      // 0.64 d² − 5.6 d + 1 = 0, the root with d f_u + g_v > 0
      expect(t.criticalRatio!).toBeCloseTo((5.6 + Math.sqrt(5.6 ** 2 - 4 * 0.64)) / 1.28, 10);
      // fastest growth: the maximum of the closed-form 2×2 rate over the band
      let best = -Infinity;
      for (let k2 = 0.2 * gamma; k2 <= 0.5 * gamma; k2 += gamma * 1e-5) best = Math.max(best, growthRate(schnakenbergJ(0.1, 0.9, gamma), [1, 10], k2));
      expect(t.fastest!.rate).toBeCloseTo(best, 6);
    }
    // below the critical ratio nothing grows
    expect(turingAnalysis(schnakenbergJ(0.1, 0.9), [1, 8]).unstable).toBe(false);
  });

  it('Gray–Scott: the trivial state (1, 0) is stable and never Turing-unstable (Pearson, Science 1993)', () => {
    const F = 0.037, k = 0.06;
    const t = turingAnalysis([-F, 0, 0, -(F + k)], [2e-5, 1e-5]);
    expect(t.unstable).toBe(false);
    expect(t.unstableWithoutDiffusion).toBe(false);
    expect(t.conditions!.diffusionDriven).toBe(false);
  });

  it('a homogeneous oscillation is reported as such (Brusselator past its Hopf point b > 1 + a²)', () => {
    // J at (a, b/a): [[b − 1, a²], [−b, −a²]]
    const a = 1, b = 2.5;
    const t = turingAnalysis([b - 1, a * a, -b, -a * a], [1, 1]);
    expect(t.unstableWithoutDiffusion).toBe(true);
    expect(t.oscillatory).toBe(true);
  });

  it('more species: a decoupled, decaying third species leaves the two-species band unchanged', () => {
    const J2 = schnakenbergJ(0.1, 0.9);
    const J3 = [J2[0], J2[1], 0, J2[2], J2[3], 0, 0, 0, -1];
    const t = turingAnalysis(J3, [1, 10, 1]);
    expect(t.band![0]).toBeCloseTo(0.2, 6);
    expect(t.band![1]).toBeCloseTo(0.5, 6);
  });

  it('numerical steady states of formula kinetics agree with the closed forms', () => {
    const sch = compileKinetics(['u', 'v'], { u: 'a - u + u^2*v', v: 'b - u^2*v' }, ['a', 'b']);
    const s = numericalSteadyStates(sch, [0.1, 0.9]);
    expect(s.length).toBe(1);
    expect(s[0][0]).toBeCloseTo(1, 10);
    expect(s[0][1]).toBeCloseTo(0.9, 10);
    // Gray–Scott with F = 0.04, k = 0.05 (F ≥ 4(F + k)²): three states
    const gs = compileKinetics(['u', 'v'], { u: '-u*v^2 + F*(1 - u)', v: 'u*v^2 - (F + k)*v' }, ['F', 'k']);
    const states = numericalSteadyStates(gs, [0.04, 0.05]);
    const F = 0.04, fk = 0.09, disc = Math.sqrt(F * F - 4 * F * fk * fk);
    const vs = [0, (F - disc) / (2 * fk), (F + disc) / (2 * fk)];
    expect(states.map((x) => x[1]).sort((p, q) => p - q).map((x) => Number(x.toFixed(10)))).toEqual(vs.map((x) => Number(x.toFixed(10))));
  });
});

describe('pattern selection on a sphere (Chaplain, Ganesh & Graham, J. Math. Biol. 2001)', () => {
  // Schnakenberg (a = 0.1, b = 0.9, d = 10) with scale γ: band γ·0.2 < k² < γ·0.5. On a sphere of
  // radius R the modes are spherical harmonics with eigenvalues l(l+1)/R²: the predicted degree is
  // the l with the largest growth rate, computed here from the exact eigenvalues.
  const mesh1 = icosphere(16, 1);
  const eig1 = laplaceBeltramiEigenpairs(mesh1, { count: 80, mass: 'lumped' });
  const degreeOf = (lambda: number, R: number) => Math.round((-1 + Math.sqrt(1 + 4 * lambda * R * R)) / 2);
  const expected = (gamma: number, R: number) => {
    let bestL = -1, best = 0;
    const inBand: number[] = [];
    for (let l = 1; l <= 8; l++) {
      const r = growthRate(schnakenbergJ(0.1, 0.9, gamma), [1, 10], (l * (l + 1)) / (R * R));
      if (r > 1e-9) inBand.push(l);
      if (r > best) { best = r; bestL = l; }
    }
    return { l: bestL, inBand };
  };
  const cases: [string, number, number, number][] = [
    // name, γ, expected number of degrees in the band, R
    ['one degree in the band (γ = 20: 4 < k² < 10 holds l = 2)', 20, 1, 1],
    ['two degrees (γ = 50: 10 < k² < 25 holds l = 3, 4)', 50, 2, 1],
    ['several degrees (γ = 120: 24 < k² < 60 holds l = 5, 6, 7)', 120, 3, 1],
    ['a degree on the band edge (γ = 30: l = 2 sits at k² = 6 = 0.2γ)', 30, 1, 1],
  ];
  for (const [name, gamma, count, R] of cases) {
    it(name, () => {
      const want = expected(gamma, R);
      expect(want.inBand.length).toBe(count);
      const s = surfaceModeRates(schnakenbergJ(0.1, 0.9, gamma), [1, 10], eig1);
      expect(s.predicted).not.toBeNull();
      expect(degreeOf(s.predicted!.eigenvalue, R)).toBe(want.l);
      expect(s.predicted!.multiplicity).toBe(2 * want.l + 1);
      // every unstable surface mode belongs to a degree in the band
      for (const m of s.unstable) expect(want.inBand).toContain(degreeOf(m.eigenvalue, R));
      if (gamma === 30) {
        // at the edge σ ≈ −h(k²)/|tr A| with h′ = 2dk² − (d f_u + g_v)γ = −3γ and tr A = −2.4γ there,
        // so the edge degree's rate is only its eigenvalue's O(h²) error times 3/2.4 = 1.25
        const edge = s.rates.filter((m) => degreeOf(m.eigenvalue, R) === 2);
        for (const m of edge) expect(Math.abs(m.rate)).toBeLessThan(1.3 * Math.abs(m.eigenvalue - 6));
        expect(edge.length).toBe(5);
      }
    });
  }
  it('radius scales the selection: R = 2 with γ/4 selects the same degree as R = 1 with γ', () => {
    const mesh2 = icosphere(16, 2);
    const eig2 = laplaceBeltramiEigenpairs(mesh2, { count: 80, mass: 'lumped' });
    const s = surfaceModeRates(schnakenbergJ(0.1, 0.9, 120 / 4), [1, 10], eig2);
    expect(degreeOf(s.predicted!.eigenvalue, 2)).toBe(expected(120, 1).l);
  });
});

describe('mode spectrum', () => {
  it('a field built from known eigenmodes is decomposed back into them to 1e-8', () => {
    const mesh = icosphere(10, 1);
    const eig = laplaceBeltramiEigenpairs(mesh, { count: 30, mass: 'lumped' });
    const n = mesh.positions.length / 3;
    const c = [0, 0.3, 0, 0, -1.2, 0, 0.7, 0, 0, 0, 2.5];
    const f = new Float64Array(n);
    c.forEach((cj, j) => { for (let i = 0; i < n; i++) f[i] += cj * eig.vectors[j][i]; });
    const spec = modeSpectrum(f, lumpedMass(mesh), eig);
    for (let j = 0; j < 30; j++) expect(Math.abs(spec.coefficients[j] - (c[j] ?? 0))).toBeLessThan(1e-8);
    expect(spec.dominant!.first).toBe(9); // 2.5 on mode 10, in the l = 3 cluster (modes 9–15)
  });
});
