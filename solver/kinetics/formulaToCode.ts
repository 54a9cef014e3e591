import type { MathNode } from 'mathjs';
import { FORMULA_CONSTANTS, FORMULA_FUNCTIONS } from './parseFormula.ts';

/** Functions that appear only in symbolic derivatives of whitelisted ones. */
const DERIVATIVE_FUNCTIONS: Readonly<Record<string, string>> = {
  sech: '1 / Math.cosh',
  sec: '1 / Math.cos',
  sign: 'Math.sign',
};

/**
 * Translate a formula tree accepted by `parseFormula` into a JavaScript
 * expression. Names are replaced through `names` (formula symbol → the kernel's
 * local variable); numbers are re-printed from their values. No text of the
 * user's formula reaches the generated code, so the code can only do arithmetic.
 */
export function formulaToCode(node: MathNode, names: Readonly<Record<string, string>>): string {
  const n = node as MathNode & Record<string, unknown>;
  switch (node.type) {
    case 'ConstantNode': {
      const v = n.value as number;
      if (typeof v !== 'number' || !Number.isFinite(v)) throw new Error(`formulaToCode: non-numeric constant`);
      return v < 0 ? `(${v})` : String(v);
    }
    case 'SymbolNode': {
      const name = n.name as string;
      if (Object.prototype.hasOwnProperty.call(names, name)) return names[name];
      if (name in FORMULA_CONSTANTS) return String(FORMULA_CONSTANTS[name]);
      throw new Error(`formulaToCode: no variable for "${name}"`);
    }
    case 'ParenthesisNode':
      return formulaToCode(n.content as MathNode, names);
    case 'OperatorNode': {
      const args = (n.args as MathNode[]).map((a) => formulaToCode(a, names));
      switch (n.fn as string) {
        case 'add': return `(${args[0]} + ${args[1]})`;
        case 'subtract': return `(${args[0]} - ${args[1]})`;
        case 'multiply': return `(${args[0]} * ${args[1]})`;
        case 'divide': return `(${args[0]} / ${args[1]})`;
        case 'unaryMinus': return `(-${args[0]})`;
        case 'unaryPlus': return args[0];
        case 'pow': {
          const [base, exponent] = n.args as MathNode[];
          const ev = exponent.type === 'ConstantNode' ? ((exponent as unknown as { value: number }).value) : NaN;
          // small whole powers of a plain name become products (exact and fast)
          if (base.type === 'SymbolNode' && Number.isInteger(ev) && ev >= 1 && ev <= 4) {
            return `(${new Array(ev).fill(args[0]).join(' * ')})`;
          }
          return `Math.pow(${args[0]}, ${args[1]})`;
        }
      }
      throw new Error(`formulaToCode: operator ${n.fn as string}`);
    }
    case 'FunctionNode': {
      const name = (n.fn as unknown as { name: string }).name;
      const args = (n.args as MathNode[]).map((a) => formulaToCode(a, names)).join(', ');
      if (Object.prototype.hasOwnProperty.call(FORMULA_FUNCTIONS, name)) return `${FORMULA_FUNCTIONS[name].js}(${args})`;
      if (Object.prototype.hasOwnProperty.call(DERIVATIVE_FUNCTIONS, name)) return `(${DERIVATIVE_FUNCTIONS[name]}(${args}))`;
      throw new Error(`formulaToCode: function ${name}`);
    }
  }
  throw new Error(`formulaToCode: ${node.type}`);
}
