/**
 * Named sub-expressions the engine keeps as units while differentiating, simplifying and displaying:
 * `sigmoid(u)` for 1/(1 + e^(−u)) (and e^u/(1 + e^u)), `softplus(u)` for log(1 + e^u). They exist only
 * inside the engine: `unmark` turns them back into stock mathjs before anything leaves it.
 */
import type { MathNode } from 'mathjs';
import { add, args, children, div, fn, fnName, isFn, isNum, isOpNode, key, mul, neg, num, numValue, rebuild } from './nodes';

export const MARKERS = new Set(['sigmoid', 'softplus']);

/** u when n is e^(−u) (exp(-u), exp(c·v) with c < 0), else null. */
function negExpArg(n: MathNode): MathNode | null {
  if (!isFn(n, 'exp')) return null;
  const a = args(n)[0] as MathNode;
  if (isOpNode(a, 'unaryMinus')) return args(a)[0] as MathNode;
  if (isOpNode(a, 'multiply') && isNum(args(a)[0] as MathNode) && numValue(args(a)[0] as MathNode) < 0) {
    return mul(num(-numValue(args(a)[0] as MathNode)), args(a)[1] as MathNode);
  }
  if (isNum(a)) return num(-numValue(a));
  return null;
}

/** u when n is 1 + e^(−u) or e^(−u) + 1. */
function onePlusNegExp(n: MathNode): MathNode | null {
  if (!isOpNode(n, 'add')) return null;
  const [a, b] = args(n) as [MathNode, MathNode];
  if (isNum(a, 1)) return negExpArg(b);
  if (isNum(b, 1)) return negExpArg(a);
  return null;
}

/** u when n is 1 + e^u or e^u + 1. */
function onePlusExp(n: MathNode): MathNode | null {
  if (!isOpNode(n, 'add')) return null;
  const [a, b] = args(n) as [MathNode, MathNode];
  if (isNum(a, 1) && isFn(b, 'exp')) return args(b)[0] as MathNode;
  if (isNum(b, 1) && isFn(a, 'exp')) return args(a)[0] as MathNode;
  return null;
}

function same(a: MathNode, b: MathNode): boolean {
  return key(a) === key(b);
}

/** Folds recognisable patterns into markers, bottom-up. */
export function mark(node: MathNode): MathNode {
  const kids = children(node);
  const n = kids.length === 0 ? node : rebuild(node, kids.map(mark));
  if (isOpNode(n, 'divide')) {
    const [a, b] = args(n) as [MathNode, MathNode];
    const u = onePlusNegExp(b);
    // a / (1 + e^(−u)) = a·σ(u)
    if (u) return isNum(a, 1) ? fn('sigmoid', [u]) : mul(a, fn('sigmoid', [u]));
    const v = onePlusExp(b);
    // e^u / (1 + e^u) = σ(u)
    if (v && isFn(a, 'exp') && same(args(a)[0] as MathNode, v)) return fn('sigmoid', [v]);
    // 1 / (1 + e^u) = σ(−u)
    if (v && isNum(a, 1)) return fn('sigmoid', [neg(v)]);
  }
  if (isOpNode(n, 'pow') && isNum(args(n)[1] as MathNode, -1)) {
    const u = onePlusNegExp(args(n)[0] as MathNode);
    if (u) return fn('sigmoid', [u]);
  }
  if (isFn(n, 'log')) {
    const u = onePlusExp(args(n)[0] as MathNode);
    if (u) return fn('softplus', [u]);
    const w = onePlusNegExp(args(n)[0] as MathNode);
    if (w) return fn('softplus', [neg(w)]);
  }
  if (isFn(n, 'log1p') && isFn(args(n)[0] as MathNode, 'exp')) return fn('softplus', [args(args(n)[0] as MathNode)[0] as MathNode]);
  return n;
}

/** Expands markers back into stock mathjs. */
export function unmark(node: MathNode): MathNode {
  const kids = children(node);
  const n = kids.length === 0 ? node : rebuild(node, kids.map(unmark));
  if (isFn(n, 'sigmoid')) return div(num(1), add(num(1), fn('exp', [neg(args(n)[0] as MathNode)])));
  if (isFn(n, 'softplus')) return fn('log', [add(num(1), fn('exp', [args(n)[0] as MathNode]))]);
  return n;
}

export function hasMarker(node: MathNode): boolean {
  let found = false;
  node.traverse((c) => {
    if (c.type === 'FunctionNode' && MARKERS.has(fnName(c))) found = true;
  });
  return found;
}

