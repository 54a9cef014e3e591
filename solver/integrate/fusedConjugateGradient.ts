import type { EllLayout, EllValues } from '../linalg/EllMatrix.ts';
import { rowProductCode, weightSetHoist, type RowProductPlan } from './rowProductCode.ts';

/**
 * Solve the nS independent systems (diag(m) + c_s·K_s)·x_s = m·g_s of one
 * implicit diffusion step at once, starting from x = g (the explicit
 * prediction, so the right-hand side needs no array of its own), with
 * Jacobi-preconditioned conjugate gradients (Hestenes & Stiefel 1952; Saad,
 * "Iterative Methods for Sparse Linear Systems", 2nd ed., alg. 9.1). Vectors
 * are vertex-major like the state, so each iteration reads the matrix rows
 * once for all species. `x` holds g on entry and the solution on return.
 * Each species stops when ‖r_s‖₂ ≤ tol·‖b_s‖₂.
 *
 * After convergence each x_s is shifted by a constant so that Σ m·x_s = Σ m·g_s,
 * which the exact solution satisfies because 1ᵀK_s = 0: the total amount is
 * then conserved to round-off, not only to the solver tolerance.
 *
 * Returns the largest iteration count; `iterations[s]` gets each species'
 * count, or −1 where maxIterations was reached first.
 */
export type FusedCgSolver = (
  n: number, layout: EllLayout, sets: readonly EllValues[], mass: Float64Array, c: Float64Array, inverseDiagonal: Float64Array,
  x: Float64Array, r: Float64Array, p: Float64Array, q: Float64Array,
  tolerance: number, maxIterations: number, iterations: Int32Array,
) => number;

type Sweep = (n: number, layout: EllLayout, sets: readonly EllValues[], mass: Float64Array, c: Float64Array, dinv: Float64Array,
  x: Float64Array, r: Float64Array, p: Float64Array, q: Float64Array, scalars: Float64Array) => void;

/**
 * The solver is a small driver around four generated sweeps (start, A·p with
 * p·Ap, x/r update with r·z, new direction), each a short function V8
 * optimises on its own; per-species scalars travel in one Float64Array
 * (`scalars[k·nS + s]`).
 */
