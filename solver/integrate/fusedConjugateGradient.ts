import type { EllLayout, EllValues } from '../linalg/EllMatrix.ts';
import { rowProductCode, weightSetHoist, type RowProductPlan } from './rowProductCode.ts';

/**
 * Solve the nS independent systems (diag(m) + c_s·K_s)·x_s = b_s of one
 * implicit diffusion step at once, with Jacobi-preconditioned conjugate
 * gradients (Hestenes & Stiefel 1952; Saad, "Iterative Methods for Sparse
 * Linear Systems", 2nd ed., alg. 9.1). Vectors are vertex-major like the
 * state, so each iteration reads the matrix rows once for all species. `x`
 * holds the starting guess on entry. Each species stops when
 * ‖r_s‖₂ ≤ tol·‖b_s‖₂.
 *
 * After convergence each x_s is shifted by a constant so that Σ m·x_s = Σ b_s,
 * which the exact solution satisfies because 1ᵀK_s = 0: the total amount is
 * then conserved to round-off, not only to the solver tolerance.
 *
 * Returns the largest iteration count; `iterations[s]` gets each species'
 * count, or −1 where maxIterations was reached first.
 */
export type FusedCgSolver = (
  n: number, layout: EllLayout, sets: readonly EllValues[], mass: Float64Array, c: Float64Array, inverseDiagonal: Float64Array,
  b: Float64Array, x: Float64Array, r: Float64Array, p: Float64Array, q: Float64Array,
  tolerance: number, maxIterations: number, iterations: Int32Array,
) => number;

export function compileFusedCg(plan: RowProductPlan): FusedCgSolver {
  const nS = plan.speciesCount;
  const S = Array.from({ length: nS }, (_, s) => s);
  const each = (f: (s: number) => string) => S.map(f).join('\n');
  const applied = (s: number, v: string) => `m * ${v}[b + ${s}]` + (plan.weightSet[s] < 0 ? '' : ` + c${s} * a${s}`);
  const all = (f: (s: number) => string) => S.map(f).join(' && ');
  let code = '"use strict";\nconst columns = layout.columns, overflowOffsets = layout.overflowOffsets, overflowColumns = layout.overflowColumns;\n';
  code += weightSetHoist(plan);
  code += each((s) => `const c${s} = c[${s}];`);
  code += `\n${each((s) => `let rz${s} = 0, rr${s} = 0, bb${s} = 0, sb${s} = 0, done${s} = false, it${s} = -1;`)}\n`;
  // r = b − A x, p = D⁻¹ r
  code += `for (let i = 0; i < n; i++) {\nconst b = i * ${nS};\nconst m = mass[i];\n${rowProductCode(plan, 'x')}`;
  code += each((s) => `{ const bi = bv[b + ${s}]; const ri = bi - (${applied(s, 'x')}); r[b + ${s}] = ri; const zi = dinv[b + ${s}] * ri; p[b + ${s}] = zi; rz${s} += ri * zi; rr${s} += ri * ri; bb${s} += bi * bi; sb${s} += bi; }`);
  code += '\n}\n';
  code += each((s) => `const thr${s} = tolerance * tolerance * bb${s};\nif (rr${s} <= thr${s}) { done${s} = true; it${s} = 0; }`);
  code += `\nlet it = 0;\nwhile (it < maxIterations && !(${all((s) => `done${s}`)})) {\nit++;\n`;
  code += each((s) => `let pq${s} = 0;`) + '\n';
  code += `for (let i = 0; i < n; i++) {\nconst b = i * ${nS};\nconst m = mass[i];\n${rowProductCode(plan, 'p')}`;
  code += each((s) => `{ const qi = ${applied(s, 'p')}; q[b + ${s}] = qi; pq${s} += p[b + ${s}] * qi; }`);
  code += '\n}\n';
  code += each((s) => `const al${s} = done${s} ? 0 : rz${s} / pq${s}; let rzn${s} = 0, rrn${s} = 0;`);
  code += `\nfor (let i = 0; i < n; i++) {\nconst b = i * ${nS};\n`;
  code += each((s) => `{ const o = b + ${s}; x[o] += al${s} * p[o]; const ri = r[o] - al${s} * q[o]; r[o] = ri; rzn${s} += ri * dinv[o] * ri; rrn${s} += ri * ri; }`);
  code += '\n}\n';
  code += each((s) => `let be${s} = 0;\nif (!done${s}) { if (rrn${s} <= thr${s}) { done${s} = true; it${s} = it; } else { be${s} = rzn${s} / rz${s}; rz${s} = rzn${s}; } }`);
  code += `\nif (${all((s) => `done${s}`)}) break;\n`;
  code += `for (let i = 0; i < n; i++) {\nconst b = i * ${nS};\n`;
  code += each((s) => `{ const o = b + ${s}; p[o] = dinv[o] * r[o] + be${s} * p[o]; }`);
  code += '\n}\n}\n';
  // conservation: shift each x_s so that Σ m x_s = Σ b_s
  code += `let area = 0;\n${each((s) => `let mx${s} = 0;`)}\nfor (let i = 0; i < n; i++) {\nconst m = mass[i];\nconst b = i * ${nS};\narea += m;\n`;
  code += each((s) => `mx${s} += m * x[b + ${s}];`) + '\n}\n';
  code += each((s) => `const sh${s} = (sb${s} - mx${s}) / area;`) + '\n';
  code += `for (let i = 0; i < n; i++) {\nconst b = i * ${nS};\n${each((s) => `x[b + ${s}] += sh${s};`)}\n}\n`;
  code += each((s) => `iterations[${s}] = it${s};`) + '\nreturn it;';
  return new Function('n', 'layout', 'sets', 'mass', 'c', 'dinv', 'bv', 'x', 'r', 'p', 'q', 'tolerance', 'maxIterations', 'iterations', code) as FusedCgSolver;
}
