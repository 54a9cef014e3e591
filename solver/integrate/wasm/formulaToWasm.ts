import type { MathNode } from 'mathjs';
import { FORMULA_CONSTANTS, FORMULA_FUNCTIONS, chainGroup } from '../../kinetics/parseFormula.ts';
import { Op, type FunctionBuilder } from './WasmModule.ts';

/** Host functions a formula may call that WebAssembly has no instruction for: imported from Math, so results equal JavaScript's. */
export const MATH_IMPORTS = ['exp', 'log', 'sin', 'cos', 'tan', 'sinh', 'cosh', 'tanh', 'atan', 'atan2', 'pow'] as const;
export type MathImport = (typeof MATH_IMPORTS)[number];

const CHAIN_OPS: Readonly<Record<string, number>> = { add: Op.f64Add, subtract: Op.f64Sub, multiply: Op.f64Mul, divide: Op.f64Div };

/**
 * Emit a formula tree accepted by `parseFormula` as WebAssembly instructions
 * that leave its value on the stack: the same operations in the same order as
 * `formulaToCode`'s JavaScript (left-deep chains left to right, small whole
 * powers of a name as products, Math functions for the rest), so the two give
 * bit-identical results. `locals` maps the tree's names to f64 locals;
 * `imports` gives the function index of each Math import.
 */
export function emitFormula(f: FunctionBuilder, node: MathNode, locals: Readonly<Record<string, number>>, imports: Readonly<Record<MathImport, number>>): void {
  const n = node as MathNode & Record<string, unknown>;
  switch (node.type) {
    case 'ConstantNode': {
      const v = n.value as number;
      if (typeof v !== 'number' || !Number.isFinite(v)) throw new Error('emitFormula: non-numeric constant');
      f.f64(v);
      return;
    }
    case 'SymbolNode': {
      const name = n.name as string;
      if (Object.hasOwn(locals, name)) f.get(locals[name]);
      else if (Object.hasOwn(FORMULA_CONSTANTS, name)) f.f64(FORMULA_CONSTANTS[name]);
      else throw new Error(`emitFormula: no local for "${name}"`);
      return;
    }
    case 'ParenthesisNode':
      emitFormula(f, n.content as MathNode, locals, imports);
      return;
    case 'OperatorNode': {
      const group = chainGroup(node);
      if (group !== undefined) {
        const links: { fn: string; right: MathNode }[] = [];
        let left: MathNode = node;
        while (chainGroup(left) === group) {
          const l = left as unknown as { fn: string; args: MathNode[] };
          links.push({ fn: l.fn, right: l.args[1] });
          left = l.args[0];
        }
        emitFormula(f, left, locals, imports);
        for (let k = links.length - 1; k >= 0; k--) {
          emitFormula(f, links[k].right, locals, imports);
          f.op(CHAIN_OPS[links[k].fn]);
        }
        return;
      }
      const args = n.args as MathNode[];
      switch (n.fn as string) {
        case 'unaryMinus':
          emitFormula(f, args[0], locals, imports);
          f.op(Op.f64Neg);
          return;
        case 'unaryPlus':
          emitFormula(f, args[0], locals, imports);
          return;
        case 'pow': {
          const [base, exponent] = args;
          const ev = exponent.type === 'ConstantNode' ? (exponent as unknown as { value: number }).value : NaN;
          if (base.type === 'SymbolNode' && Number.isInteger(ev) && ev >= 1 && ev <= 4) {
            // as formulaToCode: a small whole power of a name is a product, left to right
            emitFormula(f, base, locals, imports);
            for (let k = 1; k < ev; k++) {
              emitFormula(f, base, locals, imports);
              f.op(Op.f64Mul);
            }
            return;
          }
          emitFormula(f, base, locals, imports);
          emitFormula(f, exponent, locals, imports);
          f.call(imports.pow);
          return;
        }
      }
      throw new Error(`emitFormula: operator ${n.fn as string}`);
    }
    case 'FunctionNode': {
      const name = (n.fn as unknown as { name: string }).name;
      if (!Object.hasOwn(FORMULA_FUNCTIONS, name)) throw new Error(`emitFormula: function ${name}`);
      for (const a of n.args as MathNode[]) emitFormula(f, a, locals, imports);
      switch (name) {
        case 'sqrt': f.op(Op.f64Sqrt); return;
        case 'abs': f.op(Op.f64Abs); return;
        case 'min': f.op(Op.f64Min); return;
        case 'max': f.op(Op.f64Max); return;
        default: f.call(imports[name as MathImport]); return;
      }
    }
  }
  throw new Error(`emitFormula: ${node.type}`);
}
