// The adversarial set the bench measures: every formula comes back (derivatives or a clean
// SlopewiseError), with f′ matching a central difference of f where it is finite. No timings asserted.
import * as assert from 'node:assert/strict';
import { derive, parseFormula } from '../../../src/core/expr';
import { ADVERSARIAL_FORMULAS, measureEngineWorstCase } from '../../../src/core/expr/adversarial';
import { stockFn } from './support';

describe('adversarial inputs', function () {
  this.timeout(60_000);
  it('measureEngineWorstCase returns one row per formula, slowest first', () => {
    const rows = measureEngineWorstCase(ADVERSARIAL_FORMULAS.slice(0, 3));
    assert.equal(rows.length, 3);
    for (let i = 1; i < rows.length; i++) assert.ok((rows[i - 1] as { ms: number }).ms >= (rows[i] as { ms: number }).ms);
  });

  for (const f of ADVERSARIAL_FORMULAS.filter((a) => !a.name.startsWith('exp tower'))) {
    it(`${f.name}: f′ agrees with a central difference of f`, () => {
      const formula = parseFormula(f.input, f.params ? { params: f.params } : {});
      const d = derive(formula);
      const v = formula.variable;
      const g = stockFn(formula.expression, v, formula.parameters);
      const g1 = stockFn(d.first, v, formula.parameters);
      const h = 1e-6;
      for (const x of [0.13, 0.71]) {
        const fd = (g(x + h) - g(x - h)) / (2 * h);
        assert.ok(Math.abs(g1(x) - fd) <= 1e-5 * Math.max(1, Math.abs(fd)), `${f.name} at ${x}: ${g1(x)} vs ${fd}`);
      }
    });
  }
});
