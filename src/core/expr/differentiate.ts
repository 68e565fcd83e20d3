/**
 * Symbolic derivative over mathjs nodes: conditionals (branch-wise), max/min (to conditionals), abs,
 * sign, erf, log1p, expm1 and the sigmoid / softplus markers by their own rules; every other function
 * through the chain rule on a placeholder symbol, d/dx f(u) = f′(t)|_{t=u} · u′, with f′(t) from
 * STOCK_DERIVATIVES below.
 *
 * Derivatives of conditionals hold away from the switching points (the kinks), which is what the
 * analysis stage reports separately.
 */
import type { MathNode } from 'mathjs';
import { SlopewiseError } from '../errors';
import { LIMITS } from '../limits';
import { math } from '../math';
import { mark, unmark } from './markers';
import {
  add, args, cond, condParts, countNodes, dependsOn, div, fn, fnName, isCond, isNum, isSym, mul, neg, num, numValue, op, opFn, pow, sub,
  substitute, sym, children, rebuild, key,
} from './nodes';

const PLACEHOLDER = '__t';

/**
 * f′(t)·t′ for the one-argument functions our own rules below leave out, written as the trees mathjs's
 * `derivative` builds for f(t) (mathjs 15, function/algebra/derivative.js, with `simplify: false`):
 * the chain factor t′ = 1 first (−1 where the rule is negative), then × or ÷ the function's part.
 * Parsing them gives the same trees node for node (checked against mathjs's derivative in
 * test/unit/expr/differentiate.test.ts), so the core no longer carries mathjs's derivative (7 kB of
 * the extension-host bundle) for the few rules it used.
 */
const STOCK_DERIVATIVES: Readonly<Record<string, string>> = {
  // d/dx ∛u = u′/(3·u^(2/3));  d/dx √u = u′/(2√u);  d/dx log₁₀ u = u′/(u·ln 10)
  cbrt: '1 / (3 * __t ^ (2 / 3))', sqrt: '1 / (2 * sqrt(__t))', nthRoot: '1 / (2 * sqrt(__t))', log10: '1 / (__t * log(10))',
  // d/dx sin u = cos u·u′;  cos′ = −sin;  tan′ = sec²;  sec′ = sec·tan;  csc′ = −csc·cot;  cot′ = −csc²
  sin: '1 * cos(__t)', cos: '1 * -sin(__t)', tan: '1 * sec(__t) ^ 2', sec: '1 * (sec(__t) * tan(__t))',
  csc: '-1 * (csc(__t) * cot(__t))', cot: '-1 * csc(__t) ^ 2',
  // d/dx asin u = u′/√(1 − u²);  acos′ = −1/√(1 − u²);  atan′ = 1/(u² + 1);  asec′ = 1/(|u|√(u² − 1));  acsc′, acot′ negated
  asin: '1 / sqrt(1 - __t ^ 2)', acos: '-1 / sqrt(1 - __t ^ 2)', atan: '1 / (__t ^ 2 + 1)',
  asec: '1 / (abs(__t) * sqrt(__t ^ 2 - 1))', acsc: '-1 / (abs(__t) * sqrt(__t ^ 2 - 1))', acot: '-1 / (__t ^ 2 + 1)',
  // d/dx sinh u = cosh u·u′;  cosh′ = sinh;  sech′ = −sech·tanh;  csch′ = −csch·coth;  coth′ = −csch²
  sinh: '1 * cosh(__t)', cosh: '1 * sinh(__t)', sech: '-1 * (sech(__t) * tanh(__t))', csch: '-1 * (csch(__t) * coth(__t))',
  coth: '-1 * csch(__t) ^ 2',
  // d/dx asinh u = u′/√(u² + 1);  acosh′ = 1/√(u² − 1);  atanh′ = 1/(1 − u²);  asech′ = −1/(u√(1 − u²));
  // acsch′ = −1/(|u|√(u² + 1));  acoth′ = −1/(1 − u²)
  asinh: '1 / sqrt(__t ^ 2 + 1)', acosh: '1 / sqrt(__t ^ 2 - 1)', atanh: '1 / (1 - __t ^ 2)',
  asech: '-1 / (__t * sqrt(1 - __t ^ 2))', acsch: '-1 / (abs(__t) * sqrt(__t ^ 2 + 1))', acoth: '-1 / (1 - __t ^ 2)',
};
export const STOCK_DERIVATIVE_NAMES: readonly string[] = Object.keys(STOCK_DERIVATIVES);

const delegated = new Map<string, MathNode>();

