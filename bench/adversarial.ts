/**
 * Inputs that make mathjs `simplify` take exponential time (see the shared library facts: a 24-deep
 * exp tower > 60 s, a sum of 16 sigmoids 2.1 s, the 4th derivative of BCE∘σ 12.6 s unbudgeted), and
 * relatives of them. Each is a tree as the engine would hand it to `simplifyWithinBudget`.
 */
import type { MathNode } from 'mathjs';
import { SlopewiseError } from '../src/core/errors';
import { differentiate, parseFormula, simplifyWithinBudget } from '../src/core/expr';
import { math } from '../src/core/math';

export interface Adversarial { name: string; node: MathNode }

function tower(depth: number): string {
  let s = 'x';
  for (let i = 0; i < depth; i++) s = `exp(${s})`;
  return s;
}

function sumOfSigmoids(n: number): string {
  return Array.from({ length: n }, (_, i) => `1 / (1 + exp(-${(i + 1) * 0.37} * x + ${i * 0.11}))`).join(' + ');
}

/**
 * The n-th derivative as derive() would reach it: each earlier derivative simplified within budget,
 * the last one raw (that is what simplify is handed). Undefined when the engine refuses to grow the
 * derivative further (its node limit).
 */
function nth(text: string, n: number): MathNode | undefined {
  let node = parseFormula(text, { variable: 'x' }).node;
  try {
    for (let i = 0; i < n; i++) {
      node = differentiate(node, 'x');
      if (i < n - 1) node = simplifyWithinBudget(node).node;
    }
  } catch (e) {
    if (e instanceof SlopewiseError) return undefined;
    throw e;
  }
  return node;
}

function push(out: Adversarial[], name: string, node: MathNode | undefined): void {
  if (node) out.push({ name, node });
}

export function adversarialInputs(quick: boolean): Adversarial[] {
  const out: Adversarial[] = [];
  const towers = quick ? [8, 16] : [12, 16, 20, 24, 30, 40];
  for (const d of towers) {
    out.push({ name: `exp tower ${d}`, node: math.parse(tower(d)) });
    push(out, `d/dx exp tower ${d}`, nth(tower(d), 1));
  }
  for (const n of quick ? [8] : [8, 16, 24, 32]) out.push({ name: `sum of ${n} sigmoids`, node: math.parse(sumOfSigmoids(n)) });
  const comps: [string, string][] = [
    ['BCE∘σ', '-(0.3 * log(1 / (1 + exp(-x))) + 0.7 * log(1 - 1 / (1 + exp(-x))))'],
    ['mish∘gelu_tanh', 'mish(gelu_tanh(x))'],
    ['softplus∘silu∘tanh', 'softplus(silu(tanh(x)))'],
    ['σ∘σ∘σ', 'sigmoid(sigmoid(sigmoid(x)))'],
  ];
  for (const [name, text] of comps) {
    for (const n of quick ? [2] : [2, 3, 4, 5]) push(out, `d${n}/dx${n} ${name}`, nth(text, n));
  }
  return out;
}
