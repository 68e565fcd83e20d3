/**
 * Structural helpers on canonical mathjs trees: where a piecewise function may switch branch,
 * which sub-expressions are operations, and a companion tree that is 1 exactly where the active
 * branch of an expression is structurally zero (f′ ≡ 0 — "dead", as opposed to merely tiny).
 */
import type { MathNode } from 'mathjs';
import { math } from '../math';

type AnyNode = MathNode & Record<string, unknown>;

export function strip(node: MathNode): MathNode {
  let n = node as AnyNode;
  while (n.type === 'ParenthesisNode') n = n['content'] as AnyNode;
  return n;
}

export function args(node: MathNode): MathNode[] {
  return ((node as AnyNode)['args'] as MathNode[] | undefined) ?? [];
}

export function fnName(node: MathNode): string | undefined {
  const n = node as AnyNode;
  if (n.type === 'OperatorNode') return n['fn'] as string;
  if (n.type === 'FunctionNode') return ((n['fn'] as AnyNode)['name'] as string | undefined) ?? undefined;
  return undefined;
}

export function isConstant(node: MathNode, value?: number): boolean {
  const n = strip(node) as AnyNode;
  if (n.type !== 'ConstantNode' || typeof n['value'] !== 'number') return false;
  return value === undefined || n['value'] === value;
}

const COMPARISONS = new Set(['smaller', 'smallerEq', 'larger', 'largerEq', 'equal', 'unequal']);

function sub(a: MathNode, b: MathNode): MathNode {
  return new math.OperatorNode('-', 'subtract', [a.cloneDeep(), b.cloneDeep()]);
}

/**
 * Expressions whose roots are the places where the formula may switch branch or bend: both sides of
 * every comparison (as lhs − rhs), arguments of abs and sign, pairwise differences of max/min
 * arguments, and denominators (poles). Only candidates: whether a root is a kink is decided
 * numerically.
 */
export function breakExpressions(node: MathNode): MathNode[] {
  const out: MathNode[] = [];
  const seen = new Set<string>();
  const add = (e: MathNode): void => {
    const key = e.toString();
    if (!seen.has(key)) {
      seen.add(key);
      out.push(e);
    }
  };
  node.traverse((child) => {
    const name = fnName(child);
    if (name === undefined) return;
    const a = args(child);
    if (child.type === 'OperatorNode' && COMPARISONS.has(name) && a.length === 2) add(sub(a[0] as MathNode, a[1] as MathNode));
    else if ((name === 'abs' || name === 'sign') && a.length === 1) add((a[0] as MathNode).cloneDeep());
    else if ((name === 'max' || name === 'min') && a.length >= 2) {
      for (let i = 0; i < a.length; i++) for (let j = i + 1; j < a.length; j++) add(sub(a[i] as MathNode, a[j] as MathNode));
    } else if (name === 'divide' && a.length === 2 && !isConstant(a[1] as MathNode)) add((a[1] as MathNode).cloneDeep());
  });
  return out;
}

/** Does the tree depend on `variable` at all? */
export function dependsOn(node: MathNode, variable: string): boolean {
  let found = false;
  node.traverse((c) => {
    if (c.type === 'SymbolNode' && (c as AnyNode)['name'] === variable) found = true;
  });
  return found;
}

/** Operation sub-trees (operators other than comparisons/logic, and function calls) that depend on the variable. */
export function operations(node: MathNode, variable: string, limit: number): MathNode[] {
  const out: MathNode[] = [];
  const seen = new Set<string>();
  node.traverse((c) => {
    if (out.length >= limit) return;
    const name = fnName(c);
    if (name === undefined) return;
    if (COMPARISONS.has(name) || name === 'and' || name === 'or' || name === 'not' || name === 'xor') return;
    if (name === 'unaryMinus' || name === 'unaryPlus' || name === 'abs' || name === 'max' || name === 'min' || name === 'sign') return;
    if (!dependsOn(c, variable)) return;
    const key = c.toString();
    if (seen.has(key)) return;
    seen.add(key);
    out.push(c);
  });
  return out;
}

const ZERO_PRESERVING = new Set([
  'abs', 'sign', 'sin', 'tan', 'sinh', 'tanh', 'asinh', 'atan', 'atanh', 'asin', 'erf', 'sqrt', 'cbrt', 'expm1', 'log1p',
]);

