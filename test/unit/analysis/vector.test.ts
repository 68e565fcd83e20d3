import { strict as assert } from 'node:assert';
import { vectorForms } from '../../../src/core/analysis';
import { softmax, softmaxJacobian, logSoftmax, logSoftmaxVjp, softmaxVjp } from '../../../src/core/analysis/vector';

describe('analysis: softmax and log-softmax', () => {
  it('softmax Jacobian diag(p) − ppᵀ and its VJP match central differences of the definition', () => {
    const v = vectorForms('softmax');
    assert.ok(v.check.jacobianMaxError < 1e-8, String(v.check.jacobianMaxError));
    assert.ok(v.check.vjpMaxError < 1e-8, String(v.check.vjpMaxError));
    assert.match(v.jacobian, /p_i \* \(delta_ij - p_j\)/);
  });
  it('log-softmax Jacobian I − 1pᵀ and its VJP match central differences', () => {
    const v = vectorForms('log-softmax');
    assert.ok(v.check.jacobianMaxError < 1e-8);
    assert.ok(v.check.vjpMaxError < 1e-8);
  });
  it('columns of the softmax Jacobian sum to 0 (Σ p_i = 1 for every x, handbook identity)', () => {
    const J = softmaxJacobian([0.3, -1.2, 2.5, 0]);
    for (let j = 0; j < 4; j++) assert.ok(Math.abs(J.reduce((s, row) => s + (row[j] as number), 0)) < 1e-16);
  });
  it('shifted forms stay finite for large logits, where exp overflows double', () => {
    const x = [1000, 999, 990];
    assert.ok(softmax(x).every(Number.isFinite));
    assert.ok(logSoftmax(x).every(Number.isFinite));
    assert.ok(Math.abs(logSoftmax(x)[0] as number + Math.log(1 + Math.exp(-1) + Math.exp(-10))) < 1e-12);
    // Both outputs are unchanged by adding a constant to every logit, so every VJP sums to 0
    // (Σ_j v_j = Σg − Σg·Σp for log-softmax, Σ p_j(g_j − ḡ) = 0 for softmax).
    const sum = (v: number[]): number => v.reduce((a, b) => a + b, 0);
    assert.ok(Math.abs(sum(logSoftmaxVjp(x, [0.3, -1, 2]))) < 1e-12);
    assert.ok(Math.abs(sum(softmaxVjp(x, [0.3, -1, 2]))) < 1e-12);
    // and a uniform upstream gradient gives softmax's VJP exactly 0
    assert.ok(softmaxVjp(x, [2, 2, 2]).every((g) => Math.abs(g) < 1e-15));
  });
});
