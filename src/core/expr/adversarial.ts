/**
 * Inputs that make symbolic work expensive, and a measurement the bench can run: deep exp towers
 * (plain mathjs simplify: > 60 s at depth 24), sums of many sigmoids, nested activations, f″ of
 * BCE∘σ, long polynomials, many kinks. `measureEngineWorstCase` times `derive` (f′ and f″, each
 * simplified within budget) on each and reports the slowest.
 */
import type { Formula } from '../types';
import { derive } from './derive';
import { parseFormula } from './parse';

const tower = (n: number): string => {
  let s = 'x';
  for (let i = 0; i < n; i++) s = `exp(${s})`;
  return s;
};
const sum = (n: number, f: string): string => Array.from({ length: n }, (_, i) => `${f}(${i + 1} * x)`).join(' + ');

/** Named adversarial formulas (all within LIMITS, so they reach the differentiator). */
export const ADVERSARIAL_FORMULAS: readonly { name: string; input: string; params?: Record<string, number> }[] = [
  { name: 'exp tower, depth 8', input: tower(8) },
  { name: 'exp tower, depth 16', input: tower(16) },
  { name: 'exp tower, depth 24', input: tower(24) },
  { name: 'sum of 8 sigmoids', input: sum(8, 'sigmoid') },
  { name: 'sum of 16 sigmoids', input: sum(16, 'sigmoid') },
  { name: 'sum of 12 GELU-tanh', input: sum(12, 'gelu_tanh') },
  { name: 'σ∘σ∘σ∘σ', input: 'sigmoid(sigmoid(sigmoid(sigmoid(x))))' },
  { name: 'mish∘mish∘mish', input: 'mish(mish(mish(x)))' },
  { name: 'GELU-tanh∘GELU-tanh', input: 'gelu_tanh(gelu_tanh(x))' },
  { name: 'BCE∘σ', input: 'bce(sigmoid(z), y)', params: { y: 0.3 } },
  { name: 'Huber∘σ + BCE∘σ', input: 'huber(sigmoid(x), 0.3, 1) + bce(sigmoid(x), 0.2)' },
  { name: 'products of powers', input: 'softplus(x)^7 * tanh(x)^5 / (1 + x^2)^3' },
  { name: 'polynomial of degree 59', input: Array.from({ length: 60 }, (_, i) => `x^${i}`).join(' + ') },
  { name: '20 leaky ReLU kinks', input: Array.from({ length: 20 }, (_, i) => `leaky_relu(x - ${i})`).join(' + ') },
  { name: 'SELU∘ELU∘GELU', input: 'selu(elu(gelu(x)))' },
];

export interface EngineTiming {
  name: string;
  input: string;
  ms: number;
  simplifyNote?: string;
  error?: string;
}

const now: () => number = typeof performance !== 'undefined' ? () => performance.now() : () => Date.now();

/** Times parse + derive on every adversarial formula (or the given ones); slowest first. */
export function measureEngineWorstCase(formulas = ADVERSARIAL_FORMULAS, opts: { budgetMs?: number } = {}): EngineTiming[] {
  const out: EngineTiming[] = [];
  for (const f of formulas) {
    const t0 = now();
    const row: EngineTiming = { name: f.name, input: f.input, ms: 0 };
    try {
      const formula: Formula = parseFormula(f.input, f.params ? { params: f.params } : {});
      const d = derive(formula, opts.budgetMs === undefined ? {} : { budgetMs: opts.budgetMs });
      if (d.simplifyNote !== undefined) row.simplifyNote = d.simplifyNote;
    } catch (e) {
      row.error = (e as Error).message;
    }
    row.ms = now() - t0;
    out.push(row);
  }
  return out.sort((a, b) => b.ms - a.ms);
}
