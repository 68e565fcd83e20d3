// Pairing derivatives with forwards, the input/output form, parameter binding, upstream factors,
// batch means, comment-vs-code and the float and pairing warnings.
import * as assert from 'node:assert/strict';
import { checkSource, checkText } from '../../../src/core/check/index';
import { compareFunctions, withinTolerance, REL_TOLERANCE, ABS_TOLERANCE } from '../../../src/core/check/compare';
import { derivativeBase } from '../../../src/core/detect/index';

// algebrite ships no types.
// eslint-disable-next-line @typescript-eslint/no-require-imports
const Algebrite = require('algebrite') as { run(s: string): string };

const py = (lines: string[]): string => lines.join('\n') + '\n';
const rules = (src: string, fileName = 'a.py'): string[] => checkText(src, { fileName }).map((f) => f.rule);
const lineOf = (src: string, offset: number): number => src.slice(0, offset).split('\n').length;

describe('check: pairing by name', () => {
  // common practice: the names people give hand-written derivatives
  const names: [string, string][] = [
    ['sigmoid_grad', 'sigmoid'], ['sigmoid_prime', 'sigmoid'], ['d_sigmoid', 'sigmoid'], ['dsigmoid', 'sigmoid'],
    ['sigmoid_backward', 'sigmoid'], ['grad_sigmoid', 'sigmoid'], ['sigmoid_deriv', 'sigmoid'], ['sigmoidPrime', 'sigmoid'],
    ['dTanh', 'tanh'], ['relu_backward_kernel', 'relu'], ['gelu_bwd', 'gelu'], ['tanh_grad_from_output', 'tanh'],
  ];
  for (const [d, f] of names) it(`${d} → ${f}`, () => assert.equal(derivativeBase(d), f));
  it('does not read ordinary words as derivatives', () => {
    for (const w of ['delta', 'dist', 'dot', 'data', 'dropout', 'grade']) assert.equal(derivativeBase(w), undefined, w);
  });

  it('pairs by class (forward/backward), by defvjp, by call site and by comment adjacency', () => {
    const src = py([
      'import jax', 'import jax.numpy as jnp', 'import numpy as np',
      'class Softsign:', '    def forward(self, x):', '        self.x = x', '        return x / (1 + np.abs(x))',
      '    def backward(self, grad):', '        return grad / (1 + np.abs(self.x)) ** 2',
      '@jax.custom_vjp', 'def sq(x):', '    return x * x',
      'def sq_fwd(x):', '    return sq(x), x',
      'def sq_bwd(x, g):', '    return (2 * x * g,)',
      'sq.defvjp(sq_fwd, sq_bwd)',
      'def act(x):', '    return np.tanh(x)',
      'def helper(v):', '    return 1 - np.tanh(v) ** 2',
      'def step(z, g):', '    a = act(z)', '    return g * helper(z) + 0 * a',
      '# d/dx cube(x) = 3 x^2',
      'def cube(x):', '    return x ** 3',
    ]);
    const r = checkSource(src, { fileName: 'a.py' });
    const how = Object.fromEntries(r.pairs.map((p) => [p.derivative, [p.forward, p.how, p.ok]]));
    assert.deepEqual(how['Softsign.backward'], ['Softsign.forward', 'class', true]);
    assert.deepEqual(how['sq_bwd'], ['sq', 'custom-derivative registration', true]);
    assert.deepEqual(how['helper'], ['act', 'call site', true]);
    assert.equal(r.pairs.find((p) => p.derivative.startsWith('comment'))?.forward, 'cube');
    assert.deepEqual(r.findings, []);
  });
});

