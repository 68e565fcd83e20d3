// Display polishing keeps every value: for each catalogue entry the canonical derivatives and the
// polished display trees are compared with the unsimplified derivatives (as differentiated, no
// simplification) at ≥ 50 points, f′ also with central finite differences of f, and the display text
// is never longer than the display of the unsimplified derivative.
import * as assert from 'node:assert/strict';
import type { MathNode } from 'mathjs';
import { CATALOGUE } from '../../../src/core/expr/catalogue';
import { deriveSteps } from '../../../src/core/expr/derive';
import { derive, differentiateMarked, displayForm, liftConditionals, parseFormula, unmark } from '../../../src/core/expr';
import { expandDisplayNames, polishForDisplay } from '../../../src/core/expr/polish';
import { math } from '../../../src/core/math';
import { assertClose, centralDiff, stockFn } from './support';

/** Full-mathjs evaluation, NaN where the value is not real (log of a negative p, for instance). */
function realFn(expr: string, v: string, params: Record<string, number>): (x: number) => number {
  const f = stockFn(expr, v, params);
  return (x: number) => {
    try { return f(x); } catch { return NaN; }
  };
}

/** Stock-mathjs function of a marked or display tree (σ, softplus, φ, Φ expanded). */
function treeFn(n: MathNode, v: string, params: Record<string, number>): (x: number) => number {
  return realFn(unmark(expandDisplayNames(n)).toString(), v, params);
}

// 64 points on the real line and 64 in (0, 1), shifted by an irrational step so none lands on a
// kink of the catalogue (0, ±1, ±3, 6, |p − y| = δ, …).
const POINTS = [
  ...Array.from({ length: 64 }, (_, i) => -6.4 + i * 0.2 + Math.SQRT2 / 1000),
  ...Array.from({ length: 64 }, (_, i) => 0.012 + i * 0.0153 + Math.SQRT2 / 10000),
];

function inputOf(name: string, args: readonly string[]): string {
  return `${name}(${args.join(', ')})`;
}

interface Case { label: string; input: string; variable: string; extra: Record<string, number> }
const CASES: Case[] = CATALOGUE.map((e) => ({ label: e.name, input: inputOf(e.name, e.args), variable: e.args[0] as string, extra: { y: 0.3 } }));
CASES.push(
  { label: 'bce∘σ', input: 'bce(sigmoid(z), y)', variable: 'z', extra: { y: 0.3 } },
  { label: 'mse∘σ', input: 'mse(sigmoid(x), y)', variable: 'x', extra: { y: 0.3 } },
  { label: 'huber with δ', input: 'huber(x, 0.2, 1.5)', variable: 'x', extra: {} },
  { label: 'silu with β', input: 'silu(x, 1.7)', variable: 'x', extra: {} },
  { label: 'sum of two σ', input: 'sigmoid(2*x) + 3*sigmoid(x - 1)', variable: 'x', extra: {} },
);

describe('polished derivative displays keep their values (every catalogue entry)', () => {
  for (const c of CASES) {
    it(`${c.label}: canonical and display trees agree with the unsimplified f′ and f″`, () => {
      const f = parseFormula(c.input, { variable: c.variable });
      const params = { ...c.extra, ...f.parameters };
      const d = derive(f);
      const steps = deriveSteps(f);
      const raw1 = liftConditionals(differentiateMarked(f.node, c.variable));
      const raw2 = liftConditionals(differentiateMarked(raw1, c.variable));
      const ref1 = treeFn(raw1, c.variable, params);
      const ref2 = treeFn(raw2, c.variable, params);
      const forward = realFn(f.expression, c.variable, params);
      const canon1 = stockFn(d.first, c.variable, params);
      const canon2 = stockFn(d.second, c.variable, params);
      const shown1 = treeFn(steps.first.displayTree, c.variable, params);
      const shown2 = treeFn(steps.second.displayTree, c.variable, params);
      let compared = 0;
      for (const x of POINTS) {
        const r1 = ref1(x);
        const r2 = ref2(x);
        if (!Number.isFinite(r1) || !Number.isFinite(r2) || !Number.isFinite(forward(x))) continue;
        compared++;
        assertClose(canon1(x), r1, 1e-9, `${c.label} canonical f′ at ${x}`);
        assertClose(canon2(x), r2, 1e-9, `${c.label} canonical f″ at ${x}`);
        assertClose(shown1(x), r1, 1e-9, `${c.label} display f′ at ${x}`);
        assertClose(shown2(x), r2, 1e-9, `${c.label} display f″ at ${x}`);
        // Outside check: central differences of f, error O(h²·f‴); the step shrinks near the poles of
        // bce at p = 0 and p = 1 so that the truncation error stays far below the tolerance.
        const h = 1e-5 * Math.min(1, Math.max(1e-3, Math.min(Math.abs(x), Math.abs(1 - x))));
        assertClose(shown1(x), centralDiff(forward, x, h), 1e-5, `${c.label} display f′ vs central difference at ${x}`);
      }
      assert.ok(compared >= 50, `${c.label}: only ${compared} comparable points`);
      assert.equal(steps.first.display, d.firstDisplay);
      assert.ok(d.firstDisplay.length <= displayForm(raw1).length, `${c.label} f′ display grew: ${d.firstDisplay}`);
      assert.ok(d.secondDisplay.length <= displayForm(liftConditionals(differentiateMarked(steps.first.marked, c.variable))).length, `${c.label} f″ display grew: ${d.secondDisplay}`);
    });
  }
});

describe('polishing is bounded', () => {
  it('returns an over-large tree unchanged', () => {
    const big = math.parse(Array.from({ length: 400 }, (_, i) => `sin(${i + 1} * x)`).join(' + '));
    assert.equal(polishForDisplay(big), big);
  });
  it('out of its time budget, polishing returns the tree as derived (no wall-clock assertion: budget 0)', () => {
    const f = parseFormula(Array.from({ length: 16 }, (_, i) => `sigmoid(${i + 1} * x)`).join(' + '));
    const d2 = deriveSteps(f).second.marked;
    assert.equal(polishForDisplay(d2, { budgetMs: 0 }), d2);
  });
  it('a sum with more terms than a layer may hold keeps its value', () => {
    const src = Array.from({ length: 60 }, (_, i) => `${i + 1} * x ^ ${(i % 5) + 1} * exp(${i} * x)`).join(' + ');
    const n = math.parse(src);
    const p = polishForDisplay(n);
    const a = stockFn(src, 'x');
    const b = treeFn(p, 'x', {});
    for (const x of [-0.7, -0.2, 0.15, 0.4]) assertClose(b(x), a(x), 1e-9, `at ${x}`);
  });
});
