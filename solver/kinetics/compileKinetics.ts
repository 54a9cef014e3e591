import type { MathNode } from 'mathjs';
import { FormulaError } from './FormulaError.ts';
import { parseFormula, FORMULA_CONSTANTS, FORMULA_FUNCTIONS, formulaSymbols, forEachFormulaNode } from './parseFormula.ts';
import { formulaToCode } from './formulaToCode.ts';
import { forwardDerivativeCode } from './jacobianCode.ts';

/** Coordinates and time a rate or field formula may use. */
export const COORDINATE_NAMES = ['x', 'y', 'z', 't'] as const;

const NAME = /^[A-Za-z][A-Za-z0-9_]*$/;

/** Why a species or parameter name cannot be used, or undefined if it can. */
export function nameProblem(name: string): string | undefined {
  if (!NAME.test(name)) return `"${name}" is not a valid name: use a letter followed by letters, digits or _`;
  if (name in Object.prototype) return `"${name}" is reserved (a property every JavaScript object has): choose another name`;
  if ((COORDINATE_NAMES as readonly string[]).includes(name)) return `"${name}" is reserved for the coordinates and time (x, y, z, t)`;
  if (Object.hasOwn(FORMULA_CONSTANTS, name)) return `"${name}" is reserved for a constant (pi, e)`;
  if (Object.hasOwn(FORMULA_FUNCTIONS, name)) return `"${name}" is the name of a function`;
  return undefined;
}

/** One problem per offending formula or name, keyed like the scenario: `reactions.u`. */
export class KineticsError extends Error {
  readonly problems: { key: string; message: string }[];
  constructor(problems: { key: string; message: string }[]) {
    super(problems.map((p) => `${p.key}: ${p.message}`).join('\n'));
    this.name = 'KineticsError';
    this.problems = problems;
  }
}

/**
 * Kinetics compiled from formulas. The rate trees are stored with placeholder
 * names (species `s0…`, parameters `p0…`, coordinates `cx cy cz ct`), so code
 * generation never sees a user's text and mathjs never mistakes a user's name
 * for one of its own constants.
 */
export interface CompiledKinetics {
  readonly species: readonly string[];
  readonly parameters: readonly string[];
  /** rate trees in placeholder names, one per species */
  readonly rates: readonly MathNode[];
  /** which of x, y, z, t the rates use */
  readonly uses: Readonly<Record<(typeof COORDINATE_NAMES)[number], boolean>>;
  /** JavaScript expressions of the rates, given the kernel's variable for each placeholder */
  rateCode(names: Readonly<Record<string, string>>): string[];
  /**
   * Evaluate the rates at one point: `values` in species order, `params` in
   * parameter order. A compiled scalar function, for checks and analysis (the
   * time-stepping kernels inline the rates instead).
   */
  evaluate(values: ArrayLike<number>, params: ArrayLike<number>, out: Float64Array, x?: number, y?: number, z?: number, t?: number): Float64Array;
  /** ∂f_i/∂u_j at a point, row-major nS×nS (forward-mode automatic differentiation, compiled once) */
  jacobian(values: ArrayLike<number>, params: ArrayLike<number>, out?: Float64Array, x?: number, y?: number, z?: number, t?: number): Float64Array;
}

export const speciesPlaceholder = (i: number) => `s${i}`;
export const parameterPlaceholder = (i: number) => `p${i}`;
const COORDINATE_PLACEHOLDERS: Record<string, string> = { x: 'cx', y: 'cy', z: 'cz', t: 'ct' };

/** Replace user names by placeholders in a freshly parsed tree (in place; a call's function name stays). */
function renameSymbols(node: MathNode, rename: ReadonlyMap<string, string>): MathNode {
  forEachFormulaNode(node, (n) => {
    if (n.type !== 'SymbolNode') return;
    const symbol = n as unknown as { name: string };
    const to = rename.get(symbol.name);
    if (to) symbol.name = to;
  });
  return node;
}

/** Every local name the generic evaluators use, mapped from the placeholders. */
function scalarNames(nS: number, nP: number): Record<string, string> {
  const names: Record<string, string> = { cx: 'x', cy: 'y', cz: 'z', ct: 't' };
  for (let i = 0; i < nS; i++) names[speciesPlaceholder(i)] = `s${i}`;
  for (let i = 0; i < nP; i++) names[parameterPlaceholder(i)] = `p${i}`;
  return names;
}

function prologue(nS: number, nP: number): string {
  let code = '';
  for (let i = 0; i < nS; i++) code += `const s${i} = u[${i}];\n`;
  for (let i = 0; i < nP; i++) code += `const p${i} = q[${i}];\n`;
  return code;
}

