import type { MathNode } from 'mathjs';
import { FORMULA_CONSTANTS, FORMULA_FUNCTIONS, chainGroup } from './parseFormula.ts';

const CHAIN_SYMBOLS: Readonly<Record<string, string>> = { add: '+', subtract: '-', multiply: '*', divide: '/' };

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
      if (Object.hasOwn(FORMULA_CONSTANTS, name)) return String(FORMULA_CONSTANTS[name]);
      throw new Error(`formulaToCode: no variable for "${name}"`);
    }
    case 'ParenthesisNode':
      return formulaToCode(n.content as MathNode, names);
    case 'OperatorNode': {
      const group = chainGroup(node);
      if (group !== undefined) {
        // a left-deep chain a + b − c … is written flat, one loop instead of one recursion per term;
        // JavaScript evaluates it left to right, exactly as the tree
        const links: { op: string; right: MathNode }[] = [];
        let left: MathNode = node;
        while (chainGroup(left) === group) {
          const l = left as unknown as { fn: string; args: MathNode[] };
          links.push({ op: CHAIN_SYMBOLS[l.fn], right: l.args[1] });
          left = l.args[0];
        }
        let code = formulaToCode(left, names);
        for (let k = links.length - 1; k >= 0; k--) code += ` ${links[k].op} ${formulaToCode(links[k].right, names)}`;
        return `(${code})`;
      }
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
      throw new Error(`formulaToCode: function ${name}`);
    }
  }
  throw new Error(`formulaToCode: ${node.type}`);
}
