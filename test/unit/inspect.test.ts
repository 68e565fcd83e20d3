// inspect(): the engine fields (canonical text and derivatives evaluable by the full mathjs package
// with only the variable and parameters in scope), the analysis fields, errors, and the cache.
import * as assert from 'node:assert/strict';
import { evaluate } from 'mathjs';
import { SlopewiseError } from '../../src/core/errors';
import { clearInspectCache, inspect } from '../../src/core/inspect';

describe('inspect', () => {
  beforeEach(() => clearInspectCache());

  it('returns the engine fields, stock-mathjs evaluable with only the variable and parameters', () => {
    const r = inspect('elu(x, alpha)', { params: { alpha: 0.5 }, analysis: false });
    assert.equal(r.variable, 'x');
    assert.deepEqual(r.parameters, { alpha: 0.5 });
    assert.deepEqual(r.unbound, []);
    for (const [text, x, expected] of [
      [r.expression, -1, 0.5 * Math.expm1(-1)], [r.derivative, -1, 0.5 * Math.exp(-1)], [r.secondDerivative, -1, 0.5 * Math.exp(-1)],
      [r.expression, 2, 2], [r.derivative, 2, 1], [r.secondDerivative, 2, 0],
    ] as const) {
      // Full mathjs, nothing in scope but x and alpha (stock evaluability, as the issue requires).
      const v = evaluate(text, { x, alpha: 0.5 }) as number;
      assert.ok(Math.abs(v - expected) < 1e-14, `${text} at ${x}: ${v} vs ${expected}`);
    }
    assert.equal(r.derivativeDisplay, 'x > 0 ? 1 : e^x·α');
  });

  it('includes the analysis fields of issue 4', () => {
    const r = inspect('sigmoid(x)');
    assert.equal(r.recognised, 'sigmoid');
    assert.equal(r.threshold, 0.01);
    assert.ok(Array.isArray(r.saturation));
    assert.ok(Array.isArray(r.kinks));
    assert.ok(r.floatLimits && 'float16' in r.floatLimits);
    assert.equal(typeof r.lipschitz, 'number');
    // σ′ peaks at 1/4 (σ′ = σ(1 − σ) ≤ 1/4, by AM–GM).
    assert.ok(Math.abs((r.lipschitz as number) - 0.25) < 1e-6);
  });

  it('reports unbound parameters instead of guessing them', () => {
    const r = inspect('x > 0 ? x : k * x');
    assert.deepEqual(r.unbound, ['k']);
    assert.ok(r.skipped && r.skipped.length > 0);
  });

  it('throws SlopewiseError with a position for bad input', () => {
    assert.throws(() => inspect('x + fooo(x)'), (e: unknown) => e instanceof SlopewiseError && e.code === 'unknown-function' && e.position === 4);
  });

  it('options out of range are a SlopewiseError, not a RangeError', () => {
    assert.throws(() => inspect('tanh(x)', { saturationThreshold: -1 }), (e: unknown) => e instanceof SlopewiseError && e.code === 'bad-argument');
  });

  it('caches by input and options', () => {
    const a = inspect('tanh(x)', { analysis: false });
    assert.equal(inspect('tanh(x)', { analysis: false }), a);
    assert.notEqual(inspect('tanh(x)', { analysis: false, params: { q: 1 } }), a);
    assert.notEqual(inspect('tanh(z)', { analysis: false }), a);
  });

  it('keeps Greek names in display and LaTeX', () => {
    const r = inspect('λ·x', { analysis: false, params: { lambda: 2 } });
    assert.equal(r.expressionDisplay, 'λ·x');
    assert.match(r.latex.expression, /\\lambda/);
  });
});
