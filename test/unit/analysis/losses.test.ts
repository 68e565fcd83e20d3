import { strict as assert } from 'node:assert';
import { analyzePairing } from '../../../src/core/analysis';
import { math } from '../../../src/core/math';
import { SlopewiseError } from '../../../src/core/errors';
import { formula, SIGMOID } from './helpers';

const sig = (z: number): number => 1 / (1 + Math.exp(-z));

/** The form in p and y must be stock mathjs and equal dL/dz computed by central differences. */
function checkForm(text: string, f: (z: number) => number, L: (p: number, y: number) => number, targets: number[]): void {
  const node = math.parse(text);
  for (const y of targets) {
    for (let z = -6; z <= 6; z += 0.37) {
      const h = 1e-5;
      const fd = (L(f(z + h), y) - L(f(z - h), y)) / (2 * h);
      const got = node.evaluate({ p: f(z), y }) as number;
      assert.ok(Math.abs(got - fd) < 1e-6 * Math.max(1, Math.abs(fd)), `${text} at z = ${z}, y = ${y}: ${got} vs ${fd}`);
    }
  }
}

describe('analysis: losses composed with activations', () => {
  it('sigmoid with binary cross-entropy: dL/dz = p − y (common practice; checked by finite differences)', () => {
    const r = analyzePairing(formula(SIGMOID, { recognised: 'sigmoid' }).formula, 'bce');
    assert.equal(r.loss, 'binary-cross-entropy');
    assert.equal(r.gradientInOutput, 'p - y');
    assert.equal(r.starves, false);
    checkForm('p - y', sig, (p, y) => -(y * Math.log(p) + (1 - y) * Math.log(1 - p)), [0, 0.3, 1]);
  });
  it('sigmoid with squared error starves: dL/dz = 2(p − y)p(1 − p) vanishes where the prediction is confidently wrong', () => {
    const r = analyzePairing(formula(SIGMOID, { recognised: 'sigmoid' }).formula, 'mse');
    assert.equal(r.gradientInOutput, '2 * (p - y) * p * (1 - p)');
    checkForm(r.gradientInOutput as string, sig, (p, y) => (p - y) ** 2, [0, 0.5, 1]);
    assert.equal(r.starves, true);
    assert.match(r.message ?? '', /starves the gradient/);
    // Derived edge for target 0: |dL/dz| = 2p²(1 − p) peaks at p = 2/3 (8/27); starved once
    // 2p²(1 − p) < 0.01·8/27 with p ≥ 1/2 (loss above its value at the midpoint).
    let lo = 0.5;
    let hi = 1;
    for (let i = 0; i < 100; i++) {
      const m = (lo + hi) / 2;
      if (2 * m * m * (1 - m) < 0.08 / 27) hi = m;
      else lo = m;
    }
    const edge = Math.log(lo / (1 - lo));
    const t0 = r.starved.find((s) => s.target === 0);
    assert.equal(t0?.to, null);
    assert.ok(Math.abs((t0?.from ?? 0) - edge) < 1e-6, `${t0?.from} vs ${edge}`);
    const t1 = r.starved.find((s) => s.target === 1);
    assert.equal(t1?.from, null);
    assert.ok(Math.abs((t1?.to ?? 0) + edge) < 1e-6);
  });
  it('tanh with squared error: 2(p − y)(1 − p²), and it starves too', () => {
    const r = analyzePairing(formula('tanh(x)').formula, 'squared-error');
    assert.equal(r.gradientInOutput, '2 * (p - y) * (1 - p ^ 2)');
    checkForm(r.gradientInOutput as string, Math.tanh, (p, y) => (p - y) ** 2, [-1, 0, 1]);
    assert.equal(r.starves, true);
  });
  it('identity with squared error does not starve', () => {
    const r = analyzePairing(formula('x').formula, 'mse');
    assert.equal(r.gradientInOutput, '2 * (p - y)');
    assert.equal(r.starves, false);
  });
  it('softmax with cross-entropy: ∂L/∂z = p − y, checked against central differences', () => {
    const r = analyzePairing('softmax', 'cross-entropy');
    assert.equal(r.gradientInOutput, 'p - y');
    assert.ok((r.check?.maxError ?? 1) < 1e-7);
  });
  it('refuses unknown losses and mismatched vector pairings', () => {
    assert.throws(() => analyzePairing(formula(SIGMOID).formula, 'hinge-of-doom'), SlopewiseError);
    assert.throws(() => analyzePairing('softmax', 'mse'), SlopewiseError);
    assert.throws(() => analyzePairing(formula(SIGMOID).formula, 'cross-entropy'), SlopewiseError);
  });
});
