/**
 * mathjs `simplify` under a budget. simplify is synchronous and can take exponential time (measured:
 * a 24-deep exp tower > 60 s), so it never sees a large tree and never runs unchecked:
 *  1. trees above LIMITS.maxSimplifyNodes are not simplified at all;
 *  2. function calls, conditionals and markers are abstracted to placeholder symbols, their arguments
 *     simplified separately (bottom-up) — each simplify call sees one small algebraic layer;
 *  3. a layer above MAX_LAYER_NODES is split at its top operator (mathjs's commutative matching is
 *     super-linear in the number of terms), so every simplify call sees at most MAX_LAYER_NODES
 *     nodes, and the deadline is checked before every call — the longest uninterruptible step is
 *     one simplify of one small layer (rule-by-rule stepping was measured 5–9× slower);
 *  4. out of time → the lightly cleaned (simplifyCore) form, with a note saying so.
 * Decimals are kept (`exactFractions: false`), and a simplified layer is only used when it is smaller.
 */
import type { MathNode } from 'mathjs';
import { LIMITS } from '../limits';
import { math } from '../math';
import { args, children, condParts, countNodes, fn, fnName, freeSymbols, isCond, key, rebuild, substitute, sym, tidy, cond } from './nodes';
import { compileMulti } from './compile';
import { unmark } from './markers';

export interface SimplifyResult {
  node: MathNode;
  /** True when every layer was simplified within the budget. */
  simplified: boolean;
  note?: string;
}

const now: () => number = typeof performance !== 'undefined' ? () => performance.now() : () => Date.now();

class OutOfTime extends Error {}

const OPTIONS = { exactFractions: false };

/**
 * One mathjs simplify call on a layer of at most MAX_LAYER_NODES nodes; deadline checked before it.
 * A layer holds operators, numbers and symbols only (simplifyLayer abstracts every function call):
 * the extension-host bundles' mathjs instance has no implementations of exp, sin… to fold calls
 * with (src/core/math.ts, SLOPEWISE_HOST_BUNDLE).
 */
function simplifyLayerOnce(n: MathNode, deadline: number): MathNode {
  if (now() > deadline) throw new OutOfTime();
  return math.simplify(n, {}, OPTIONS);
}

/**
 * mathjs matches its rules up to commutativity and associativity, which costs super-linear time in
 * the number of terms (measured: one rule on a sum of 16 products ≈ 0.1–0.45 s). Layers above
 * MAX_LAYER_NODES are therefore split at their top operator and the parts simplified separately.
 */
const MAX_LAYER_NODES = 32;

function simplifyBounded(layer: MathNode, deadline: number): MathNode {
  const size = countNodes(layer, MAX_LAYER_NODES + 1);
  if (size <= 1) return layer;
  if (size <= MAX_LAYER_NODES) {
    const simplified = simplifyLayerOnce(layer, deadline);
    return countNodes(simplified) < countNodes(layer) ? tidy(simplified) : layer;
  }
  const kids = children(layer);
  if (kids.length === 0) return layer;
  return rebuild(layer, kids.map((k) => simplifyBounded(k, deadline)));
}

/** Simplifies one algebraic layer; functions and conditionals inside are placeholders. */
function simplifyLayer(n: MathNode, deadline: number, memo: Map<string, MathNode>): MathNode {
  const k = key(n);
  const hit = memo.get(k);
  if (hit) return hit;
  if (isCond(n)) {
    const { c, a, b } = condParts(n);
    const out = cond(tidy(c), simplifyLayer(a, deadline, memo), simplifyLayer(b, deadline, memo));
    memo.set(k, out);
    return out;
  }
  const atoms = new Map<string, { name: string; node: MathNode }>();
  const abstract = (m: MathNode): MathNode => {
    if (m.type === 'FunctionNode' || isCond(m)) {
      const mk = key(m);
      let atom = atoms.get(mk);
      if (!atom) {
        const inner = m.type === 'FunctionNode'
          ? fn(fnName(m), args(m).map((a) => simplifyLayer(a, deadline, memo)))
          : simplifyLayer(m, deadline, memo);
        atom = { name: `_a${atoms.size}`, node: inner };
        atoms.set(mk, atom);
      }
      return sym(atom.name);
    }
    const kids = children(m);
    if (kids.length === 0) return m;
    return rebuild(m, kids.map(abstract));
  };
  const layer = tidy(abstract(n));
  const best = simplifyBounded(layer, deadline);
  const back = new Map<string, MathNode>();
  for (const a of atoms.values()) back.set(a.name, a.node);
  const out = tidy(substitute(best, back));
  memo.set(k, out);
  return out;
}

