import { parse, type MathNode } from 'mathjs';
import { FormulaError } from './FormulaError.ts';
import { FORMULA_MAX_LENGTH, FORMULA_MAX_NESTING } from '../defaults.ts';

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

/** The children of a formula node (a call's callee excluded). */
function children(node: MathNode): MathNode[] {
  const n = node as MathNode & { args?: MathNode[]; content?: MathNode };
  if (node.type === 'ParenthesisNode') return [n.content!];
  if (node.type === 'OperatorNode' || node.type === 'FunctionNode') return n.args ?? [];
  return [];
}

/** Operators evaluated left to right in a chain (a + b − c, a·b/c): a left-deep chain is one level. */
const CHAIN_GROUPS: Readonly<Record<string, string>> = { add: 'additive', subtract: 'additive', multiply: 'multiplicative', divide: 'multiplicative' };

/** The chain group of an operator node, or undefined. */
export function chainGroup(node: MathNode): string | undefined {
  const n = node as MathNode & { fn?: unknown; args?: MathNode[] };
  return node.type === 'OperatorNode' && typeof n.fn === 'string' && n.args?.length === 2 ? CHAIN_GROUPS[n.fn] : undefined;
}

/**
 * Visit every node of a formula tree (callees excluded) with its parent,
 * without recursion, so long sums and products cannot overflow the stack.
 */
export function forEachFormulaNode(root: MathNode, visit: (node: MathNode, parent: MathNode | null) => void): void {
  const stack: [MathNode, MathNode | null][] = [[root, null]];
  while (stack.length) {
    const [node, parent] = stack.pop()!;
    visit(node, parent);
    const kids = children(node);
    for (let i = kids.length - 1; i >= 0; i--) stack.push([kids[i], node]);
  }
}

/**
 * Nesting depth of a formula: operators, calls and parentheses inside one
 * another, a left-deep chain of + − or × ÷ counting once (however many terms).
 */
function nestingDepth(root: MathNode): number {
  let deepest = 0;
  const stack: [MathNode, number][] = [[root, 1]];
  while (stack.length) {
    const [node, depth] = stack.pop()!;
    deepest = Math.max(deepest, depth);
    const group = chainGroup(node);
    children(node).forEach((child, i) => stack.push([child, group !== undefined && i === 0 && chainGroup(child) === group ? depth : depth + 1]));
  }
  return deepest;
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
  if (text.length > FORMULA_MAX_LENGTH) throw new FormulaError(text, `too long: at most ${FORMULA_MAX_LENGTH} characters are accepted (give long expressions a parameter, or split them)`);
  // parentheses and calls nested deeper than the parser can follow are refused before parsing
  let open = 0, deepest = 0;
  for (let i = 0; i < text.length; i++) {
    if (text[i] === '(') deepest = Math.max(deepest, ++open);
    else if (text[i] === ')') open--;
  }
  if (deepest > FORMULA_MAX_NESTING) throw new FormulaError(text, `parentheses and calls are nested ${deepest} deep; at most ${FORMULA_MAX_NESTING} levels are accepted`);
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
        if (symbols.has(name) || Object.hasOwn(FORMULA_CONSTANTS, name)) return;
        const hint = Object.hasOwn(FORMULA_FUNCTIONS, name) ? ` (${name} is a function: write ${name}(...))` : '';
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
        // a chain (a + b + c …) is checked link by link, not by recursion
        let link: MathNode = node;
        const group = chainGroup(node);
        while (group !== undefined && chainGroup(link) === group) {
          const [left, right] = (link as unknown as { args: MathNode[] }).args;
          visit(right);
          link = left;
        }
        if (link !== node) visit(link);
        else for (const a of n.args as MathNode[]) visit(a);
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
  const depth = nestingDepth(root);
  if (depth > FORMULA_MAX_NESTING) throw new FormulaError(text, `the formula nests ${depth} levels deep; at most ${FORMULA_MAX_NESTING} are accepted`);
  visit(root);
  return root;
}

/** The names a parsed formula uses (constants excluded). */
export function formulaSymbols(node: MathNode): Set<string> {
  const out = new Set<string>();
  forEachFormulaNode(node, (n) => {
    if (n.type !== 'SymbolNode') return;
    const name = (n as unknown as { name: string }).name;
    if (!Object.prototype.hasOwnProperty.call(FORMULA_CONSTANTS, name)) out.add(name);
  });
  return out;
}
