// Every catalogue function: the engine's f′ and f″ (canonical text, evaluated with the full mathjs
// package) against central finite differences and against the hand-written derivatives of
// catalogue-js.ts, at many points away from kinks; plus the papers' constants.
import * as assert from 'node:assert/strict';
import { CATALOGUE, derive, parseFormula } from '../../../src/core/expr';
import { CATALOGUE_JS, SELU_ALPHA, SELU_LAMBDA, defaultParams, erf } from '../../../src/core/expr/catalogue-js';
import { FD_TOL, POINTS, assertClose, centralDiff, stockFn } from './support';

interface Setup { call: string; variable: string; params: Record<string, number>; jsParams: Record<string, number>; points: number[] }

function setup(name: string): Setup {
  const entry = CATALOGUE.find((e) => e.name === name);
  assert.ok(entry);
  if (entry.role !== 'loss') return { call: `${name}(x)`, variable: 'x', params: {}, jsParams: defaultParams(name), points: POINTS };
  const v = entry.args[0] as string;
  const y = name === 'bce' ? 0.3 : name.includes('hinge') ? 1 : name === 'bce_logits' ? 0.3 : 0.4;
  const points = name === 'bce' ? [0.05, 0.2, 0.35, 0.5, 0.65, 0.8, 0.95] : POINTS;
  return { call: `${name}(${v}, y)`, variable: v, params: { y }, jsParams: { ...defaultParams(name), y }, points };
}

describe('catalogue: f′ and f″ of every entry', () => {
  for (const entry of CATALOGUE) {
    it(`${entry.name}: f, f′, f″ match finite differences and the hand-written forms`, () => {
      const s = setup(entry.name);
      const formula = parseFormula(s.call, { params: s.params });
      assert.equal(formula.variable, s.variable);
      assert.deepEqual(formula.unbound, []);
      const d = derive(formula);
      const f = stockFn(formula.expression, s.variable, formula.parameters);
      const d1 = stockFn(d.first, s.variable, formula.parameters);
      const d2 = stockFn(d.second, s.variable, formula.parameters);
      const js = CATALOGUE_JS[entry.name];
      assert.ok(js, `no hand-written implementation for ${entry.name}`);
      for (const x of s.points) {
        assertClose(f(x), js.f(x, s.jsParams), 1e-12, `${entry.name}(${x})`);
        assertClose(d1(x), js.d1(x, s.jsParams), 1e-11, `${entry.name}′(${x}) vs hand-written`);
        assertClose(d2(x), js.d2(x, s.jsParams), 1e-10, `${entry.name}″(${x}) vs hand-written`);
        assertClose(d1(x), centralDiff(f, x), FD_TOL, `${entry.name}′(${x}) vs central difference`);
        assertClose(d2(x), centralDiff(d1, x), FD_TOL, `${entry.name}″(${x}) vs central difference of f′`);
      }
    });
  }

  const withParams: [string, Record<string, number>][] = [
    ['leaky_relu(x, 0.2)', { slope: 0.2 }], ['elu(x, 0.5)', { alpha: 0.5 }], ['celu(x, 2)', { alpha: 2 }],
    ['silu(x, 1.5)', { beta: 1.5 }], ['softplus(x, 2)', { beta: 2 }], ['hardtanh(x, -2, 2)', { min_val: -2, max_val: 2 }],
  ];
  for (const [call, jsParams] of withParams) {
    it(`${call}: given parameters replace the defaults`, () => {
      const name = call.slice(0, call.indexOf('('));
      const formula = parseFormula(call);
      const d = derive(formula);
      const js = CATALOGUE_JS[name];
      assert.ok(js);
      const d1 = stockFn(d.first, 'x');
      const d2 = stockFn(d.second, 'x');
      for (const x of POINTS.filter((p) => Math.abs(Math.abs(p) - 2) > 0.1)) {
        assertClose(d1(x), js.d1(x, jsParams), 1e-11, `${call}′(${x})`);
        assertClose(d2(x), js.d2(x, jsParams), 1e-10, `${call}″(${x})`);
      }
    });
  }

  it('a symbol in a parameter slot takes the published default unless given', () => {
    const a = parseFormula('elu(x, alpha)');
    assert.deepEqual(a.parameters, { alpha: 1 });
    assert.equal(a.parameterSources.alpha, 'default');
    const b = parseFormula('elu(x, alpha)', { params: { alpha: 0.7 } });
    assert.deepEqual(b.parameters, { alpha: 0.7 });
    assert.equal(b.parameterSources.alpha, 'given');
    const c = parseFormula('x > 0 ? x : alpha * (exp(x) - 1)');
    assert.deepEqual(c.unbound, ['alpha']);
  });

  it('names the assumed default in the notes', () => {
    assert.ok(parseFormula('leaky_relu(x)').notes.some((n) => n.includes('0.01')));
    assert.ok(parseFormula('hardsigmoid(x)').notes.some((n) => n.includes('relu6(x + 3)/6')));
  });

  it('recognises written-out forms of catalogue functions', () => {
    assert.equal(parseFormula('1/(1+exp(-x))').recognised, 'sigmoid');
    assert.equal(parseFormula('torch.nn.functional.softplus(z)').recognised, 'softplus');
    assert.equal(parseFormula('x * sigmoid(x)').recognised, 'silu');
  });
});