/** f′(t) for a stock function f, from STOCK_DERIVATIVES, parsed once per function. */
export function stockDerivative(name: string): MathNode {
  let d = delegated.get(name);
  if (!d) {
    const text = Object.hasOwn(STOCK_DERIVATIVES, name) ? STOCK_DERIVATIVES[name] : undefined;
    if (text === undefined) {
      // The words mathjs's derivative used for a function it has no rule for.
      throw new SlopewiseError('unknown-function', `No derivative rule for ${name}(): Cannot process function "${name}" in derivative: ` +
        'the function is not supported, undefined, or the number of arguments passed to it are not supported');
    }
    d = math.parse(text);
    delegated.set(name, d);
  }
  return d;
}

/** The variable-dependent argument first, so max(0, x) differentiates like max(x, 0). */
function orient(a: MathNode, b: MathNode, v: string): [MathNode, MathNode] {
  return !dependsOn(a, v) && dependsOn(b, v) ? [b, a] : [a, b];
}

/** Derivative budget: trees can only grow polynomially, but bound them anyway. */
const MAX_DERIVATIVE_NODES = 20_000;

/**
 * d/dv of a (marked or canonical) tree. Works on canonical input too: patterns are marked first.
 * Returns a tree that may contain markers; `differentiate` returns stock mathjs.
 */
export function differentiateMarked(node: MathNode, v: string): MathNode {
  const memo = new Map<string, MathNode>();
  const d = (n: MathNode): MathNode => {
    if (!dependsOn(n, v)) return num(0);
    const k = key(n);
    const hit = memo.get(k);
    if (hit) return hit;
    const r = rule(n);
    memo.set(k, r);
    return r;
  };
  const rule = (n: MathNode): MathNode => {
    switch (n.type) {
      case 'SymbolNode':
        return num(isSym(n, v) ? 1 : 0);
      case 'ConstantNode':
        return num(0);
      case 'ParenthesisNode':
        return d(children(n)[0] as MathNode);
      case 'ConditionalNode': {
        // d/dx (c ? a : b) = c ? a′ : b′   (away from the points where c switches)
        const { c, a, b } = condParts(n);
        return cond(c, d(a), d(b));
      }
      case 'OperatorNode':
        return operator(n);
      case 'FunctionNode':
        return func(n);
      default:
        throw new SlopewiseError('not-allowed', `Cannot differentiate ${n.type}`);
    }
  };
  const operator = (n: MathNode): MathNode => {
    const f = opFn(n);
    const a = args(n);
    const [u, w] = a as [MathNode, MathNode];
    switch (f) {
      // d/dx (u + w) = u′ + w′
      case 'add': return add(d(u), d(w));
      // d/dx (u − w) = u′ − w′
      case 'subtract': return sub(d(u), d(w));
      // d/dx (−u) = −u′
      case 'unaryMinus': return neg(d(u));
      case 'unaryPlus': return d(u);
      case 'multiply': {
        // d/dx (u·w) = u′·w + u·w′   (n-ary: Σᵢ uᵢ′ ∏_{j≠i} uⱼ)
        let total: MathNode = num(0);
        a.forEach((ai, i) => {
          const di = d(ai);
          if (isNum(di, 0)) return;
          const rest = a.filter((_, j) => j !== i);
          total = add(total, rest.reduce((acc, r) => mul(acc, r), di));
        });
        return total;
      }
      case 'divide': {
        const du = d(u);
        // d/dx (u/c) = u′/c
        if (!dependsOn(w, v)) return div(du, w);
        const dw = d(w);
        // d/dx (c/w) = −c·w′/w²
        if (isNum(du, 0)) return neg(div(mul(u, dw), pow(w, num(2))));
        // d/dx (u/w) = (u′·w − u·w′)/w²
        return div(sub(mul(du, w), mul(u, dw)), pow(w, num(2)));
      }
      case 'pow': {
        if (!dependsOn(w, v)) {
          // d/dx u^n = n·u^(n−1)·u′
          const n1 = isNum(w) ? num(numValue(w) - 1) : sub(w, num(1));
          return mul(mul(w, pow(u, n1)), d(u));
        }
        if (!dependsOn(u, v)) {
          // d/dx a^w = a^w·ln(a)·w′
          if (isSym(u, 'e')) return mul(n, d(w));
          return mul(mul(n, fn('log', [u])), d(w));
        }
        // d/dx u^w = u^w·(w′·ln u + w·u′/u)
        return mul(n, add(mul(d(w), fn('log', [u])), div(mul(w, d(u)), u)));
      }
      case 'smaller': case 'smallerEq': case 'larger': case 'largerEq': case 'equal': case 'unequal':
      case 'and': case 'or': case 'not':
        // Comparisons are piecewise constant.
        return num(0);
      default:
        throw new SlopewiseError('not-allowed', `Cannot differentiate the operator ${f}`);
    }
  };
  const func = (n: MathNode): MathNode => {
    const name = fnName(n);
    const a = args(n);
    const u = a[0] as MathNode;
    switch (name) {
      // d/dx σ(u) = σ(u)·(1 − σ(u))·u′
      case 'sigmoid': return mul(mul(n, sub(num(1), n)), d(u));
      // d/dx softplus(u) = σ(u)·u′
      case 'softplus': return mul(fn('sigmoid', [u]), d(u));
      // d/dx e^u = e^u·u′
      case 'exp': return mul(n, d(u));
      // d/dx ln u = u′/u
      case 'log':
        if (a.length === 2) return d(div(fn('log', [u]), fn('log', [a[1] as MathNode])));
        return div(d(u), u);
      // d/dx tanh u = (1 − tanh²u)·u′
      case 'tanh': return mul(sub(num(1), pow(n, num(2))), d(u));
      // d/dx erf(u) = 2/√π·e^(−u²)·u′   (Abramowitz & Stegun 7.1.19; DLMF 7.10.1)
      case 'erf': return mul(mul(div(num(2), fn('sqrt', [sym('pi')])), fn('exp', [neg(pow(u, num(2)))])), d(u));
      // d/dx log1p(u) = u′/(1 + u)
      case 'log1p': return div(d(u), add(num(1), u));
      // d/dx expm1(u) = e^u·u′
      case 'expm1': return mul(fn('exp', [u]), d(u));
      // d/dx |u| = sign(u)·u′   (0 at u = 0, like the frameworks' subgradient choice)
      case 'abs': return mul(fn('sign', [u]), d(u));
      // d/dx sign(u) = 0   (away from u = 0)
      case 'sign': return num(0);
      case 'max': case 'min': {
        // d/dx max(p, q) = p > q ? p′ : q′ ;  d/dx min(p, q) = p < q ? p′ : q′
        const [p, q] = orient(u, a[1] as MathNode, v);
        const c = op(name === 'max' ? 'larger' : 'smaller', [p, q]);
        return cond(c, d(p), d(q));
      }
      default: {
        if (a.length !== 1) throw new SlopewiseError('unknown-function', `No derivative rule for ${name}() with ${a.length} arguments`);
        // d/dx f(u) = f′(t)|_{t=u}·u′, f′ from STOCK_DERIVATIVES
        const outer = substitute(stockDerivative(name), new Map([[PLACEHOLDER, u]]));
        return mul(rebuildTidy(outer), d(u));
      }
    }
  };
  const out = d(mark(node));
  if (countNodes(out, MAX_DERIVATIVE_NODES + 1) > MAX_DERIVATIVE_NODES) {
    throw new SlopewiseError('budget', `The derivative grew past ${MAX_DERIVATIVE_NODES} nodes`);
  }
  return out;
}