describe('check: against analytic derivatives', () => {
  // Reference derivatives from the independent CAS algebrite (npm), printed as Python: each must be
  // accepted as the derivative of its forward, and a perturbed copy must be rejected.
  const forwards = ['1/(1+exp(-x))', 'log(1+exp(x))', 'x/(1+exp(-x))', 'tanh(x)', 'exp(-x^2)', 'x/(1+abs(x))', 'x*tanh(log(1+exp(x)))'];
  for (const f of forwards) {
    const d = String(Algebrite.run(`d(${f},x)`)).replace(/sgn\(/g, 'np.sign(').replace(/\^/g, '**');
    const pyf = f.replace(/\^/g, '**');
    const np = (s: string) => s.replace(/\b(exp|log|tanh|cosh|abs)\(/g, 'np.$1(');
    it(`accepts algebrite's d/dx ${f} = ${d}`, () => {
      const src = py(['import numpy as np', 'def act(x):', `    return ${np(pyf)}`, 'def act_grad(x):', `    return ${np(d)}`]);
      const r = checkSource(src, { fileName: 'a.py', rules: ['derivative-mismatch'] });
      assert.equal(r.pairs.length, 1, JSON.stringify(r));
      assert.ok(r.pairs[0]!.ok, JSON.stringify(r.findings));
    });
    it(`rejects 1.01 × algebrite's d/dx ${f}`, () => {
      const src = py(['import numpy as np', 'def act(x):', `    return ${np(pyf)}`, 'def act_grad(x):', `    return 1.01 * (${np(d)})`]);
      const fs = checkText(src, { fileName: 'a.py', rules: ['derivative-mismatch'] });
      assert.equal(fs.length, 1);
      const e = fs[0]!.evidence!;
      // the relative error is 1 % wherever the derivative is not tiny
      assert.ok(Math.abs(e.foundValue / e.expectedValue - 1.01) < 1e-6 || Math.abs(e.expectedValue) < 1e-3, JSON.stringify(e));
      assert.ok(e.maxError > 0 && e.points > 50);
    });
  }

  it('handbook identities: σ′ = σ(1 − σ) in the output, tanh′ = 1 − y², exp′ = y (all accepted)', () => {
    const src = py([
      'import numpy as np',
      'def sig(x):', '    return 1 / (1 + np.exp(-x))', 'def sig_grad(s):', '    return s * (1 - s)',
      'def th(x):', '    return np.tanh(x)', 'def th_grad(y):', '    return 1 - y * y',
      'def ex(x):', '    return np.exp(x)', 'def ex_grad(out):', '    return out',
    ]);
    const r = checkSource(src, { fileName: 'a.py', rules: ['derivative-mismatch'] });
    assert.deepEqual(r.pairs.map((p) => [p.derivative, p.argument, p.ok]), [['sig_grad', 'output', true], ['th_grad', 'output', true], ['ex_grad', 'output', true]]);
  });
});

describe('check: what a finding carries', () => {
  it('largest error, an x where they differ, expected and found (canonical), and the forward', () => {
    const src = py(['import numpy as np', 'def softplus(x):', '    return np.log1p(np.exp(x))', 'def softplus_grad(x):', '    return 1 / (1 + np.exp(x))']);
    const [f] = checkText(src, { fileName: 'a.py', rules: ['derivative-mismatch'] });
    assert.ok(f);
    assert.equal(f.rule, 'derivative-mismatch');
    assert.equal(f.severity, 'error');
    assert.equal(f.expected, '1 / (1 + exp(-x))');
    assert.equal(f.found, '1 / (1 + exp(x))');
    const e = f.evidence!;
    // σ(−x) vs σ(x) at the worst point: the values are the two sides of the sigmoid
    assert.ok(Math.abs(e.expectedValue + e.foundValue - 1) < 1e-9);
    assert.equal(e.tolerance, REL_TOLERANCE);
    assert.equal(lineOf(src, f.span.start), 4);
    assert.equal(lineOf(src, f.related!.span.start), 2);
    assert.match(f.fix!.text, /exp\(-x\)/);
  });
});

describe('check: argument form, parameters, upstream gradients, batch means', () => {
  it('an output-form derivative called with the input is a bug at the call site', () => {
    const src = py([
      'import numpy as np', 'def sigmoid(x):', '    return 1 / (1 + np.exp(-x))', 'def sigmoid_grad(s):', '    return s * (1 - s)',
      'def good(z):', '    a = sigmoid(z)', '    return sigmoid_grad(a)',
      'def bad(z):', '    a = sigmoid(z)', '    return sigmoid_grad(z) * a',
    ]);
    const fs = checkText(src, { fileName: 'a.py', rules: ['derivative-mismatch'] });
    assert.equal(fs.length, 1);
    assert.equal(lineOf(src, fs[0]!.span.start), 11);
    assert.match(fs[0]!.message, /called with the input z/);
  });

  it('a saved input used as if it were the output is a bug; the saved output used as such is not', () => {
    const mk = (saved: string) => py([
      'import numpy as np', 'class S:', '    def forward(self, x):', `        self.keep = ${saved}`, '        return 1 / (1 + np.exp(-x))',
      '    def backward(self, grad):', '        return grad * self.keep * (1 - self.keep)',
    ]);
    assert.deepEqual(rules(mk('x')), ['derivative-mismatch']);
    assert.deepEqual(checkText(mk('1 / (1 + np.exp(-x))'), { fileName: 'a.py', rules: ['derivative-mismatch'] }), []);
  });

  it('binds named constants, defaults and compares a backward after dividing out the upstream gradient', () => {
    const ok = py(['import numpy as np', 'SLOPE = 0.01', 'def lk(x, a=SLOPE):', '    return np.where(x > 0, x, a * x)',
      'def lk_backward(grad_output, x):', '    return grad_output * np.where(x > 0, 1.0, SLOPE)']);
    assert.deepEqual(rules(ok), []);
    const bad = ok.replace('1.0, SLOPE)', '1.0, 0.1)');
    const [f] = checkText(bad, { fileName: 'a.py' });
    assert.equal(f?.rule, 'derivative-mismatch');
    assert.ok(Math.abs(f!.evidence!.foundValue - 0.1) < 1e-12 && Math.abs(f!.evidence!.expectedValue - 0.01) < 1e-12);
  });

  it('binds parameters from numeric arguments at call sites (positional or keyword)', () => {
    const mk = (bwdArg: string) => py([
      'import numpy as np', 'def leaky(x, a):', '    return np.where(x > 0, x, a * x)', 'def leaky_grad(x, a):', '    return np.where(x > 0, 1.0, a)',
      'def model(z):', '    y = leaky(z, 0.01)', `    g = leaky_grad(z, ${bwdArg})`, '    return y * g',
    ]);
    assert.deepEqual(rules(mk('0.1')), ['derivative-mismatch']);
    assert.deepEqual(rules(mk('a=0.01')), []);
  });

  it('a parameter with the same default on both sides must be right for other values too', () => {
    const src = py(['import numpy as np', 'def sp(x, beta=1.0):', '    return np.log1p(np.exp(beta * x)) / beta', 'def sp_grad(x, beta=1.0):', '    return 1 / (1 + np.exp(-x))']);
    assert.deepEqual(rules(src), ['derivative-mismatch']);
  });

  it('an upstream gradient that is not a factor is caught', () => {
    const src = py(['import numpy as np', 'def th(x):', '    return np.tanh(x)', 'def th_backward(grad, x):', '    return grad + 1 - np.tanh(x) ** 2 - 1']);
    assert.deepEqual(rules(src), ['derivative-mismatch']);
  });

  it('follows batch means: the backward of a mean must divide by N', () => {
    const ok = py(['def mse(p, t):', '    return ((p - t) ** 2).mean()', 'def mse_grad(p, t):', '    return 2 * (p - t) / p.numel()']);
    assert.deepEqual(rules(ok), []);
    assert.deepEqual(rules(ok.replace(' / p.numel()', '')), ['derivative-mismatch']);
  });
});

describe('check: comments against code, float breakdowns, vanishing pairs', () => {
  it('a comment formula that disagrees with the code under it', () => {
    const src = py(['# f(x) = x^3 + x', 'def cube(x):', '    return x ** 3 - x']);
    const [f] = checkText(src, { fileName: 'a.py' });
    assert.equal(f?.rule, 'formula-mismatch');
    assert.equal(f?.found, 'x ^ 3 + x');
    assert.equal(f?.expected, 'x ^ 3 - x');
    assert.deepEqual(rules(src.replace('x^3 + x', 'x^3 - x')), []);
  });

  it('softplus as log(1 + exp(x)) overflows (ln 65504 ≈ 11.09 in float16, IEEE 754 binary16): unstable-form with a fix', () => {
    const [f] = checkText(py(['import numpy as np', 'def sp(x):', '    return np.log(1 + np.exp(x))']), { fileName: 'a.py' });
    assert.equal(f?.rule, 'unstable-form');
    assert.equal(f?.severity, 'warning');
    assert.match(f!.message, /overflow in float16 for x in \[11\.09/);
    assert.match(f!.fix!.text, /log1p/);
  });

  it('sigmoid into squared error starves the gradient (vanishing-pair); sigmoid into cross-entropy does not', () => {
    const bad = py(['import numpy as np', 'def loss(z, y):', '    p = 1 / (1 + np.exp(-z))', '    return (p - y) ** 2']);
    assert.deepEqual(rules(bad), ['vanishing-pair']);
    const good = py(['import numpy as np', 'def loss(z, y):', '    return (z - y) ** 2']);
    assert.deepEqual(rules(good), []);
  });
});

describe('check: comparison tolerance', () => {
  it('is relative plus absolute', () => {
    assert.ok(withinTolerance(1, 1 + 0.5 * REL_TOLERANCE));
    assert.ok(!withinTolerance(1, 1 + 2 * REL_TOLERANCE));
    assert.ok(withinTolerance(0, 0.5 * ABS_TOLERANCE));
  });
  it('skips points next to a kink (x >= 0 vs x > 0 is not a bug)', () => {
    const a = (x: number) => (x > 0 ? 1 : 0);
    const b = (x: number) => (x >= 0 ? 1 : 0);
    assert.ok(compareFunctions(a, b, [-1, -0.5, 0, 0.5, 1, 2, 3, 4, 5, 6])!.ok);
  });
});
