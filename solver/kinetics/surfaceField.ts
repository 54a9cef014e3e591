import type { Mesh } from '../mesh/Mesh.ts';
import { parseFormula, formulaSymbols } from './parseFormula.ts';
import { formulaToCode } from './formulaToCode.ts';

/**
 * A formula in the surface coordinates x, y, z and named constants (model
 * parameters), evaluated at every vertex. Returns a number when the formula
 * does not depend on position, so constant coefficients stay on the fast path.
 * Throws FormulaError for anything `parseFormula` refuses.
 */
export function evaluateSurfaceFormula(text: string, mesh: Mesh, constants: Readonly<Record<string, number>>): number | Float64Array {
  const names = Object.keys(constants);
  const tree = parseFormula(text, new Set(['x', 'y', 'z', ...names]));
  const used = formulaSymbols(tree);
  const map: Record<string, string> = { x: 'x', y: 'y', z: 'z' };
  names.forEach((n, i) => (map[n] = `q[${i}]`));
  const values = names.map((n) => constants[n]);
  // generated from the validated tree with our own names (see formulaToCode)
  const f = new Function('x', 'y', 'z', 'q', `"use strict"; return ${formulaToCode(tree, map)};`) as (x: number, y: number, z: number, q: number[]) => number;
  if (!used.has('x') && !used.has('y') && !used.has('z')) return f(0, 0, 0, values);
  const p = mesh.positions;
  const n = p.length / 3;
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = f(p[3 * i], p[3 * i + 1], p[3 * i + 2], values);
  return out;
}

/**
 * A formula in x, y, z, t and named constants, compiled to a function (a
 * growth speed, say). Throws FormulaError for anything `parseFormula` refuses.
 */
export function compileSpaceTimeFormula(text: string, constants: Readonly<Record<string, number>>): (x: number, y: number, z: number, t: number) => number {
  const names = Object.keys(constants);
  const tree = parseFormula(text, new Set(['x', 'y', 'z', 't', ...names]));
  const map: Record<string, string> = { x: 'x', y: 'y', z: 'z', t: 't' };
  names.forEach((n, i) => (map[n] = `q[${i}]`));
  const values = names.map((n) => constants[n]);
  // generated from the validated tree with our own names (see formulaToCode)
  const f = new Function('x', 'y', 'z', 't', 'q', `"use strict"; return ${formulaToCode(tree, map)};`) as (x: number, y: number, z: number, t: number, q: number[]) => number;
  return (x, y, z, t) => f(x, y, z, t, values);
}
