// Simplification under a budget: adversarial inputs (deep exp towers, sums of many sigmoids, f″ of
// BCE∘σ) come back with a value-preserving result and, when skipped, a note — never unbounded.
// No wall-clock assertions: budgets are checked through the `simplified` flag and notes.
import * as assert from 'node:assert/strict';
import { derive, differentiate, differentiateMarked, measureSimplifyWorstCase, parseFormula, simplifyWithinBudget, unmark } from '../../../src/core/expr';
import { math } from '../../../src/core/math';
import { assertClose, stockFn } from './support';

function tower(n: number): string {
  let s = 'x';
  for (let i = 0; i < n; i++) s = `exp(${s})`;
  return s;
}

describe('simplify within budget', () => {
  it('never keeps a rewrite that is wrong on the real line: d/dx √(x·x) = sign(x), not 1 (found by the fuzzer)', () => {
    // handbook identity: √(x²) = |x| and d|x|/dx = sign(x) for x ≠ 0. mathjs's default rules rewrite
    // (x^2)^0.5 → x, which is only true for x ≥ 0.
    const f = math.parse('(x*x)^0.5');
    const d = derive(parseFormula('(x*x)^0.5'));
    const df = stockFn(d.first, 'x');
    for (const x of [-3.7, -0.4, 0.25, 2.2]) assertClose(df(x), Math.sign(x), 1e-12, `f′(${x})`);
    const r = simplifyWithinBudget(differentiate(f, 'x'));
    assert.equal(r.simplified, false);
    assert.match(r.note ?? '', /changed values/);
    // softsign(√(x·x)) + x·σ(x): the fuzzer's input, f′ at −7.31 against central differences
    const g = derive(parseFormula('x*sigmoid(x) + softsign((x*x)^0.5)'));
    const gv = stockFn(g.first, 'x');
    const F = (x: number) => x / (1 + Math.exp(-x)) + Math.abs(x) / (1 + Math.abs(x));
    const h = 1e-5;
    assertClose(gv(-7.31), (F(-7.31 + h) - F(-7.31 - h)) / (2 * h), 1e-6, 'f′(−7.31)');
  });

  it('keeps decimals (no giant fractions)', () => {
    const r = simplifyWithinBudget(math.parse('0.044715 * x^3 * 3'));
    assert.equal(r.simplified, true);
    assert.match(r.node.toString(), /0\.134145/);
  });

  it('a 24-deep exp tower (over a minute in plain mathjs simplify) comes back, value preserved, f″ skipped with a note', () => {
    const f = math.parse(tower(24));
    const d = differentiateMarked(f, 'x');
    const r = simplifyWithinBudget(d);
    // Either simplified layer by layer within the budget, or returned unsimplified with a note.
    assert.ok(r.simplified || (r.note ?? '').length > 0);
    const a = stockFn(unmark(d).toString(), 'x');
    const b = stockFn(unmark(r.node).toString(), 'x');
    // Every real point overflows a 24-deep tower; both forms must agree on that.
    assert.equal(b(-30), a(-30));
    const small = differentiateMarked(math.parse(tower(4)), 'x');
    const rs = simplifyWithinBudget(small);
    const s1 = stockFn(unmark(small).toString(), 'x');
    const s2 = stockFn(unmark(rs.node).toString(), 'x');
    for (const x of [-3, -1, 0, 0.3]) assertClose(s2(x), s1(x), 1e-12, `4-deep tower′(${x})`);
    const both = derive(parseFormula(tower(24)));
    assert.match(both.simplifyNote ?? '', /f″: Not simplified: the expression has more than 400 nodes/);
  });

  it('a zero budget falls back to the cleaned form and says so', () => {
    const d = differentiateMarked(parseFormula('gelu(x)').node, 'x');
    const r = simplifyWithinBudget(d, { budgetMs: 0 });
    assert.equal(r.simplified, false);
    assert.match(r.note ?? '', /budget/);
    const a = stockFn(unmark(d).toString(), 'x');
    const b = stockFn(unmark(r.node).toString(), 'x');
    for (const x of [-1.3, 0.2, 2.1]) assertClose(b(x), a(x), 1e-13, `gelu′(${x})`);
  });

  it('derive() reports an out-of-budget simplification in simplifyNote', () => {
    const d = derive(parseFormula('gelu_tanh(x)'), { budgetMs: 0 });
    assert.match(d.simplifyNote ?? '', /budget/);
  });

  it('sums of many sigmoids and f″ of BCE∘σ stay value-preserving', () => {
    const sum = Array.from({ length: 16 }, (_, i) => `sigmoid(${i + 1} * x)`).join(' + ');
    for (const s of [sum, 'bce(sigmoid(z), y)']) {
      const f = parseFormula(s, { params: { y: 0.25 } });
      const d = derive(f);
      const d1 = stockFn(d.first, f.variable, f.parameters);
      const d2 = stockFn(d.second, f.variable, f.parameters);
      const h = 1e-5;
      for (const x of [-1.1, 0.3, 1.7]) assertClose(d2(x), (d1(x + h) - d1(x - h)) / (2 * h), 2e-5, `${s.slice(0, 20)} f″(${x})`);
    }
  });

  it('measureSimplifyWorstCase reports one time per input and the slowest index', () => {
    const inputs = [math.parse('x + x'), differentiateMarked(parseFormula('mish(x)').node, 'x')];
    const m = measureSimplifyWorstCase(inputs);
    assert.equal(m.times.length, 2);
    assert.ok(m.worstIndex === 0 || m.worstIndex === 1);
    assert.equal(m.worstMs, Math.max(...m.times));
  });
});