const ONE = (): MathNode => new math.ConstantNode(1);
const ZERO = (): MathNode => new math.ConstantNode(0);

function or(a: MathNode, b: MathNode): MathNode {
  if (isConstant(a, 1) || isConstant(b, 1)) return ONE();
  if (isConstant(a, 0)) return b;
  if (isConstant(b, 0)) return a;
  return new math.OperatorNode('or', 'or', [a, b]);
}

function and(a: MathNode, b: MathNode): MathNode {
  if (isConstant(a, 0) || isConstant(b, 0)) return ZERO();
  if (isConstant(a, 1)) return b;
  if (isConstant(b, 1)) return a;
  return new math.OperatorNode('and', 'and', [a, b]);
}

/**
 * A tree Z with Z(x) = 1 where the branch of `node` active at x is structurally zero (a literal 0,
 * a product with such a factor, a sum of such terms, a parameter bound to 0…) and 0 elsewhere.
 * Conditions are kept as they are, so Z follows the same branches. Structural, not numerical: an
 * expression that underflows to 0 (σ′ far out) is not zero here.
 */
export function zeroIndicator(node: MathNode, params: Record<string, number>): MathNode {
  const n = node as AnyNode;
  switch (n.type) {
    case 'ParenthesisNode':
      return zeroIndicator(n['content'] as MathNode, params);
    case 'ConstantNode':
      return n['value'] === 0 ? ONE() : ZERO();
    case 'SymbolNode':
      return params[n['name'] as string] === 0 ? ONE() : ZERO();
    case 'ConditionalNode': {
      const a = zeroIndicator(n['trueExpr'] as MathNode, params);
      const b = zeroIndicator(n['falseExpr'] as MathNode, params);
      if (isConstant(a, 0) && isConstant(b, 0)) return ZERO();
      if (isConstant(a, 1) && isConstant(b, 1)) return ONE();
      return new math.ConditionalNode((n['condition'] as MathNode).cloneDeep(), a, b);
    }
    case 'OperatorNode': {
      const name = n['fn'] as string;
      const a = args(node);
      if ((name === 'unaryMinus' || name === 'unaryPlus') && a.length === 1) return zeroIndicator(a[0] as MathNode, params);
      if (a.length !== 2) return ZERO();
      const [l, r] = a as [MathNode, MathNode];
      if (name === 'multiply' || name === 'dotMultiply') return or(zeroIndicator(l, params), zeroIndicator(r, params));
      if (name === 'divide' || name === 'dotDivide') return zeroIndicator(l, params);
      if (name === 'add' || name === 'subtract') return and(zeroIndicator(l, params), zeroIndicator(r, params));
      if (name === 'pow' && isConstant(r) && ((strip(r) as AnyNode)['value'] as number) > 0) return zeroIndicator(l, params);
      return ZERO();
    }
    case 'FunctionNode': {
      const name = fnName(node) ?? '';
      const a = args(node);
      if (ZERO_PRESERVING.has(name) && a.length === 1) return zeroIndicator(a[0] as MathNode, params);
      if ((name === 'max' || name === 'min') && a.length >= 1) {
        // zero where the argument it picks is zero: max(a, b) = a >= b ? a : b, folded left.
        let chosen = a[0] as MathNode;
        let z = zeroIndicator(chosen, params);
        for (const next of a.slice(1)) {
          const zn = zeroIndicator(next, params);
          const op = name === 'max' ? ['>=', 'largerEq'] : ['<=', 'smallerEq'];
          const cond = new math.OperatorNode(op[0] as '>=', op[1] as 'largerEq', [chosen.cloneDeep(), next.cloneDeep()]);
          z = isConstant(z, 0) && isConstant(zn, 0) ? ZERO() : new math.ConditionalNode(cond, z, zn);
          chosen = new math.FunctionNode(name, [chosen.cloneDeep(), next.cloneDeep()]);
        }
        return z;
      }
      return ZERO();
    }
    default:
      return ZERO();
  }
}

/** Replaces every symbol `name` in `node` by a copy of `by`. */
export function substitute(node: MathNode, name: string, by: MathNode): MathNode {
  return node.transform((c) => (c.type === 'SymbolNode' && (c as AnyNode)['name'] === name ? new math.ParenthesisNode(by.cloneDeep()) : c));
}
