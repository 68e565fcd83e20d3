/**
 * Formula → Derivatives: f′ and f″ by our differentiator, each simplified within budget, with
 * canonical (stock mathjs) and display forms. f″ is taken from the simplified f′.
 */
import type { MathNode } from 'mathjs';
import { LIMITS } from '../limits';
import type { Derivatives, Formula } from '../types';
import { differentiateMarked, liftConditionals } from './differentiate';
import { derivativeDisplayForm } from './display';
import { unmark } from './markers';
import { countNodes } from './nodes';
import { lightClean, simplifyWithinBudget } from './simplify';

export interface DeriveOptions {
  /** Budget per simplification (ms). */
  budgetMs?: number;
}

function step(node: MathNode, variable: string, opts: DeriveOptions): { marked: MathNode; note?: string } {
  const raw = liftConditionals(differentiateMarked(node, variable));
  const r = simplifyWithinBudget(raw, opts.budgetMs === undefined ? {} : { budgetMs: opts.budgetMs });
  // Prefer the cleaner of simplified / as derived (simplify may expand σ(1−σ) into σ − σ²).
  const light = lightClean(raw);
  const marked = countNodes(r.node) <= countNodes(light) ? r.node : light;
  return r.note === undefined ? { marked } : { marked, note: r.note };
}

/** First and second derivatives of a formula by its variable. */
export function derive(formula: Formula, opts: DeriveOptions = {}): Derivatives {
  const d1 = step(formula.node, formula.variable, opts);
  const d2 = step(d1.marked, formula.variable, opts);
  const firstNode = unmark(d1.marked);
  const secondNode = unmark(d2.marked);
  const out: Derivatives = {
    first: firstNode.toString(),
    firstNode,
    second: secondNode.toString(),
    secondNode,
    firstDisplay: derivativeDisplayForm(d1.marked),
    secondDisplay: derivativeDisplayForm(d2.marked),
  };
  const notes = [d1.note && `f′: ${d1.note}`, d2.note && `f″: ${d2.note}`].filter((s): s is string => !!s);
  if (notes.length > 0) out.simplifyNote = notes.join('; ');
  void LIMITS;
  return out;
}
