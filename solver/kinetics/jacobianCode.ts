import type { MathNode } from 'mathjs';
import { FORMULA_CONSTANTS, chainGroup } from './parseFormula.ts';

/** A node's value and its partial derivatives: JavaScript expressions (a local name or a literal), null for an exact zero. */
interface Dual {
  value: string;
  partials: (string | null)[];
}

/**
 * Straight-line JavaScript that computes a formula and its partial
 * derivatives with respect to the variables `wrt` (placeholder names) by
 * forward-mode automatic differentiation over the checked tree: one local per
 * node and one per partial that is not identically zero. Its length grows
 * linearly with the formula's — symbolic differentiation followed by
 * simplification can grow exponentially (a sum of many equal terms, a long
 * product) — and its values agree with the symbolic derivatives to rounding.
 * Names are mapped through `names` (placeholder → local variable) as in
 * `formulaToCode`; no text of the user's formula reaches the code.
 */
export function forwardDerivativeCode(node: MathNode, names: Readonly<Record<string, string>>, wrt: readonly string[], prefix: string): { code: string; value: string; partials: (string | null)[] } {
  const lines: string[] = [];
  let count = 0;
  const local = (expression: string): string => {
    const name = `${prefix}${count++}`;
    lines.push(`const ${name} = ${expression};`);
    return name;
  };
  const zeros = (): (string | null)[] => wrt.map(() => null);
  /** d = f·a_j for every non-zero a_j, with the factor computed once, and only if needed */
  const chain = (partials: (string | null)[], factor: () => string): (string | null)[] => {
    let f: string | undefined;
    return partials.map((p) => (p === null ? null : local(`${(f ??= local(factor()))} * ${p}`)));
  };
  const visit = (node: MathNode): Dual => {
    const n = node as MathNode & Record<string, unknown>;
    switch (node.type) {
      case 'ConstantNode': {
        const v = n.value as number;
        if (typeof v !== 'number' || !Number.isFinite(v)) throw new Error('forwardDerivativeCode: non-numeric constant');
        return { value: v < 0 ? `(${v})` : String(v), partials: zeros() };
      }
      case 'SymbolNode': {
        const name = n.name as string;
        if (Object.prototype.hasOwnProperty.call(names, name)) return { value: names[name], partials: wrt.map((w) => (w === name ? '1' : null)) };
        if (Object.prototype.hasOwnProperty.call(FORMULA_CONSTANTS, name)) return { value: String(FORMULA_CONSTANTS[name]), partials: zeros() };
        throw new Error(`forwardDerivativeCode: no variable for "${name}"`);
      }
      case 'ParenthesisNode':
        return visit(n.content as MathNode);
      case 'OperatorNode': {
        const group = chainGroup(node);
        if (group !== undefined) {
          // a left-deep chain a + b − c …: one loop over its links, not one recursion per term
          const links: { op: string; right: MathNode }[] = [];
          let left: MathNode = node;
          while (chainGroup(left) === group) {
            const l = left as unknown as { fn: string; args: MathNode[] };
            links.push({ op: l.fn, right: l.args[1] });
            left = l.args[0];
          }
          let acc = visit(left);
          for (let k = links.length - 1; k >= 0; k--) acc = operator(links[k].op, [acc, visit(links[k].right)]);
          return acc;
        }
        return operator(n.fn as string, (n.args as MathNode[]).map(visit));
      }
      case 'FunctionNode': {
        const name = (n.fn as unknown as { name: string }).name;
        return fn(name, (n.args as MathNode[]).map(visit));
      }
    }
    throw new Error(`forwardDerivativeCode: ${node.type}`);
  };
  const operator = (op: string, args: Dual[]): Dual => {
    const [a, b] = args;
    switch (op) {
      case 'unaryPlus':
        return a;
      case 'unaryMinus':
        return { value: local(`-${a.value}`), partials: a.partials.map((p) => (p === null ? null : local(`-${p}`))) };
      case 'add':
      case 'subtract': {
        const sign = op === 'add' ? '+' : '-';
        return {
          value: local(`${a.value} ${sign} ${b.value}`),
          partials: wrt.map((_, j) => {
            const pa = a.partials[j], pb = b.partials[j];
            if (pb === null) return pa;
            if (pa === null) return op === 'add' ? pb : local(`-${pb}`);
            return local(`${pa} ${sign} ${pb}`);
          }),
        };
      }
      case 'multiply':
        return {
          value: local(`${a.value} * ${b.value}`),
          partials: wrt.map((_, j) => {
            const pa = a.partials[j], pb = b.partials[j];
            const left = pa === null ? null : pa === '1' ? b.value : `${pa} * ${b.value}`;
            const right = pb === null ? null : pb === '1' ? a.value : `${a.value} * ${pb}`;
            if (left === null && right === null) return null;
            return local(left === null ? right! : right === null ? left : `${left} + ${right}`);
          }),
        };
      case 'divide': {
        const value = local(`${a.value} / ${b.value}`);
        // (a/b)' = (a' − (a/b)·b')/b
        return {
          value,
          partials: wrt.map((_, j) => {
            const pa = a.partials[j], pb = b.partials[j];
            if (pa === null && pb === null) return null;
            if (pb === null) return local(`${pa} / ${b.value}`);
            return local(`(${pa ?? 0} - ${value} * ${pb}) / ${b.value}`);
          }),
        };
      }
      case 'pow':
        return power(a, b);
    }
    throw new Error(`forwardDerivativeCode: operator ${op}`);
  };
  const power = (a: Dual, b: Dual): Dual => {
    const value = local(`Math.pow(${a.value}, ${b.value})`);
    if (b.partials.every((p) => p === null)) {
      // (a^c)' = c·a^(c−1)·a'
      return { value, partials: chain(a.partials, () => `${b.value} * Math.pow(${a.value}, ${b.value} - 1)`) };
    }
    // (a^b)' = a^b·(b'·ln a + b·a'/a)
    return {
      value,
      partials: wrt.map((_, j) => {
        const pa = a.partials[j], pb = b.partials[j];
        if (pa === null && pb === null) return null;
        const terms = [pb === null ? '' : `${pb} * Math.log(${a.value})`, pa === null ? '' : `${b.value} * ${pa} / ${a.value}`].filter(Boolean).join(' + ');
        return local(`${value} * (${terms})`);
      }),
    };
  };
  const fn = (name: string, args: Dual[]): Dual => {
    const [a, b] = args;
    const unary = (value: string, factor: () => string): Dual => {
      const v = local(value);
      return { value: v, partials: chain(a.partials, factor) };
    };
    switch (name) {
      case 'exp': {
        const v = local(`Math.exp(${a.value})`);
        return { value: v, partials: chain(a.partials, () => v) };
      }
      case 'log': return unary(`Math.log(${a.value})`, () => `1 / ${a.value}`);
      case 'sqrt': {
        const v = local(`Math.sqrt(${a.value})`);
        return { value: v, partials: chain(a.partials, () => `0.5 / ${v}`) };
      }
      case 'abs': return unary(`Math.abs(${a.value})`, () => `Math.sign(${a.value})`);
      case 'sin': return unary(`Math.sin(${a.value})`, () => `Math.cos(${a.value})`);
      case 'cos': return unary(`Math.cos(${a.value})`, () => `-Math.sin(${a.value})`);
      case 'tan': return unary(`Math.tan(${a.value})`, () => `1 / (Math.cos(${a.value}) * Math.cos(${a.value}))`);
      case 'sinh': return unary(`Math.sinh(${a.value})`, () => `Math.cosh(${a.value})`);
      case 'cosh': return unary(`Math.cosh(${a.value})`, () => `Math.sinh(${a.value})`);
      case 'tanh': {
        const v = local(`Math.tanh(${a.value})`);
        return { value: v, partials: chain(a.partials, () => `1 - ${v} * ${v}`) };
      }
      case 'atan': return unary(`Math.atan(${a.value})`, () => `1 / (1 + ${a.value} * ${a.value})`);
      case 'atan2': {
        // atan2(y, x)' = (x·y' − y·x')/(x² + y²)
        const value = local(`Math.atan2(${a.value}, ${b.value})`);
        let d: string | undefined;
        return {
          value,
          partials: wrt.map((_, j) => {
            const py = a.partials[j], px = b.partials[j];
            if (py === null && px === null) return null;
            d ??= local(`${b.value} * ${b.value} + ${a.value} * ${a.value}`);
            return local(`(${py === null ? 0 : `${b.value} * ${py}`} - ${px === null ? 0 : `${a.value} * ${px}`}) / ${d}`);
          }),
        };
      }
      case 'min':
      case 'max': {
        // the derivative of the branch taken (ties: the first argument's)
        const test = local(`${a.value} ${name === 'min' ? '<=' : '>='} ${b.value}`);
        return {
          value: local(`${test} ? ${a.value} : ${b.value}`),
          partials: wrt.map((_, j) => {
            const pa = a.partials[j], pb = b.partials[j];
            return pa === null && pb === null ? null : local(`${test} ? ${pa ?? 0} : ${pb ?? 0}`);
          }),
        };
      }
      case 'pow':
        return power(a, b);
    }
    throw new Error(`forwardDerivativeCode: function ${name}`);
  };
  const root = visit(node);
  return { code: lines.join('\n'), value: root.value, partials: root.partials };
}
