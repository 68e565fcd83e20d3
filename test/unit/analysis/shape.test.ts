import { strict as assert } from 'node:assert';
import { analyzeFormula, type Analysis } from '../../../src/core/analysis';
import { formula, SIGMOID, RELU, ELU, SELU, SOFTSIGN, HARDTANH, GELU_TANH, SWISH } from './helpers';

function analyse(expr: string, opts: { derivative?: string; params?: Record<string, number> } = {}): Analysis {
  const { formula: f, derivs } = formula(expr, opts);
  return analyzeFormula(f, derivs, { parts: ['shape', 'gain', 'kinks'] });
}

/** Lambert W on (0, ∞) by Newton's method on w·e^w = a (independent of the code under test). */
function lambertW(a: number): number {
  let w = 0.5;
  for (let i = 0; i < 50; i++) w -= (w * Math.exp(w) - a) / (Math.exp(w) * (1 + w));
  return w;
}

describe('analysis: range, monotonicity, Lipschitz bound', () => {
  it('sigmoid: range (0, 1) not attained, increasing, sup σ′ = 1/4 at 0 (σ′ = σ(1 − σ) ≤ 1/4, handbook)', () => {
    const a = analyse(SIGMOID);
    assert.deepEqual(a.range, { inf: 0, sup: 1, infAttained: false, supAttained: false });
    assert.equal(a.monotone, 'increasing');
    assert.equal(a.lipschitz, 0.25);
    assert.equal(a.lipschitzAt, 0);
  });
  it('ReLU: range [0, ∞), non-decreasing, Lipschitz 1 from 0 on', () => {
    const a = analyse(RELU.f, { derivative: RELU.d });
    assert.deepEqual(a.range, { inf: 0, sup: null, infAttained: true, supAttained: false });
    assert.equal(a.monotone, 'non-decreasing');
    assert.equal(a.lipschitz, 1);
    assert.equal(a.lipschitzAt, 0);
  });
  it('softsign: range (−1, 1), approached only at ±∞', () => {
    const a = analyse(SOFTSIGN.f, { derivative: SOFTSIGN.d });
    assert.deepEqual(a.range, { inf: -1, sup: 1, infAttained: false, supAttained: false });
    assert.equal(a.monotone, 'increasing');
  });
  it('hardtanh: range [−1, 1] attained on flat branches', () => {
    const a = analyse(HARDTANH.f, { derivative: HARDTANH.d });
    assert.deepEqual(a.range, { inf: -1, sup: 1, infAttained: true, supAttained: true });
    assert.equal(a.monotone, 'non-decreasing');
  });
  it('swish x·σ(x): minimum −W(1/e) (derived: f′ = 0 ⇔ 1 + x(1 − σ) = 0), not monotone', () => {
    // Setting x = −1 − W(1/e) solves 1 + x(1 − σ(x)) = 0 and gives f(x) = −W(1/e) ≈ −0.278465.
    const a = analyse(SWISH);
    const w = lambertW(Math.exp(-1));
    assert.ok(Math.abs((a.range?.inf ?? 0) + w) < 1e-9, `${a.range?.inf} vs ${-w}`);
    assert.equal(a.range?.infAttained, true);
    assert.equal(a.range?.sup, null);
    assert.equal(a.monotone, 'none');
  });
  it('softplus: sup f′ = 1 is only approached as x → +∞', () => {
    const a = analyse('log(1 + exp(x))');
    assert.equal(a.lipschitz, 1);
    assert.equal(a.lipschitzAt, '+inf');
    assert.deepEqual(a.range, { inf: 0, sup: null, infAttained: false, supAttained: false });
  });
  it('x² and exp have no Lipschitz bound; −x is decreasing', () => {
    assert.equal(analyse('x ^ 2').lipschitz, null);
    assert.equal(analyse('exp(x)').lipschitz, null);
    assert.equal(analyse('-x').monotone, 'decreasing');
    assert.equal(analyse('3 + 0 * x').monotone, 'constant');
  });
  it('only the domain counts: log x is increasing (f′ = 1/x is negative where log is undefined)', () => {
    const a = analyse('log(x)');
    assert.equal(a.monotone, 'increasing');
    assert.deepEqual(a.range, { inf: null, sup: null, infAttained: false, supAttained: false });
  });
  it('1/x: a pole at 0, unbounded both ways, not monotone on ℝ (it jumps up across 0), no Lipschitz bound', () => {
    const a = analyse('1 / x');
    assert.deepEqual(a.discontinuities, [0]);
    assert.deepEqual(a.range, { inf: null, sup: null, infAttained: false, supAttained: false });
    assert.equal(a.monotone, 'none');
    assert.equal(a.lipschitz, null);
  });
  it('a step is non-decreasing though f′ = 0 wherever it is defined; √|x| has no Lipschitz bound at 0', () => {
    assert.equal(analyse('x > 0 ? 1 : 0', { derivative: '0' }).monotone, 'non-decreasing');
    assert.equal(analyse('x > 0 ? 0 : 1', { derivative: '0' }).monotone, 'non-increasing');
    assert.equal(analyse('sqrt(abs(x))', { derivative: 'sign(x) / (2 * sqrt(abs(x)))' }).lipschitz, null);
  });
  it('GELU (tanh form) is not monotone and dips to about −0.17', () => {
    const a = analyse(GELU_TANH);
    assert.equal(a.monotone, 'none');
    // Independent check: brute-force minimum on a fine grid of the same formula.
    let min = Infinity;
    for (let x = -3; x <= 0; x += 1e-5) min = Math.min(min, 0.5 * x * (1 + Math.tanh(Math.sqrt(2 / Math.PI) * (x + 0.044715 * x ** 3))));
    assert.ok(Math.abs((a.range?.inf ?? 0) - min) < 1e-9);
  });
});