describe("catalogue: papers' constants", () => {
  it('SELU constants are those of Klambauer et al. 2017 (λ ≈ 1.0507009873554805, α ≈ 1.6732632423543772)', () => {
    // Klambauer et al. 2017, "Self-Normalizing Neural Networks", eq. (14): λ01 ≈ 1.0507, α01 ≈ 1.6733,
    // given to 1.0507009873554804934193349852946 and 1.6732632423543772848170429916717.
    assert.equal(SELU_LAMBDA, 1.0507009873554805);
    assert.equal(SELU_ALPHA, 1.6732632423543772);
    const f = parseFormula('selu(x)');
    assert.ok(f.expression.includes('1.0507009873554805') && f.expression.includes('1.6732632423543772'));
  });

  it('SELU maps z ~ N(0, 1) to mean 0 and variance 1 (the fixed point stated by Klambauer et al. 2017)', () => {
    const f = stockFn(parseFormula('selu(x)').expression, 'x');
    // Simpson's rule on [−10, 10] with the kink at 0 as a node.
    const n = 4000;
    const h = 20 / n;
    let m1 = 0;
    let m2 = 0;
    for (let i = 0; i <= n; i++) {
      const z = -10 + i * h;
      const w = (i === 0 || i === n ? 1 : i % 2 === 1 ? 4 : 2) * (h / 3) * Math.exp(-z * z / 2) / Math.sqrt(2 * Math.PI);
      const v = f(z);
      m1 += w * v;
      m2 += w * v * v;
    }
    assert.ok(Math.abs(m1) < 1e-6, `mean ${m1}`);
    assert.ok(Math.abs(m2 - 1) < 1e-6, `second moment ${m2}`);
  });

  it('GELU approximations use √(2/π), 0.044715 and 1.702 (Hendrycks & Gimpel 2016) and stay close to x·Φ(x)', () => {
    const tanhForm = parseFormula('gelu_tanh(x)').expression;
    assert.ok(tanhForm.includes('0.044715') && tanhForm.includes('sqrt(2 / pi)'));
    assert.ok(parseFormula('gelu_sigmoid(x)').expression.includes('1.702'));
    const exact = stockFn(parseFormula('gelu(x)').expression, 'x');
    const approxT = stockFn(tanhForm, 'x');
    const approxS = stockFn(parseFormula('gelu_sigmoid(x)').expression, 'x');
    let errT = 0;
    let errS = 0;
    for (let x = -6; x <= 6; x += 0.01) {
      errT = Math.max(errT, Math.abs(approxT(x) - exact(x)));
      errS = Math.max(errS, Math.abs(approxS(x) - exact(x)));
    }
    // Maximum errors ≈ 4.7e-4 (tanh) and ≈ 2e-2 (sigmoid): from memory; bounds with margin.
    assert.ok(errT < 1e-3, `tanh approximation error ${errT}`);
    assert.ok(errS < 3e-2, `sigmoid approximation error ${errS}`);
  });

  it('the hand-written erf matches erf values of Abramowitz & Stegun Table 7.1', () => {
    // A&S Table 7.1: erf 0.5 = 0.5204998778, erf 1 = 0.8427007929, erf 2 = 0.9953222650; erf 3 = 0.9999779095 (A&S 7.1).
    assertClose(erf(0.5), 0.5204998778, 1e-10, 'erf 0.5');
    assertClose(erf(1), 0.8427007929, 1e-10, 'erf 1');
    assertClose(erf(2), 0.995322265, 1e-10, 'erf 2');
    assertClose(erf(3), 0.9999779095, 1e-10, 'erf 3');
    assertClose(erf(-3.5), -0.999999257, 1e-9, 'erf −3.5');
  });
});
