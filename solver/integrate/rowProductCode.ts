/**
 * Code generation shared by the time-stepping kernels: the products
 * a_s = (K_s v)_i of row i for every diffusing species, over an ELL layout
 * (see `EllLayout`), with the neighbour loop unrolled to the layout's width.
 *
 * Kernels that use it take `columns`, `overflowOffsets`, `overflowColumns`
 * and, for each weight set g, `diagonal{g}`, `weights{g}`, `overflow{g}`
 * locals (hoisted by `weightSetHoist`), and define `i` and `b = i·nS`.
 */
export interface RowProductPlan {
  readonly speciesCount: number;
  readonly width: number;
  readonly hasOverflow: boolean;
  /** per species: the weight set it uses, or −1 if it does not diffuse */
  readonly weightSet: readonly number[];
}

/** `const diagonal0 = sets[0].diagonal; …` for every set in use. */
export function weightSetHoist(plan: RowProductPlan): string {
  const sets = [...new Set(plan.weightSet.filter((g) => g >= 0))];
  return sets.map((g) => `const diagonal${g} = sets[${g}].diagonal, weights${g} = sets[${g}].weights, overflow${g} = sets[${g}].overflow;\n`).join('');
}

/**
 * `own[s]`, when given, names a local already holding `vector[b + s]` (the
 * row's own value), saving its reload.
 */
export function rowProductCode(plan: RowProductPlan, vector: string, own?: readonly string[]): string {
  const W = plan.width;
  const active = plan.weightSet.map((g, s) => [g, s] as const).filter(([g]) => g >= 0);
  if (!active.length) return '';
  const sets = [...new Set(active.map(([g]) => g))];
  let code = `const rw = i * ${W};\n`;
  for (let k = 0; k < W; k++) code += `const j${k} = columns[rw${k ? ` + ${k}` : ''}];\n`;
  for (const g of sets) for (let k = 0; k < W; k++) code += `const w${g}_${k} = weights${g}[rw${k ? ` + ${k}` : ''}];\n`;
  for (const [g, s] of active) {
    const terms = [`diagonal${g}[i] * ${own ? own[s] : `${vector}[b + ${s}]`}`];
    for (let k = 0; k < W; k++) terms.push(`w${g}_${k} * ${vector}[j${k}${s ? ` + ${s}` : ''}]`);
    code += `let a${s} = ${terms.join(' + ')};\n`;
  }
  if (plan.hasOverflow) {
    code += 'for (let k = overflowOffsets[i], e = overflowOffsets[i + 1]; k < e; k++) {\nconst j = overflowColumns[k];\n';
    for (const g of sets) code += `const v${g} = overflow${g}[k];\n`;
    for (const [g, s] of active) code += `a${s} += v${g} * ${vector}[j${s ? ` + ${s}` : ''}];\n`;
    code += '}\n';
  }
  return code;
}