export function compileFusedCg(plan: RowProductPlan): FusedCgSolver {
  const nS = plan.speciesCount;
  const S = Array.from({ length: nS }, (_, s) => s);
  const each = (f: (s: number) => string) => S.map(f).join('\n');
  const hoist = 'const columns = layout.columns, overflowOffsets = layout.overflowOffsets, overflowColumns = layout.overflowColumns;\n' + weightSetHoist(plan) + each((s) => `const c${s} = c[${s}];`) + '\n';
  const args = ['n', 'layout', 'sets', 'mass', 'c', 'dinv', 'x', 'r', 'p', 'q', 'sc'];
  // scalar slots: 0 rz, 1 rr, 2 bb, 3 sb, 4 pq, 5 alpha, 6 beta, 7 mx
  const slot = (k: number, s: number) => `sc[${k * nS + s}]`;
  const make = (body: string) => new Function(...args, `"use strict";\n${body}`) as Sweep;
  const applied = (s: number, v: string) => `m * ${v}${s}` + (plan.weightSet[s] < 0 ? '' : ` + c${s} * a${s}`);

  // b = m·x₀, r = b − A x₀ = −c·K x₀, p = D⁻¹ r
  const start = make(hoist + each((s) => `let rz${s} = 0, rr${s} = 0, bb${s} = 0, sb${s} = 0;`) +
    `\nfor (let i = 0; i < n; i++) {\nconst b = i * ${nS};\nconst m = mass[i];\n${S.map((s) => `const x${s} = x[b + ${s}];`).join(' ')}\n${rowProductCode(plan, 'x', S.map((s) => `x${s}`))}` +
    each((s) => `{ const bi = m * x${s}; const ri = ${plan.weightSet[s] < 0 ? '0' : `-c${s} * a${s}`}; r[b + ${s}] = ri; const zi = dinv[b + ${s}] * ri; p[b + ${s}] = zi; rz${s} += ri * zi; rr${s} += ri * ri; bb${s} += bi * bi; sb${s} += bi; }`) +
    '\n}\n' + each((s) => `${slot(0, s)} = rz${s}; ${slot(1, s)} = rr${s}; ${slot(2, s)} = bb${s}; ${slot(3, s)} = sb${s};`));
  // q = A p, pq = p·q
  const product = make(hoist + each((s) => `let pq${s} = 0;`) +
    `\nfor (let i = 0; i < n; i++) {\nconst b = i * ${nS};\nconst m = mass[i];\n${S.map((s) => `const p${s} = p[b + ${s}];`).join(' ')}\n${rowProductCode(plan, 'p', S.map((s) => `p${s}`))}` +
    each((s) => `{ const qi = ${applied(s, 'p')}; q[b + ${s}] = qi; pq${s} += p${s} * qi; }`) +
    '\n}\n' + each((s) => `${slot(4, s)} = pq${s};`));
  // x += α p, r −= α q, rz = r·D⁻¹r, rr = r·r
  const update = make(each((s) => `const al${s} = ${slot(5, s)}; let rz${s} = 0, rr${s} = 0;`) +
    `\nfor (let i = 0; i < n; i++) {\nconst b = i * ${nS};\n` +
    each((s) => `{ const o = b + ${s}; x[o] += al${s} * p[o]; const ri = r[o] - al${s} * q[o]; r[o] = ri; rz${s} += ri * dinv[o] * ri; rr${s} += ri * ri; }`) +
    '\n}\n' + each((s) => `${slot(0, s)} = rz${s}; ${slot(1, s)} = rr${s};`));
  // p = D⁻¹ r + β p
  const direction = make(each((s) => `const be${s} = ${slot(6, s)};`) +
    `\nfor (let i = 0; i < n; i++) {\nconst b = i * ${nS};\n` + each((s) => `{ const o = b + ${s}; p[o] = dinv[o] * r[o] + be${s} * p[o]; }`) + '\n}\n');
  // Σ m x, then the conservation shift
  const total = make(each((s) => `let mx${s} = 0;`) + `\nlet area = 0;\nfor (let i = 0; i < n; i++) {\nconst m = mass[i];\nconst b = i * ${nS};\narea += m;\n` +
    each((s) => `mx${s} += m * x[b + ${s}];`) + '\n}\n' + each((s) => `${slot(7, s)} = (${slot(3, s)} - mx${s}) / area;`));
  const shift = make(each((s) => `const sh${s} = ${slot(7, s)};`) + `\nfor (let i = 0; i < n; i++) {\nconst b = i * ${nS};\n${each((s) => `x[b + ${s}] += sh${s};`)}\n}\n`);

  const sc = new Float64Array(8 * nS);
  const rz = new Float64Array(nS), threshold = new Float64Array(nS);
  const done = new Uint8Array(nS);
  return (n, layout, sets, mass, c, dinv, x, r, p, q, tolerance, maxIterations, iterations) => {
    start(n, layout, sets, mass, c, dinv, x, r, p, q, sc);
    let remaining = nS;
    for (let s = 0; s < nS; s++) {
      rz[s] = sc[s];
      threshold[s] = tolerance * tolerance * sc[2 * nS + s];
      done[s] = sc[nS + s] <= threshold[s] ? 1 : 0;
      iterations[s] = done[s] ? 0 : -1;
      if (done[s]) remaining--;
    }
    let it = 0;
    while (remaining > 0 && it < maxIterations) {
      it++;
      product(n, layout, sets, mass, c, dinv, x, r, p, q, sc);
      for (let s = 0; s < nS; s++) sc[5 * nS + s] = done[s] ? 0 : rz[s] / sc[4 * nS + s];
      update(n, layout, sets, mass, c, dinv, x, r, p, q, sc);
      for (let s = 0; s < nS; s++) {
        sc[6 * nS + s] = 0;
        if (done[s]) continue;
        if (sc[nS + s] <= threshold[s]) {
          done[s] = 1;
          iterations[s] = it;
          remaining--;
        } else {
          sc[6 * nS + s] = sc[s] / rz[s];
          rz[s] = sc[s];
        }
      }
      if (remaining > 0) direction(n, layout, sets, mass, c, dinv, x, r, p, q, sc);
    }
    total(n, layout, sets, mass, c, dinv, x, r, p, q, sc);
    shift(n, layout, sets, mass, c, dinv, x, r, p, q, sc);
    return it;
  };
}
