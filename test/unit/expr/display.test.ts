// Display forms: named functions collapsed back, Unicode operators, decimals kept, Greek restored.
import * as assert from 'node:assert/strict';
import { derive, displayForm, latexForm, parseFormula } from '../../../src/core/expr';

describe('display form', () => {
  it('σ′ reads σ(x)·(1 − σ(x)), not a quotient of exponentials', () => {
    assert.equal(derive(parseFormula('1/(1+exp(-x))')).firstDisplay, 'σ(x)·(1 − σ(x))');
  });
  it('softplus′ = σ and tanh′ = 1 − tanh²', () => {
    assert.equal(derive(parseFormula('log(1 + exp(x))')).firstDisplay, 'σ(x)');
    assert.equal(derive(parseFormula('tanh(x)')).firstDisplay, '1 − tanh(x)²');
  });
  it('restores Greek parameter names and uses Unicode operators', () => {
    assert.equal(displayForm(parseFormula('α·(eˣ − 1)').node), 'α·(e^x − 1)');
    assert.equal(displayForm(parseFormula('lambda * x <= beta ? 1 : alpha').node), 'λ·x ≤ β ? 1 : α');
  });
  it('keeps decimals and writes small integer powers as superscripts', () => {
    assert.equal(displayForm(parseFormula('0.044715 * x^3 - pi').node), '0.044715·x³ − π');
    assert.equal(displayForm(parseFormula('x^(-1)').node), 'x⁻¹');
  });
  it('brackets only where needed', () => {
    assert.equal(displayForm(parseFormula('a - (b - c)').node), 'a − (b − c)');
    assert.equal(displayForm(parseFormula('(a - b) - c').node), 'a − b − c');
    assert.equal(displayForm(parseFormula('x / (y * z)').node), 'x/(y·z)');
    assert.equal(displayForm(parseFormula('-(x^2)').node), '−x²');
  });
  it('LaTeX uses \\sigma for the collapsed sigmoid', () => {
    assert.match(latexForm(parseFormula('x / (1 + exp(-x))').node), /\\sigma/);
  });
});

describe('derivative displays read like the handbook forms', () => {
  const d = (s: string, variable?: string) => derive(parseFormula(s, variable === undefined ? {} : { variable }));
  it('σ″ = σ(1 − σ)(1 − 2σ) and tanh″ = −2·tanh·(1 − tanh²) (handbook identities, from memory)', () => {
    assert.equal(d('sigmoid(x)').secondDisplay, 'σ(x)·(1 − σ(x))·(1 − 2·σ(x))');
    assert.equal(d('tanh(x)').secondDisplay, '−2·tanh(x)·(1 − tanh(x)²)');
    assert.equal(d('softplus(x)').secondDisplay, 'σ(x)·(1 − σ(x))');
  });
  it('GELU = x·Φ(x): f′ = Φ(x) + x·φ(x), f″ = (2 − x²)·φ(x) (Hendrycks & Gimpel 2016; product rule, φ′ = −x·φ)', () => {
    const g = d('gelu(x)');
    assert.equal(g.firstDisplay, 'Φ(x) + x·φ(x)');
    assert.equal(g.secondDisplay, 'φ(x)·(2 − x²)');
    assert.equal(d('normal_pdf(x)').firstDisplay, '−x·φ(x)');
    assert.equal(d('normal_cdf(x)').firstDisplay, 'φ(x)');
  });
  it('folds constant sub-expressions: no √2², √2³ or √π left in the GELU forms', () => {
    for (const s of [d('gelu(x)').secondDisplay, d('normal_cdf(x)').secondDisplay]) assert.doesNotMatch(s, /√/);
  });
  it('d/dz BCE(σ(z), y) = σ(z) − y (common practice: the logistic-loss gradient)', () => {
    const b = d('bce(sigmoid(z), y)', 'z');
    assert.equal(b.firstDisplay, 'σ(z) − y');
    assert.equal(b.secondDisplay, 'σ(z)·(1 − σ(z))');
  });
  it('over a common denominator: (a·x/(1 + |x|))′ = a/(1 + |x|)², (x/(1 + x²))′ = (1 − x²)/(1 + x²)² (quotient rule)', () => {
    // quotient rule: (u/v)′ = (u′v − uv′)/v², with u = 1.5·x, v = 1 + |x|, v′ = sign(x) and x·sign(x) = |x|
    assert.equal(d('1.5*x/(1+abs(x))').firstDisplay, '1.5/(1 + |x|)²');
    assert.equal(d('1.5*x/(1+abs(x))').secondDisplay, '−3·sign(x)/(1 + |x|)³');
    assert.equal(d('x/(1+x^2)').firstDisplay, '(1 − x²)/(x² + 1)²');
  });
  it('softsign′ = 1/(1 + |x|)², log-cosh′ = tanh, SiLU′ = σ·(1 + x·(1 − σ)) (from memory)', () => {
    assert.equal(d('softsign(x)').firstDisplay, '1/(1 + |x|)²');
    assert.equal(d('softsign(x)').secondDisplay, '−2·sign(x)/(1 + |x|)³');
    assert.equal(d('log_cosh(p, y)', 'p').firstDisplay, 'tanh(p − y)');
    assert.equal(d('silu(x)').firstDisplay, 'σ(x)·(1 + x·(1 − σ(x)))');
  });
  it('conditions read as plain thresholds: max(x, 0) < 6 is x < 6, x + 3 > 0 is x > −3 (exact over the reals)', () => {
    assert.equal(d('relu6(x)').firstDisplay, 'x < 6 ? (x > 0 ? 1 : 0) : 0');
    assert.equal(d('hardsigmoid(x)').firstDisplay, 'x < 3 ? (x > −3 ? 1/6 : 0) : 0');
    assert.equal(d('hardtanh(x)').firstDisplay, 'x < 1 ? (x > −1 ? 1 : 0) : 0');
  });
  it('reduces integer fractions and keeps the canonical form stock mathjs', () => {
    assert.match(d('hardswish(x)').secondDisplay, /1\/3/);
    const g = d('gelu(x)');
    assert.doesNotMatch(g.first + g.second, /normal_|sigmoid|softplus/);
  });
});