describe('analysis: moments under z ~ N(0, 1)', () => {
  it('ReLU gain is √2 and E[f′²] = 1/2 (He et al. 2015: E[relu(z)²] = Var(z)/2)', () => {
    const a = analyse(RELU.f, { derivative: RELU.d });
    assert.ok(Math.abs((a.gain ?? 0) - Math.SQRT2) < 1e-12);
    assert.ok(Math.abs((a.derivativeMeanSquare ?? 0) - 0.5) < 1e-12);
    // E[relu(z)] = 1/√(2π) (half-normal mean / 2, handbook)
    assert.ok(Math.abs((a.outputMean ?? 0) - 1 / Math.sqrt(2 * Math.PI)) < 1e-12);
  });
  it('SELU keeps mean 0 and second moment 1 for z ~ N(0, 1) (Klambauer et al. 2017, the fixed point)', () => {
    const a = analyse(SELU.f, { derivative: SELU.d, params: SELU.params });
    assert.ok(Math.abs(a.outputMean ?? 1) < 1e-9, `mean ${a.outputMean}`);
    assert.ok(Math.abs((a.outputMeanSquare ?? 0) - 1) < 1e-9, `E[f²] ${a.outputMeanSquare}`);
    assert.ok(Math.abs((a.gain ?? 0) - 1) < 1e-9);
    assert.equal(a.zeroCentred, true);
  });
  it('ELU: E[f] = e^(1/2)·Φ(−1)·α − α/2 + 1/√(2π) (derived from the lognormal partial mean)', () => {
    // E[(e^z − 1); z < 0] = e^{1/2} Φ(−1) − 1/2 (lognormal partial mean); Φ(−1) = 0.15865525393145707 (from memory).
    const alpha = 1.5;
    const want = alpha * (Math.exp(0.5) * 0.15865525393145707 - 0.5) + 1 / Math.sqrt(2 * Math.PI);
    const a = analyse(ELU.f, { derivative: ELU.d, params: { alpha } });
    assert.ok(Math.abs((a.outputMean ?? 0) - want) < 1e-12, `${a.outputMean} vs ${want}`);
  });
  it('x: E[x²] = 1 so the gain is 1; tanh is zero-centred, sigmoid is not', () => {
    const lin = analyse('x');
    assert.ok(Math.abs((lin.gain ?? 0) - 1) < 1e-13);
    assert.equal(analyse('tanh(x)').zeroCentred, true);
    assert.equal(analyse(SIGMOID).zeroCentred, false);
    assert.ok(Math.abs((analyse(SIGMOID).outputMean ?? 0) - 0.5) < 1e-13); // σ(z) − 1/2 is odd
  });
});
