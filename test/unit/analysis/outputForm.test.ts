import { strict as assert } from 'node:assert';
import { analyzeFormula } from '../../../src/core/analysis';
import { math } from '../../../src/core/math';
import { formula, SIGMOID, RELU, ELU, SELU, SOFTSIGN, HARDTANH, GELU_TANH, SWISH } from './helpers';

// algebrite ships no types.
// eslint-disable-next-line @typescript-eslint/no-require-imports
const Algebrite = require('algebrite') as { run(s: string): string };

function inOutput(expr: string, opts: { derivative?: string; params?: Record<string, number> } = {}): string | null | undefined {
  const { formula: f, derivs } = formula(expr, opts);
  return analyzeFormula(f, derivs, { parts: ['derivativeInOutput'] }).derivativeInOutput;
}

/** The expression in y must be stock mathjs: evaluate it with plain mathjs and compare with f′. */
function agrees(text: string, f: (x: number) => number, df: (x: number) => number, params: Record<string, number> = {}): void {
  const node = math.parse(text);
  for (let x = -9.7; x <= 9.7; x += 0.31) {
    const got = node.evaluate({ y: f(x), ...params }) as number;
    assert.ok(Math.abs(got - df(x)) < 1e-9, `${text} at x = ${x}: ${got} vs ${df(x)}`);
  }
}

const sig = (x: number): number => 1 / (1 + Math.exp(-x));

describe('analysis: derivative in terms of the output', () => {
  it('sigmoid: y(1 − y) (handbook identity σ′ = σ(1 − σ))', () => {
    const t = inOutput(SIGMOID);
    assert.equal(t, 'y * (1 - y)');
    agrees(t as string, sig, (x) => sig(x) * (1 - sig(x)));
  });
  it('tanh: 1 − y² (handbook identity tanh′ = sech² = 1 − tanh²)', () => {
    assert.equal(inOutput('tanh(x)'), '1 - y ^ 2');
  });
  it('exp: y; softplus: 1 − e^(−y) (σ(x) = 1 − e^(−softplus(x)))', () => {
    assert.equal(inOutput('exp(x)'), 'y');
    const t = inOutput('log(1 + exp(x))');
    assert.equal(t, '1 - exp(-y)');
    agrees(t as string, (x) => Math.log1p(Math.exp(x)), sig);
  });
  it('ReLU: [y > 0], as a conditional in y', () => {
    const t = inOutput(RELU.f, { derivative: RELU.d });
    assert.equal(t, 'y <= 0 ? 0 : 1');
    agrees(t as string, (x) => Math.max(x, 0), (x) => (x > 0 ? 1 : 0));
  });
  it('ELU: y + α below 0, 1 above (named parameter kept)', () => {
    const params = { alpha: 1.5 };
    const t = inOutput(ELU.f, { derivative: ELU.d, params });
    assert.equal(t, 'y < 0 ? y + alpha : 1');
    agrees(t as string, (x) => (x > 0 ? x : 1.5 * Math.expm1(x)), (x) => (x > 0 ? 1 : 1.5 * Math.exp(x)), params);
  });
  it('SELU: y + λα below 0, λ above', () => {
    assert.equal(inOutput(SELU.f, { derivative: SELU.d, params: SELU.params }), 'y < 0 ? y + lambda * alpha : lambda');
  });
  it('hardtanh: 1 inside, 0 on the flat branches', () => {
    assert.equal(inOutput(HARDTANH.f, { derivative: HARDTANH.d }), 'y <= -1 ? 0 : (y < 1 ? 1 : 0)');
  });
  it('softsign: (1 − |y|)², found piecewise', () => {
    const t = inOutput(SOFTSIGN.f, { derivative: SOFTSIGN.d });
    assert.ok(t);
    agrees(t as string, (x) => x / (1 + Math.abs(x)), (x) => 1 / (1 + Math.abs(x)) ** 2);
  });
  it('the forms found agree with derivatives taken by the independent CAS algebrite (npm)', () => {
    // algebrite differentiates f itself; our form in y, with y := f(x), must equal it.
    for (const f of ['1/(1+exp(-x))', 'tanh(x)', 'log(1+exp(x))', 'exp(x)']) {
      const g = inOutput(f);
      assert.ok(g, f);
      const diff = `d(${f},x) - (${(g as string).replace(/\by\b/g, `(${f})`)})`;
      for (const x0 of ['-3/2', '1/3', '5/2']) {
        const v = parseFloat(Algebrite.run(`float(subst(${x0}, x, ${diff}))`));
        assert.ok(Math.abs(v) < 1e-5, `${f} at ${x0}: ${v}`);
      }
    }
  });
  it('none for GELU, swish and x² (y does not determine x, or no such form)', () => {
    assert.equal(inOutput(GELU_TANH), null);
    assert.equal(inOutput(SWISH), null);
    assert.equal(inOutput('x ^ 2'), null);
  });
});
