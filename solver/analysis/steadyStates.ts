import type { CompiledKinetics } from '../kinetics/compileKinetics.ts';
import { seededRandom } from '../linalg/seededRandom.ts';
import { smallMatrixEigenvalues, type Complex } from './smallMatrixEigenvalues.ts';

export interface SteadyState {
  /** species values, in species order */
  values: number[];
  /** Jacobian ∂f_i/∂u_j there, row-major */
  jacobian: number[];
  /** eigenvalues of the Jacobian, by decreasing real part */
  eigenvalues: Complex[];
  /** every eigenvalue has negative real part: stable to homogeneous perturbations */
  stableWithoutDiffusion: boolean;
  source: 'closed form' | 'numerical';
}

/** Solve the small dense system A x = b in place (partial pivoting); false if singular. */
function solveSmall(a: number[], b: number[], n: number): boolean {
  for (let c = 0; c < n; c++) {
    let p = c;
    for (let r = c + 1; r < n; r++) if (Math.abs(a[r * n + c]) > Math.abs(a[p * n + c])) p = r;
    if (a[p * n + c] === 0 || !Number.isFinite(a[p * n + c])) return false;
    if (p !== c) {
      for (let k = 0; k < n; k++) [a[c * n + k], a[p * n + k]] = [a[p * n + k], a[c * n + k]];
      [b[c], b[p]] = [b[p], b[c]];
    }
    for (let r = c + 1; r < n; r++) {
      const f = a[r * n + c] / a[c * n + c];
      for (let k = c; k < n; k++) a[r * n + k] -= f * a[c * n + k];
      b[r] -= f * b[c];
    }
  }
  for (let r = n - 1; r >= 0; r--) {
    let s = b[r];
    for (let k = r + 1; k < n; k++) s -= a[r * n + k] * b[k];
    b[r] = s / a[r * n + r];
  }
  return true;
}

/** Describe a state: Jacobian, its eigenvalues, stability without diffusion. */
export function classifyState(kinetics: CompiledKinetics, params: readonly number[], values: number[], source: SteadyState['source']): SteadyState {
  const n = kinetics.species.length;
  const jacobian = Array.from(kinetics.jacobian(values, params));
  const eigenvalues = smallMatrixEigenvalues(jacobian, n);
  return { values, jacobian, eigenvalues, stableWithoutDiffusion: eigenvalues[0][0] < 0, source };
}

/**
 * Homogeneous steady states f(u) = 0 by Newton's method from many seeded
 * starting points (log-uniform positive values, values of either sign, zero,
 * ones), kept when the residual falls to round-off and deduplicated.
 */
export function numericalSteadyStates(kinetics: CompiledKinetics, params: readonly number[], seed = 1, starts = 96): number[][] {
  const n = kinetics.species.length;
  const rand = seededRandom(seed);
  const f = new Float64Array(n);
  const found: number[][] = [];
  const begin: number[][] = [new Array(n).fill(0), new Array(n).fill(1)];
  for (let k = 0; k < starts; k++) {
    begin.push(Array.from({ length: n }, () => (k % 3 === 2 ? 6 * rand() - 3 : Math.pow(10, 4 * rand() - 2))));
  }
  for (const u0 of begin) {
    const u = u0.slice();
    let ok = false;
    for (let it = 0; it < 60; it++) {
      kinetics.evaluate(u, params, f);
      let res = 0, size = 1;
      for (let i = 0; i < n; i++) { res = Math.max(res, Math.abs(f[i])); size = Math.max(size, Math.abs(u[i])); }
      if (!Number.isFinite(res)) break;
      if (res < 1e-13 * size) { ok = true; break; }
      const J = Array.from(kinetics.jacobian(u, params));
      const step = Array.from(f, (x) => -x);
      if (!solveSmall(J, step, n)) break;
      let damp = 1;
      const limit = 10 * size;
      for (let i = 0; i < n; i++) if (Math.abs(step[i]) > limit) damp = Math.min(damp, limit / Math.abs(step[i]));
      for (let i = 0; i < n; i++) u[i] += damp * step[i];
    }
    if (!ok || u.some((x) => !Number.isFinite(x) || Math.abs(x) > 1e8)) continue;
    const clean = u.map((x) => (Math.abs(x) < 1e-14 ? 0 : x));
    if (!found.some((g) => g.every((x, i) => Math.abs(x - clean[i]) <= 1e-7 * Math.max(1, Math.abs(x))))) found.push(clean);
  }
  return found.sort((a, b) => a[0] - b[0] || (a[1] ?? 0) - (b[1] ?? 0));
}
