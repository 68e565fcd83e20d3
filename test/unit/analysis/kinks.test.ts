import { strict as assert } from 'node:assert';
import { analyzeFormula } from '../../../src/core/analysis';
import { formula, RELU, ELU, SOFTSIGN, HARDTANH } from './helpers';

function kinks(expr: string, derivative?: string, params?: Record<string, number>): { kinks?: number[]; discontinuities?: number[] } {
  const { formula: f, derivs } = formula(expr, { ...(derivative ? { derivative } : {}), ...(params ? { params } : {}) });
  return analyzeFormula(f, derivs, { parts: ['kinks'] });
}

describe('analysis: kinks and discontinuities', () => {
  it('ReLU has a kink at 0 (left derivative 0, right 1)', () => {
    assert.deepEqual(kinks(RELU.f, RELU.d).kinks, [0]);
  });
  it('softsign has an abs but no kink: its derivative 1/(1 + |x|)² is continuous', () => {
    const r = kinks(SOFTSIGN.f, SOFTSIGN.d);
    assert.deepEqual(r.kinks, []);
    assert.deepEqual(r.discontinuities, []);
  });
  it('ELU with α = 1 is differentiable at 0; with α = 1.5 it has a kink there', () => {
    assert.deepEqual(kinks(ELU.f, ELU.d, { alpha: 1 }).kinks, []);
    assert.deepEqual(kinks(ELU.f, ELU.d, { alpha: 1.5 }).kinks, [0]);
  });
  it('hardtanh and ReLU6 bend at both ends', () => {
    assert.deepEqual(kinks(HARDTANH.f, HARDTANH.d).kinks, [-1, 1]);
    assert.deepEqual(kinks('min(max(x, 0), 6)', 'x > 0 and x < 6 ? 1 : 0').kinks, [0, 6]);
  });
  it('a step is a discontinuity, not a kink; so is the pole of 1/x', () => {
    const step = kinks('x > 0 ? 1 : 0', '0');
    assert.deepEqual(step.discontinuities, [0]);
    assert.deepEqual(step.kinks, []);
    assert.deepEqual(kinks('1 / x', '-1 / x ^ 2').discontinuities, [0]);
  });
  it('abs(x − 2) bends at 2', () => {
    assert.deepEqual(kinks('abs(x - 2)', 'sign(x - 2)').kinks, [2]);
  });
});
