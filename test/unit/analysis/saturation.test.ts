import { strict as assert } from 'node:assert';
import { analyzeFormula } from '../../../src/core/analysis';
import { formula, SIGMOID, RELU, HARDTANH } from './helpers';

const close = (a: number | null | undefined, b: number, tol: number, what: string): void => {
  assert.ok(typeof a === 'number' && Math.abs(a - b) <= tol, `${what}: ${a} vs ${b}`);
};

describe('analysis: saturating and dead intervals', () => {
  for (const t of [0.01, 0.05, 0.2]) {
    it(`sigmoid saturates where σ(1 − σ) = ${t} (derived closed form)`, () => {
      // σ(1 − σ) = t ⇔ σ = (1 ± √(1 − 4t))/2 ⇔ x = ±ln((1 + √(1 − 4t)) / (1 − √(1 − 4t))).
      const r = Math.sqrt(1 - 4 * t);
      const edge = Math.log((1 + r) / (1 - r));
      const { formula: f, derivs } = formula(SIGMOID);
      const a = analyzeFormula(f, derivs, { saturationThreshold: t, parts: ['saturation'] });
      assert.equal(a.threshold, t);
      assert.equal(a.saturation?.length, 2);
      const [left, right] = a.saturation ?? [];
      assert.equal(left?.from, null);
      close(left?.to, -edge, 1e-9, 'left edge');
      close(right?.from, edge, 1e-9, 'right edge');
      assert.equal(right?.to, null);
      assert.ok(a.saturation?.every((s) => s.kind === 'saturating'));
    });
  }
  it('tanh saturates where 1 − tanh² = t, i.e. |x| = atanh(√(1 − t)) (derived closed form)', () => {
    const { formula: f, derivs } = formula('tanh(x)');
    const a = analyzeFormula(f, derivs, { parts: ['saturation'] });
    const edge = Math.atanh(Math.sqrt(1 - 0.01));
    close(a.saturation?.[0]?.to, -edge, 1e-9, 'left');
    close(a.saturation?.[1]?.from, edge, 1e-9, 'right');
  });
  it('ReLU is dead on (−∞, 0], not saturating: f′ is identically 0 there', () => {
    const { formula: f, derivs } = formula(RELU.f, { derivative: RELU.d });
    const a = analyzeFormula(f, derivs, { parts: ['saturation'] });
    assert.deepEqual(a.saturation, [{ from: null, to: 0, kind: 'dead' }]);
  });
  it('hardtanh is dead outside [−1, 1]', () => {
    const { formula: f, derivs } = formula(HARDTANH.f, { derivative: HARDTANH.d });
    const a = analyzeFormula(f, derivs, { parts: ['saturation'] });
    assert.deepEqual(a.saturation, [{ from: null, to: -1, kind: 'dead' }, { from: 1, to: null, kind: 'dead' }]);
  });
  it('leaky ReLU with slope 0.001 saturates (not dead) for x < 0; with slope 0.1 it does not saturate', () => {
    const small = formula('x > 0 ? x : a * x', { derivative: 'x > 0 ? 1 : a', params: { a: 0.001 } });
    const s = analyzeFormula(small.formula, small.derivs, { parts: ['saturation'] });
    assert.deepEqual(s.saturation, [{ from: null, to: 0, kind: 'saturating' }]);
    const big = formula('x > 0 ? x : a * x', { derivative: 'x > 0 ? 1 : a', params: { a: 0.1 } });
    assert.deepEqual(analyzeFormula(big.formula, big.derivs, { parts: ['saturation'] }).saturation, []);
  });
  it('a leaky slope bound to 0 is dead (structurally zero parameter)', () => {
    const z = formula('x > 0 ? x : a * x', { derivative: 'x > 0 ? 1 : a', params: { a: 0 } });
    assert.deepEqual(analyzeFormula(z.formula, z.derivs, { parts: ['saturation'] }).saturation, [{ from: null, to: 0, kind: 'dead' }]);
  });
  it('sin saturates near each extremum, |cos x| < t ⇔ |x − (k + 1/2)π| < asin(t); the unresolved tail is left out', () => {
    const { formula: f, derivs } = formula('sin(x)');
    const a = analyzeFormula(f, derivs, { parts: ['saturation'] });
    const w = Math.asin(0.01);
    assert.ok((a.saturation?.length ?? 0) >= 12);
    for (const s of a.saturation ?? []) {
      assert.ok(s.from !== null && s.to !== null && Math.abs(s.from) <= 20 && Math.abs(s.to) <= 20);
      const k = Math.round((s.from + s.to) / 2 / Math.PI - 0.5);
      const c = (k + 0.5) * Math.PI;
      assert.ok(Math.abs(s.from - (c - w)) < 1e-9 && Math.abs(s.to - (c + w)) < 1e-9, `${s.from}, ${s.to}`);
    }
    assert.ok(a.notes.some((n) => /oscillates/.test(n)));
  });
  it('x² saturates only near its minimum: |2x| < 0.01 ⇔ |x| < 0.005', () => {
    const { formula: f, derivs } = formula('x ^ 2');
    const a = analyzeFormula(f, derivs, { parts: ['saturation'] });
    assert.equal(a.saturation?.length, 1);
    close(a.saturation?.[0]?.from, -0.005, 1e-9, 'from');
    close(a.saturation?.[0]?.to, 0.005, 1e-9, 'to');
  });
});
