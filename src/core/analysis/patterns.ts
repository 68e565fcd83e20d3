/**
 * Known unstable forms and their stable rewrites (common practice), as tree patterns. `u` is any
 * sub-expression; sums match in either order.
 *
 * - softplus          log(1 + exp(u))              → max(u, 0) + log1p(exp(-abs(u)))
 * - log-sigmoid       log(1 / (1 + exp(-u)))       → -(max(-u, 0) + log1p(exp(-abs(u))))
 * - sigmoid           1 / (1 + exp(-u)), exp(u) / (1 + exp(u))
 *                                                  → (u >= 0 ? 1 : exp(u)) / (1 + exp(-abs(u)))
 * - two-term log-sum-exp (log-softmax's normaliser) log(exp(a) + exp(b)) → max(a, b) + log1p(exp(-abs(a - b)))
 * - tanh from exponentials (exp(u) - exp(-u)) / (exp(u) + exp(-u)) → tanh(u)
 * - log(1 + u)        → log1p(u)
 * - exp(u) - 1        → expm1(u)
 */
import type { MathNode } from 'mathjs';
import { math } from '../math';
import { args, fnName, isConstant, strip } from './tree';

export interface Match {
  rule: string;
  title: string;
  /** Template with placeholders __a, __b (our own constant text). */
  template: string;
  bind: Record<string, MathNode>;
}

type AnyNode = MathNode & Record<string, unknown>;

const isFn = (n: MathNode, name: string, arity = 1): boolean => fnName(n) === name && args(n).length === arity;

/** exp(u) → u; otherwise null. */
function expArg(n: MathNode): MathNode | null {
  const s = strip(n);
  return isFn(s, 'exp') ? (args(s)[0] as MathNode) : null;
}

/** 1 + t or t + 1 → t; otherwise null. */
function onePlus(n: MathNode): MathNode | null {
  const s = strip(n);
  if (fnName(s) !== 'add' || s.type !== 'OperatorNode') return null;
  const [a, b] = args(s) as [MathNode, MathNode];
  if (isConstant(a, 1)) return b;
  if (isConstant(b, 1)) return a;
  return null;
}

function negated(n: MathNode): MathNode | null {
  const s = strip(n);
  return fnName(s) === 'unaryMinus' ? (args(s)[0] as MathNode) : null;
}

function sameTree(a: MathNode, b: MathNode): boolean {
  return strip(a).toString() === strip(b).toString();
}

export function match(node: MathNode): Match | null {
  const n = strip(node);
  const name = fnName(n);
  if (name === 'log' && args(n).length === 1) {
    const inner = strip(args(n)[0] as MathNode);
    const t = onePlus(inner);
    if (t) {
      const u = expArg(t);
      if (u) return { rule: 'softplus', title: 'softplus without overflow: max(u, 0) + log1p(exp(−|u|))', template: 'max(__a, 0) + log1p(exp(-abs(__a)))', bind: { __a: u } };
    }
    // log(1 / (1 + exp(-u)))
    if (fnName(inner) === 'divide' && isConstant(args(inner)[0] as MathNode, 1)) {
      const t2 = onePlus(args(inner)[1] as MathNode);
      const e = t2 ? expArg(t2) : null;
      const u = e ? negated(e) : null;
      if (u) return { rule: 'log-sigmoid', title: 'log-sigmoid without overflow: −(max(−u, 0) + log1p(exp(−|u|)))', template: '-(max(-(__a), 0) + log1p(exp(-abs(__a))))', bind: { __a: u } };
    }
    // log(exp(a) + exp(b))
    if (fnName(inner) === 'add' && inner.type === 'OperatorNode') {
      const [l, r] = args(inner) as [MathNode, MathNode];
      const a = expArg(l);
      const b = expArg(r);
      if (a && b) return { rule: 'log-sum-exp', title: 'log-sum-exp shifted by the maximum (as in a stable log-softmax)', template: 'max(__a, __b) + log1p(exp(-abs(__a - __b)))', bind: { __a: a, __b: b } };
    }
    if (t) return { rule: 'log1p', title: 'log(1 + u) → log1p(u): accurate for small u', template: 'log1p(__a)', bind: { __a: t } };
  }
  if (name === 'divide' && n.type === 'OperatorNode') {
    const [num, den] = args(n) as [MathNode, MathNode];
    const t = onePlus(den);
    const e = t ? expArg(t) : null;
    if (e && isConstant(num, 1)) {
      const u = negated(e);
      if (u) return { rule: 'sigmoid', title: 'sigmoid via exp(−|u|): never overflows', template: '(__a >= 0 ? 1 : exp(__a)) / (1 + exp(-abs(__a)))', bind: { __a: u } };
    }
    const eNum = expArg(num);
    if (e && eNum && sameTree(e, eNum)) return { rule: 'sigmoid', title: 'sigmoid via exp(−|u|): never overflows', template: '(__a >= 0 ? 1 : exp(__a)) / (1 + exp(-abs(__a)))', bind: { __a: e } };
    // (exp(u) - exp(-u)) / (exp(u) + exp(-u))
    const sn = strip(num);
    const sd = strip(den);
    if (fnName(sn) === 'subtract' && fnName(sd) === 'add') {
      const [a1, a2] = args(sn) as [MathNode, MathNode];
      const [b1, b2] = args(sd) as [MathNode, MathNode];
      const u = expArg(a1);
      const mu = expArg(a2);
      if (u && mu && expArg(b1) && expArg(b2)) {
        const neg = negated(mu);
        if (neg && sameTree(neg, u) && sameTree(expArg(b1) as MathNode, u) && sameTree(expArg(b2) as MathNode, mu)) {
          return { rule: 'tanh', title: 'tanh from exponentials → tanh(u): no overflow, no inf/inf', template: 'tanh(__a)', bind: { __a: u } };
        }
      }
    }
  }
  if (name === 'subtract' && n.type === 'OperatorNode') {
    const [a, b] = args(n) as [MathNode, MathNode];
    const u = expArg(a);
    if (u && isConstant(b, 1)) return { rule: 'expm1', title: 'exp(u) − 1 → expm1(u): accurate for small u', template: 'expm1(__a)', bind: { __a: u } };
  }
  return null;
}

export function instantiate(m: Match): MathNode {
  return math.parse(m.template).transform((c) => {
    const nm = (c as AnyNode)['name'];
    if (c.type === 'SymbolNode' && typeof nm === 'string' && m.bind[nm]) return strip(m.bind[nm] as MathNode).cloneDeep();
    return c;
  });
}

/**
 * The tree with every known rewrite applied (repeatedly, innermost last): mathematically the same
 * function, evaluated more accurately in double. Used as the "exact" reference, so that a naive
 * form's own cancellation in double (log(1 + e^x) = 0 for x < −37) does not hide its breakdown.
 */
export function stableForm(node: MathNode): MathNode {
  let cur = node;
  for (let pass = 0; pass < 6; pass++) {
    let changed = false;
    const next = cur.transform((c) => {
      if (c.type === 'ParenthesisNode') return c;
      const m = match(c);
      if (!m) return c;
      changed = true;
      return instantiate(m);
    });
    if (!changed) return cur;
    cur = next;
  }
  return cur;
}