function rebuildTidy(n: MathNode): MathNode {
  const kids = children(n);
  if (n.type === 'ParenthesisNode') return rebuildTidy(kids[0] as MathNode);
  if (kids.length === 0) return n;
  return rebuild(n, kids.map(rebuildTidy));
}

/**
 * Moves conditionals to the top: f(c ? a : b) → c ? f(a) : f(b), merging repeated conditions
 * (inside the true branch of c, c is true). Gives up (returns the input) if the tree would grow past
 * `cap` nodes — derivatives of many kinks would otherwise multiply out.
 */
export function liftConditionals(node: MathNode, cap = LIMITS.maxNodes * 4): MathNode {
  let budget = cap;
  class Abort extends Error {}
  const lift = (n: MathNode, known: ReadonlyMap<string, boolean>): MathNode => {
    if (--budget < 0) throw new Abort();
    if (isCond(n)) {
      const { c, a, b } = condParts(n);
      const k = key(c);
      const kv = known.get(k);
      if (kv !== undefined) return lift(kv ? a : b, known);
      const ka = new Map(known).set(k, true);
      const kb = new Map(known).set(k, false);
      return cond(c, lift(a, ka), lift(b, kb));
    }
    const kids = children(n);
    if (kids.length === 0 || n.type === 'ParenthesisNode') return n;
    // Conditions of comparisons stay where they are; only value positions are lifted.
    const lifted = kids.map((kid) => lift(kid, known));
    const at = lifted.findIndex(isCond);
    if (at < 0) return rebuild(n, lifted);
    const { c, a, b } = condParts(lifted[at] as MathNode);
    const withA = lifted.slice();
    withA[at] = a;
    const withB = lifted.slice();
    withB[at] = b;
    const k = key(c);
    return cond(c, lift(rebuild(n, withA), new Map(known).set(k, true)), lift(rebuild(n, withB), new Map(known).set(k, false)));
  };
  try {
    return lift(node, new Map());
  } catch (e) {
    if (e instanceof Abort) return node;
    throw e;
  }
}

/** d/dv in stock mathjs (markers expanded), conditionals lifted where that stays small. */
export function differentiate(node: MathNode, variable: string): MathNode {
  return unmark(liftConditionals(differentiateMarked(node, variable)));
}

export { mark };
