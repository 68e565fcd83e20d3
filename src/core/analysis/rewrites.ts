/**
 * Stable rewrites of forms that are known to break down in low precision, offered only when they
 * are shown to help: the rewrite must equal the original in double precision (max relative
 * difference ≤ 1e-12 on [−30, 30]) and its breakdown intervals, re-computed with the same analysis
 * (`breakdownIntervals`), must be shorter in total for at least one type.
 *
 * Patterns (u is any sub-expression; commutative sums in either order; common practice):
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
import { compileRounded, compileScalar } from '../expr/compile';
import type { FloatType } from '../types';
import { breakdownIntervals, breakdownMeasure, exactOnGrid, type BreakdownInterval } from './floatLimits';
import { instantiate, match, stableForm, type Match } from './patterns';

export interface Suggestion {
  /** Short name of the rewrite ("softplus", "log1p"). */
  rule: string;
  title: string;
  /** Whether it applies to f or to its derivative. */
  target: 'function' | 'derivative';
  /** The sub-expression replaced (stock mathjs). */
  replaces: string;
  /** Its replacement (stock mathjs). */
  replacement: string;
  /** The whole rewritten expression (stock mathjs). */
  expression: string;
  /** Breakdown intervals per type before and after. */
  before: Partial<Record<FloatType, BreakdownInterval[]>>;
  after: Partial<Record<FloatType, BreakdownInterval[]>>;
}

/**
 * Each distinct match (rule and replaced text), applied to every occurrence of that sub-tree at
 * once — a derivative often repeats σ(x) several times.
 */
function candidates(node: MathNode): Array<{ match: Match; original: MathNode; rewritten: MathNode }> {
  const groups = new Map<string, { match: Match; nodes: MathNode[] }>();
  node.traverse((c) => {
    if (c.type === 'ParenthesisNode') return; // its content is visited on its own
    const m = match(c);
    if (!m) return;
    const key = `${m.rule}|${c.toString()}`;
    const g = groups.get(key);
    if (g) g.nodes.push(c);
    else groups.set(key, { match: m, nodes: [c] });
  });
  const out: Array<{ match: Match; original: MathNode; rewritten: MathNode }> = [];
  for (const { match: m, nodes } of groups.values()) {
    const rewritten = node.transform((d) => (nodes.includes(d) ? instantiate(m) : d));
    out.push({ match: m, original: nodes[0] as MathNode, rewritten });
  }
  return out;
}

function sameInDouble(a: MathNode, b: MathNode, variable: string, params: Record<string, number>): boolean {
  const fa = compileScalar(a, variable, params);
  const fb = compileScalar(b, variable, params);
  for (let x = -30; x <= 30; x += 0.0625) {
    const va = fa(x);
    const vb = fb(x);
    if (!Number.isFinite(va) || !Number.isFinite(vb)) continue; // the unstable form overflows in double too
    if (Math.abs(va - vb) > 1e-12 * Math.max(1, Math.abs(va))) return false;
  }
  return true;
}

export interface KnownBreakdowns {
  function?: Partial<Record<FloatType, BreakdownInterval[]>>;
  derivative?: Partial<Record<FloatType, BreakdownInterval[]>>;
}

/** Distinct rewrites tried per tree (each costs a breakdown scan per type). */
export const MAX_REWRITES = 6;

const now = (): number => (typeof performance !== 'undefined' ? performance.now() : Date.now());

/**
 * `accept`: asked with a tree's breakdowns before any rewrite is scanned; false skips that tree's
 * rewrites (a caller that reports only some breakdowns need not scan the rewrites of the others).
 * `limit`: stop after this many suggestions.
 */
export interface RewriteOptions {
  accept?: (before: Partial<Record<FloatType, BreakdownInterval[]>>, target: 'function' | 'derivative') => boolean;
  limit?: number;
}

export function stableRewrites(node: MathNode, dnode: MathNode | null, variable: string, params: Record<string, number>, types: readonly FloatType[], domain: readonly [number, number], known: KnownBreakdowns = {}, deadline = Infinity, options: RewriteOptions = {}): Suggestion[] {
  const out: Suggestion[] = [];
  const targets: Array<['function' | 'derivative', MathNode]> = [['function', node]];
  if (dnode) targets.push(['derivative', dnode]);
  for (const [target, tree] of targets) {
    // A rewrite that changes the value in double is not a rewrite: filtered before any float scan.
    const found = candidates(tree).slice(0, MAX_REWRITES).filter((c) => now() <= deadline && sameInDouble(tree, c.rewritten, variable, params));
    if (found.length === 0) continue;
    const exact = compileScalar(stableForm(tree), variable, params);
    // The exact reference on each type's grid is the same for the tree and all its rewrites: once.
    const refs = new Map(types.map((type) => [type, exactOnGrid(exact, type, domain)]));
    const before: Partial<Record<FloatType, BreakdownInterval[]>> = {};
    for (const type of types) before[type] = known[target]?.[type] ?? breakdownIntervals(exact, compileRounded(tree, variable, params, type), type, domain, refs.get(type));
    // a rewrite helps only by shortening a breakdown: with none in any type, none can
    if (types.every((type) => breakdownMeasure(before[type] ?? []) <= 1e-9)) continue;
    if (options.accept && !options.accept(before, target)) continue;
    for (const cand of found) {
      if (now() > deadline) break;
      const after: Partial<Record<FloatType, BreakdownInterval[]>> = {};
      let helps = false;
      for (const type of types) {
        // The reference stays the original's exact value: the rewrite must reproduce it.
        after[type] = breakdownIntervals(exact, compileRounded(cand.rewritten, variable, params, type), type, domain, refs.get(type));
        if (breakdownMeasure(after[type] ?? []) < breakdownMeasure(before[type] ?? []) - 1e-9) helps = true;
      }
      if (!helps) continue;
      out.push({
        rule: cand.match.rule,
        title: cand.match.title,
        target,
        replaces: cand.original.toString(),
        replacement: instantiate(cand.match).toString(),
        expression: cand.rewritten.toString(),
        before,
        after,
      });
      if (options.limit !== undefined && out.length >= options.limit) return out;
    }
  }
  return out;
}
