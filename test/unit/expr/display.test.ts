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