/** Cleans without the risky rules: folding constructors only (linear time). */
export function lightClean(n: MathNode): MathNode {
  // mathjs simplifyCore is not linear either (measured 0.3 s on a 16-term sum, 4.9 s on 650 nodes),
  // so the fallback uses only our own folding constructors.
  return tidy(n);
}

/** Simplifies within `budgetMs` (default LIMITS.simplifyBudgetMs); see the module comment. */
export function simplifyWithinBudget(node: MathNode, opts: { budgetMs?: number; maxNodes?: number } = {}): SimplifyResult {
  const budget = opts.budgetMs ?? LIMITS.simplifyBudgetMs;
  const maxNodes = opts.maxNodes ?? LIMITS.maxSimplifyNodes;
  const size = countNodes(node, maxNodes + 1);
  if (size > maxNodes) {
    return { node: lightClean(node), simplified: false, note: `Not simplified: the expression has more than ${maxNodes} nodes` };
  }
  const deadline = now() + budget;
  try {
    const out = simplifyLayer(node, deadline, new Map());
    if (!sameValues(node, out)) {
      return { node: lightClean(node), simplified: false, note: 'Not simplified: the simplified form changed values on the real line, so the form as derived is kept' };
    }
    return { node: out, simplified: true };
  } catch (e) {
    if (!(e instanceof OutOfTime)) throw e;
    return { node: lightClean(node), simplified: false, note: `Not fully simplified: simplification ran out of its ${budget} ms budget` };
  }
}

/**
 * mathjs's rules are not all valid on the real line: `(x^2)^0.5 → x` and `(x·x)^−0.5 → (x^−0.5)^2`
 * (both wrong for x < 0) are among its defaults, so d/dx √(x·x) came out 1 instead of sign(x). Every
 * simplified tree is therefore compared with the tree it came from at fixed points of both signs (all
 * free symbols varied together); where the original is a finite number the simplified one must agree
 * to SAME_VALUE_TOLERANCE. A tree that cannot be compiled even with its markers expanded is not judged.
 */
const SAME_VALUE_TOLERANCE = 1e-7;
const PROBES = [-7.31, -2.47, -1.3, -0.77, -0.29, -0.043, 0.061, 0.33, 0.86, 1.41, 2.9, 6.2];

function sameValues(before: MathNode, after: MathNode): boolean {
  const vars = [...new Set([...freeSymbols(before), ...freeSymbols(after)])].filter((v) => v !== 'pi' && v !== 'e');
  let f: (...v: number[]) => number;
  let g: (...v: number[]) => number;
  try {
    // derive() simplifies trees with σ/softplus markers in them: expand those to stock functions first
    f = compileMulti(unmark(before), vars);
    g = compileMulti(unmark(after), vars);
  } catch {
    return true;
  }
  for (let i = 0; i < PROBES.length; i++) {
    // each symbol gets a different probe, so x, y and parameters are not always equal
    const values = vars.map((_, j) => PROBES[(i + 5 * j) % PROBES.length] as number);
    const a = f(...values);
    if (!Number.isFinite(a)) continue;
    const b = g(...values);
    if (!(Math.abs(a - b) <= SAME_VALUE_TOLERANCE * Math.max(1, Math.abs(a)))) return false;
  }
  return true;
}

/** Measures the slowest simplification over adversarial inputs (for the bench). Times in ms. */
export function measureSimplifyWorstCase(inputs: readonly MathNode[], opts: { budgetMs?: number } = {}): { worstMs: number; worstIndex: number; times: number[] } {
  const times: number[] = [];
  let worstMs = 0;
  let worstIndex = -1;
  inputs.forEach((n, i) => {
    const t0 = now();
    simplifyWithinBudget(n, opts);
    const dt = now() - t0;
    times.push(dt);
    if (dt > worstMs) { worstMs = dt; worstIndex = i; }
  });
  return { worstMs, worstIndex, times };
}
