import { parse, type MathNode } from 'mathjs';
import { FormulaError } from './FormulaError.ts';

/**
 * Math functions a formula may call, with their argument counts. Each maps to
 * a `Math.*` function in the generated kernels; nothing else can be called.
 */
export const FORMULA_FUNCTIONS: Readonly<Record<string, { arity: number; js: string }>> = {
  exp: { arity: 1, js: 'Math.exp' },
  log: { arity: 1, js: 'Math.log' },
  sqrt: { arity: 1, js: 'Math.sqrt' },
  abs: { arity: 1, js: 'Math.abs' },
  sin: { arity: 1, js: 'Math.sin' },
  cos: { arity: 1, js: 'Math.cos' },
  tan: { arity: 1, js: 'Math.tan' },
  sinh: { arity: 1, js: 'Math.sinh' },
  cosh: { arity: 1, js: 'Math.cosh' },
  tanh: { arity: 1, js: 'Math.tanh' },
  atan: { arity: 1, js: 'Math.atan' },
  atan2: { arity: 2, js: 'Math.atan2' },
  min: { arity: 2, js: 'Math.min' },
  max: { arity: 2, js: 'Math.max' },
  pow: { arity: 2, js: 'Math.pow' },
};

/** Named constants a formula may use. */
export const FORMULA_CONSTANTS: Readonly<Record<string, number>> = { pi: Math.PI, e: Math.E };

const OPERATORS = new Set(['add', 'subtract', 'multiply', 'divide', 'pow', 'unaryMinus', 'unaryPlus']);

/** 1-based column of the first whole-word occurrence of `word`, if any. */
function columnOf(text: string, word: string): number | undefined {
  const escaped = word.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
  const m = new RegExp(`(^|[^A-Za-z0-9_])(${escaped})(?![A-Za-z0-9_])`).exec(text);
  if (m) return m.index + m[1].length + 1;
  const i = text.indexOf(word);
  return i >= 0 ? i + 1 : undefined;
}

function describeAllowed(symbols: ReadonlySet<string>): string {
  const names = [...symbols].sort();
  return names.length ? names.join(', ') : '(none)';
}

/**
 * Parse a formula with mathjs and accept only arithmetic (+ − × ÷ ^), numbers,
 * the given symbols, the constants pi and e, and the whitelisted functions.
 * Anything else — unknown names, assignments, property or index access,
 * strings, matrices, objects, conditionals — is rejected with the offending
 * part named. The returned tree is safe to translate into kernel code.
 */
export function parseFormula(text: string, symbols: ReadonlySet<string>): MathNode {
  if (typeof text !== 'string') throw new FormulaError(String(text), 'a formula must be text');
  if (text.trim() === '') throw new FormulaError(text, 'the formula is empty');
  let root: MathNode;
  try {
    root = parse(text);
  } catch (e) {
    const msg = (e as Error).message;
    const m = /\(char (\d+)\)/.exec(msg);
    throw new FormulaError(text, `cannot parse: ${msg.replace(/\s*\(char \d+\)/, '')}`, m ? Number(m[1]) + 1 : undefined);
  }
  const allowed = `allowed names: ${describeAllowed(symbols)}; constants pi, e; functions ${Object.keys(FORMULA_FUNCTIONS).join(', ')}`;
  const visit = (node: MathNode): void => {
    const n = node as MathNode & Record<string, unknown>;
    switch (node.type) {
      case 'ConstantNode': {
        const v = n.value;
        if (typeof v !== 'number' || !Number.isFinite(v)) {
          throw new FormulaError(text, `only numbers are allowed, not ${typeof v === 'string' ? 'text' : String(v)} "${node.toString()}"`, columnOf(text, node.toString()));
        }
        return;
      }
      case 'SymbolNode': {
        const name = n.name as string;
        if (symbols.has(name) || name in FORMULA_CONSTANTS) return;
        const hint = name in FORMULA_FUNCTIONS ? ` (${name} is a function: write ${name}(...))` : '';
        throw new FormulaError(text, `unknown name "${name}"${hint}; ${allowed}`, columnOf(text, name));
      }
      case 'ParenthesisNode':
        visit(n.content as MathNode);
        return;
      case 'OperatorNode': {
        const fn = n.fn as string;
        if (!OPERATORS.has(fn)) {
          throw new FormulaError(text, `operator "${n.op as string}" is not allowed (only + - * / ^)`, columnOf(text, n.op as string));
        }
        for (const a of n.args as MathNode[]) visit(a);
        return;
      }
      case 'FunctionNode': {
        const fnNode = n.fn as MathNode & { name?: string };
        const name = fnNode.type === 'SymbolNode' ? (fnNode.name as string) : undefined;
        const spec = name !== undefined ? FORMULA_FUNCTIONS[name] : undefined;
        if (!name || !spec || !Object.prototype.hasOwnProperty.call(FORMULA_FUNCTIONS, name)) {
          throw new FormulaError(text, `function "${name ?? node.toString()}" is not allowed; functions: ${Object.keys(FORMULA_FUNCTIONS).join(', ')}`, name ? columnOf(text, name) : undefined);
        }
        const args = n.args as MathNode[];
        if (args.length !== spec.arity) {
          throw new FormulaError(text, `${name} takes ${spec.arity} argument${spec.arity > 1 ? 's' : ''}, got ${args.length}`, columnOf(text, name));
        }
        for (const a of args) visit(a);
        return;
      }
      case 'AssignmentNode':
      case 'FunctionAssignmentNode':
        throw new FormulaError(text, 'assignments are not allowed: write an expression only', columnOf(text, '='));
      case 'AccessorNode':
      case 'IndexNode':
        throw new FormulaError(text, `property or index access "${node.toString()}" is not allowed`, columnOf(text, node.toString()));
      default:
        throw new FormulaError(text, `${node.type.replace(/Node$/, '').toLowerCase()} "${node.toString().replace(/\s+/g, ' ')}" is not allowed: only arithmetic on numbers, names and functions`);
    }
  };
  visit(root);
  return root;
}

/** The names a parsed formula uses (constants excluded). */
export function formulaSymbols(node: MathNode): Set<string> {
  const out = new Set<string>();
  node.traverse((n: MathNode, _path: string, parent: MathNode | null) => {
    if (n.type === 'SymbolNode') {
      const name = (n as unknown as { name: string }).name;
      const isCallee = parent?.type === 'FunctionNode' && (parent as unknown as { fn: MathNode }).fn === n;
      if (!isCallee && !(name in FORMULA_CONSTANTS)) out.add(name);
    }
  });
  return out;
}