/**
 * Parse, check and compile a set of rate formulas. Every problem (bad names,
 * unknown symbols, unsafe constructs, parse errors) is collected and thrown
 * together as a KineticsError.
 */
export function compileKinetics(species: readonly string[], reactions: Readonly<Record<string, string>>, parameters: readonly string[]): CompiledKinetics {
  const problems: { key: string; message: string }[] = [];
  if (species.length === 0) problems.push({ key: 'species', message: 'list at least one species' });
  const seen = new Set<string>();
  for (const [kind, list] of [['species', species], ['parameters', parameters]] as const) {
    for (const name of list) {
      const why = nameProblem(name);
      if (why) problems.push({ key: `${kind}.${name}`, message: why });
      else if (seen.has(name)) problems.push({ key: `${kind}.${name}`, message: `"${name}" is used twice (species and parameter names must all differ)` });
      seen.add(name);
    }
  }
  for (const key of Object.keys(reactions)) {
    if (!species.includes(key)) problems.push({ key: `reactions.${key}`, message: `"${key}" is not one of the species (${species.join(', ')})` });
  }
  const symbols = new Set<string>([...species, ...parameters, ...COORDINATE_NAMES]);
  const rename = new Map<string, string>();
  species.forEach((s, i) => rename.set(s, speciesPlaceholder(i)));
  parameters.forEach((p, i) => rename.set(p, parameterPlaceholder(i)));
  for (const [k, v] of Object.entries(COORDINATE_PLACEHOLDERS)) rename.set(k, v);
  const rates: MathNode[] = [];
  const used = new Set<string>();
  for (const s of species) {
    const text = reactions[s];
    if (text === undefined) {
      problems.push({ key: `reactions.${s}`, message: `no rate given for species "${s}" (write "0" for a species that only diffuses)` });
      continue;
    }
    try {
      const tree = parseFormula(String(text), symbols);
      for (const name of formulaSymbols(tree)) used.add(name);
      rates.push(renameSymbols(tree, rename));
    } catch (e) {
      if (!(e instanceof FormulaError)) throw e;
      problems.push({ key: `reactions.${s}`, message: e.message });
    }
  }
  if (problems.length) throw new KineticsError(problems);
  const nS = species.length, nP = parameters.length;
  const names = scalarNames(nS, nP);
  const rateBody = rates.map((r, i) => `out[${i}] = ${formulaToCode(r, names)};`).join('\n');
  // The body is generated from validated trees only: numbers, our own local names, operators and Math.*.
  const evaluateFn = new Function('u', 'q', 'out', 'x', 'y', 'z', 't', `"use strict";\n${prologue(nS, nP)}${rateBody}\nreturn out;`) as CompiledKinetics['evaluate'];
  let jacobianFn: CompiledKinetics['jacobian'] | undefined;
  const kinetics: CompiledKinetics = {
    species: [...species],
    parameters: [...parameters],
    rates,
    uses: { x: used.has('x'), y: used.has('y'), z: used.has('z'), t: used.has('t') },
    rateCode: (map) => rates.map((r) => formulaToCode(r, map)),
    evaluate: (values, params, out, x = 0, y = 0, z = 0, t = 0) => evaluateFn(values, params, out, x, y, z, t),
    jacobian: (values, params, out = new Float64Array(nS * nS), x = 0, y = 0, z = 0, t = 0) => {
      if (!jacobianFn) jacobianFn = compileJacobian(kinetics);
      return jacobianFn(values, params, out, x, y, z, t);
    },
  };
  return kinetics;
}

/**
 * ∂f_i/∂u_j by forward-mode automatic differentiation of the rate trees
 * (`forwardDerivativeCode`: cost linear in the formula), compiled to one scalar function.
 */
function compileJacobian(k: CompiledKinetics): CompiledKinetics['jacobian'] {
  const nS = k.species.length, nP = k.parameters.length;
  const names = scalarNames(nS, nP);
  const wrt = k.species.map((_, j) => speciesPlaceholder(j));
  let body = '';
  k.rates.forEach((rate, i) => {
    const d = forwardDerivativeCode(rate, names, wrt, `d${i}_`);
    body += `${d.code}\n`;
    d.partials.forEach((p, j) => (body += `out[${i * nS + j}] = ${p ?? 0};\n`));
  });
  return new Function('u', 'q', 'out', 'x', 'y', 'z', 't', `"use strict";\n${prologue(nS, nP)}${body}return out;`) as CompiledKinetics['jacobian'];
}
