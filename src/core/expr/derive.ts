/**
 * Formula → Derivatives: f′ and f″ by our differentiator, each simplified within budget, with
 * canonical (stock mathjs) and display forms. f″ is taken from the simplified f′. The display form
 * is the polished tree (display.ts, polish.ts) when it reads better, and never prints longer than
 * the derivative as derived.
 */
import type { MathNode } from 'mathjs';
import type { Derivatives, Formula } from '../types';
import { differentiateMarked, liftConditionals } from './differentiate';
import { derivativeDisplayTree, displayForm } from './display';
import { unmark } from './markers';
import { countNodes } from './nodes';
import { lightClean, simplifyWithinBudget } from './simplify';

export interface DeriveOptions {
  /** Budget per simplification (ms). */
  budgetMs?: number;
}

interface Step {
  /** As derived (conditionals lifted), before any simplification. */
  raw: MathNode;
  /** The simplified (or lightly cleaned) tree, markers kept: what canonical text and f″ come from. */
  marked: MathNode;
  /** The tree the display text prints (may hold display-only names φ, Φ). */
  displayTree: MathNode;
  display: string;
  note?: string;
}

/** Largest as-derived tree whose display bounds the display length (see step). */
const RAW_PRINT_NODES = 2000;

function step(node: MathNode, variable: string, opts: DeriveOptions): Step {
  const raw = liftConditionals(differentiateMarked(node, variable));
  const r = simplifyWithinBudget(raw, opts.budgetMs === undefined ? {} : { budgetMs: opts.budgetMs });
  // Prefer the cleaner of simplified / as derived (simplify may expand σ(1−σ) into σ − σ²).
  const light = lightClean(raw);
  const marked = countNodes(r.node) <= countNodes(light) ? r.node : light;
  // The derivative as derived bounds the display length; it is only printed when small (as derived
  // it shares sub-trees, and printing a large shared tree costs time exponential in its depth).
  const rawText = countNodes(raw, RAW_PRINT_NODES + 1) <= RAW_PRINT_NODES ? displayForm(raw) : undefined;
  let shown = derivativeDisplayTree(marked, {}, rawText?.length ?? Infinity);
  if (rawText !== undefined && shown.text.length > rawText.length) shown = { tree: raw, text: rawText };
  const out: Step = { raw, marked, displayTree: shown.tree, display: shown.text };
  if (r.note !== undefined) out.note = r.note;
  return out;
}

/** Both steps with their intermediate trees (for checks that display trees keep the values). */
export function deriveSteps(formula: Formula, opts: DeriveOptions = {}): { first: Step; second: Step } {
  const first = step(formula.node, formula.variable, opts);
  const second = step(first.marked, formula.variable, opts);
  return { first, second };
}

/** First and second derivatives of a formula by its variable. */
export function derive(formula: Formula, opts: DeriveOptions = {}): Derivatives {
  const { first: d1, second: d2 } = deriveSteps(formula, opts);
  const firstNode = unmark(d1.marked);
  const secondNode = unmark(d2.marked);
  const out: Derivatives = {
    first: firstNode.toString(),
    firstNode,
    second: secondNode.toString(),
    secondNode,
    firstDisplay: d1.display,
    secondDisplay: d2.display,
  };
  const notes = [d1.note && `f′: ${d1.note}`, d2.note && `f″: ${d2.note}`].filter((s): s is string => !!s);
  if (notes.length > 0) out.simplifyNote = notes.join('; ');
  return out;
}
