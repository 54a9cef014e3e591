import type { CompiledKinetics } from '../kinetics/compileKinetics.ts';
import { parameterPlaceholder, speciesPlaceholder } from '../kinetics/compileKinetics.ts';
import type { EllLayout, EllValues } from '../linalg/EllMatrix.ts';
import { rowProductCode, weightSetHoist, type RowProductPlan } from './rowProductCode.ts';

/** How each species diffuses: not at all, with a constant D (shared K), or with its own D-weighted stiffness. */
export type DiffusionKind = 'none' | 'constant' | 'field';

export interface KernelLayout {
  readonly kinetics: CompiledKinetics;
  readonly rows: RowProductPlan;
  /** true where a parameter is a per-vertex field */
  readonly fieldParameters: readonly boolean[];
}

/**
 * Explicit step (forward Euler, lumped mass) over all vertices in one pass:
 * O_i = U_i + dt·f(U_i) − c_s·(M⁻¹K_s U_s)_i for every species s, where the
 * weight sets hold M⁻¹K (rows scaled by 1/m_i) and c_s = dt·D_s for the shared
 * K, c_s = dt for a D-weighted K_s.
 * Returns the sum of the new values: non-finite iff any value is.
 */
export type ExplicitKernel = (
  n: number, layout: EllLayout, sets: readonly EllValues[], state: Float64Array, out: Float64Array, dt: number, t: number,
  c: Float64Array, constants: Float64Array, fields: readonly (Float64Array | undefined)[], positions: Float64Array,
) => number;

/**
 * Explicit half of the implicit–explicit step: G_i = U_i + dt·f(U_i). The
 * implicit half solves (M + dt·D·K)U' = M·G with G as the starting guess, so
 * G is all the right-hand side needs. Returns Σ G (non-finite iff any is).
 */
export type ImexRhsKernel = (
  n: number, state: Float64Array, guess: Float64Array, dt: number, t: number,
  constants: Float64Array, fields: readonly (Float64Array | undefined)[], positions: Float64Array,
) => number;

/** Local names for the reaction formulas and the code that loads them per vertex. */
function reactionLocals(layout: KernelLayout): { names: Record<string, string>; hoist: string; load: string } {
  const k = layout.kinetics;
  const nS = k.species.length;
  const names: Record<string, string> = { cx: 'x', cy: 'y', cz: 'z', ct: 't' };
  let hoist = '', load = '';
  for (let s = 0; s < nS; s++) {
    names[speciesPlaceholder(s)] = `u${s}`;
    load += `const u${s} = U[b + ${s}];\n`;
  }
  layout.fieldParameters.forEach((isField, p) => {
    names[parameterPlaceholder(p)] = `q${p}`;
    if (isField) {
      hoist += `const fq${p} = fields[${p}];\n`;
      load += `const q${p} = fq${p}[i];\n`;
    } else {
      hoist += `const q${p} = constants[${p}];\n`;
    }
  });
  if (k.uses.x) load += 'const x = positions[3 * i];\n';
  if (k.uses.y) load += 'const y = positions[3 * i + 1];\n';
  if (k.uses.z) load += 'const z = positions[3 * i + 2];\n';
  return { names, hoist, load };
}

const LAYOUT_HOIST = 'const columns = layout.columns, overflowOffsets = layout.overflowOffsets, overflowColumns = layout.overflowColumns;\n';

export function compileExplicitKernel(layout: KernelLayout): ExplicitKernel {
  const nS = layout.kinetics.species.length;
  const { names, hoist, load } = reactionLocals(layout);
  const rates = layout.kinetics.rateCode(names);
  let code = `"use strict";\n${LAYOUT_HOIST}${weightSetHoist(layout.rows)}${hoist}`;
  for (let s = 0; s < nS; s++) code += `const c${s} = c[${s}];\n`;
  const own = Array.from({ length: nS }, (_, s) => `u${s}`);
  code += `let check = 0;\nfor (let i = 0; i < n; i++) {\nconst b = i * ${nS};\n${load}${rowProductCode(layout.rows, 'U', own)}`;
  for (let s = 0; s < nS; s++) {
    const diff = layout.rows.weightSet[s] < 0 ? '' : ` - c${s} * a${s}`;
    code += `const o${s} = u${s} + dt * ${rates[s]}${diff};\nO[b + ${s}] = o${s};\n`;
  }
  code += `check += ${Array.from({ length: nS }, (_, s) => `o${s}`).join(' + ')};\n}\nreturn check;`;
  // generated from validated formula trees and our own names only (see formulaToCode)
  return new Function('n', 'layout', 'sets', 'U', 'O', 'dt', 't', 'c', 'constants', 'fields', 'positions', code) as ExplicitKernel;
}

export function compileImexRhsKernel(layout: KernelLayout): ImexRhsKernel {
  const nS = layout.kinetics.species.length;
  const { names, hoist, load } = reactionLocals(layout);
  const rates = layout.kinetics.rateCode(names);
  let code = `"use strict";\n${hoist}let check = 0;\nfor (let i = 0; i < n; i++) {\nconst b = i * ${nS};\n${load}`;
  for (let s = 0; s < nS; s++) code += `const g${s} = u${s} + dt * ${rates[s]};\nX[b + ${s}] = g${s};\ncheck += g${s};\n`;
  code += '}\nreturn check;';
  return new Function('n', 'U', 'X', 'dt', 't', 'constants', 'fields', 'positions', code) as ImexRhsKernel;
}
