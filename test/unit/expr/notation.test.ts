// Every notation and dialect the engine reads: the canonical text it produces must be stock mathjs
// (evaluated here with the full `mathjs` package) and equal, at several points, to a JavaScript
// reference written from the formula's meaning.
import * as assert from 'node:assert/strict';
import { parseFormula } from '../../../src/core/expr';
import type { Language } from '../../../src/core/types';
import { assertClose, stockFn } from './support';

const sig = (x: number): number => 1 / (1 + Math.exp(-x));
const softplus = (x: number): number => Math.log1p(Math.exp(x));
const erf = (x: number): number => {
  // erf by its Maclaurin series (A&S 7.1.5); the points below are small.
  let term = x;
  let sum = x;
  for (let n = 1; n < 80; n++) { term *= (-x * x) / n; sum += term / (2 * n + 1); }
  return (2 / Math.sqrt(Math.PI)) * sum;
};

interface Case { input: string; ref: (x: number) => number; lang?: Language; variable?: string; guess?: Language; pts?: number[] }

const PTS = [-2.3, -0.7, 0.4, 1.9];

const CASES: Record<string, Case[]> = {
  'plain maths': [
    { input: 'f(x) = 1/(1+exp(-x))', ref: sig },
    { input: 'y = x^2 + 3*x', ref: (x) => x * x + 3 * x },
    { input: 'x**3 - 2x', ref: (x) => x ** 3 - 2 * x },
    { input: 'g(z) = z * tanh(z)', ref: (z) => z * Math.tanh(z), variable: 'z' },
    { input: 'max(0, x) + min(x, 0) * 0.1', ref: (x) => Math.max(0, x) + Math.min(x, 0) * 0.1 },
    { input: '|x| / (1 + |x|)', ref: (x) => Math.abs(x) / (1 + Math.abs(x)) },
    { input: 'x > 0 ? x : 0.2 * x', ref: (x) => (x > 0 ? x : 0.2 * x) },
    { input: 'e^(-x^2)', ref: (x) => Math.exp(-x * x) },
    { input: "f'(x) = sigma(x)*(1-sigma(x))", ref: (x) => sig(x) * (1 - sig(x)) },
    { input: 'dy/dx = y(1 - y)', ref: (y) => y * (1 - y), variable: 'y' },
  ],
  unicode: [
    { input: 'σ(x)·(1 − σ(x))', ref: (x) => sig(x) * (1 - sig(x)) },
    { input: 'x² + x³', ref: (x) => x * x + x ** 3 },
    { input: '√(x² + 1)', ref: (x) => Math.sqrt(x * x + 1) },
    { input: 'e^(−x) × π', ref: (x) => Math.exp(-x) * Math.PI },
    { input: 'x⁻¹ + 2', ref: (x) => 1 / x + 2 },
    { input: 'α·x', ref: (x) => 0.3 * x },
    { input: 'α(x + 1)', ref: (x) => 0.3 * (x + 1) },
    { input: 'sigma(x) * (1 - sigma(x))', ref: (x) => sig(x) * (1 - sig(x)) },
    { input: 'λ · (x > 0 ? x : α·(eˣ − 1))', ref: (x) => 1.5 * (x > 0 ? x : 0.3 * Math.expm1(x)) },
    { input: "σ'(x) = σ(x)(1 − σ(x))", ref: (x) => sig(x) * (1 - sig(x)) },
    { input: 'x · Φ(x)', ref: (x) => x * 0.5 * (1 + erf(x / Math.SQRT2)) },
  ],
  latex: [
    { input: '\\frac{1}{1+e^{-x}}', ref: sig },
    { input: '\\sigma(x) \\cdot (1-\\sigma(x))', ref: (x) => sig(x) * (1 - sig(x)) },
    { input: '\\ln\\left(1 + e^{x}\\right)', ref: softplus },
    { input: '\\log(1+\\exp(x))', ref: softplus },
    { input: '\\tanh x', ref: Math.tanh },
    { input: '\\max(0, x)', ref: (x) => Math.max(0, x) },
    { input: '\\sqrt{x^2+1}', ref: (x) => Math.sqrt(x * x + 1) },
    { input: '\\sqrt[3]{x^2}', ref: (x) => Math.cbrt(x * x) },
    { input: 'f(x) = \\frac{x}{2}\\left(1 + \\operatorname{erf}\\left(\\frac{x}{\\sqrt{2}}\\right)\\right)', ref: (x) => (x / 2) * (1 + erf(x / Math.SQRT2)) },
    { input: '$\\alpha x^{2}$', ref: (x) => 0.3 * x * x },
    { input: 'x \\times e^{-\\frac{x^2}{2}}', ref: (x) => x * Math.exp(-x * x / 2) },
    { input: '\\begin{cases} x & x > 0 \\\\ \\alpha(e^{x} - 1) & \\text{otherwise} \\end{cases}', ref: (x) => (x > 0 ? x : 0.3 * Math.expm1(x)) },
    { input: 'f(x) = \\begin{cases} x, & \\text{if } x \\geq 0 \\\\ 0.01x, & \\text{if } x < 0 \\end{cases}', ref: (x) => (x >= 0 ? x : 0.01 * x) },
    { input: '\\begin{cases} 1 & x > 1 \\\\ x & |x| \\le 1 \\\\ -1 & x < -1 \\end{cases}', ref: (x) => (x > 1 ? 1 : x < -1 ? -1 : x) },
  ],
  python: [
    { input: 'x.neg().exp()', ref: (x) => Math.exp(-x) },
    { input: 'np.float32(x) * 2', ref: (x) => 2 * x },
    { input: 'torch.sigmoid(x)', ref: sig, guess: 'python' },
    { input: 'np.maximum(x, 0)', ref: (x) => Math.max(x, 0), guess: 'python' },
    { input: 'numpy.minimum(x, 0.5)', ref: (x) => Math.min(x, 0.5) },
    { input: 'x if x > 0 else 0.01 * x', ref: (x) => (x > 0 ? x : 0.01 * x), guess: 'python' },
    { input: 'x if x > 1 else (-x if x < -1 else x ** 3)', ref: (x) => (x > 1 ? x : x < -1 ? -x : x ** 3) },
    { input: 'torch.clamp(x, min=0, max=6)', ref: (x) => Math.min(Math.max(x, 0), 6) },
    { input: 'x.clamp(min=0)', ref: (x) => Math.max(x, 0) },
    { input: 'np.clip(x, -1, 1)', ref: (x) => Math.min(Math.max(x, -1), 1) },
    { input: 'np.where(x > 0, x, np.exp(x) - 1)', ref: (x) => (x > 0 ? x : Math.expm1(x)) },
    { input: 'F.leaky_relu(x, negative_slope=0.2)', ref: (x) => (x >= 0 ? x : 0.2 * x) },
    { input: 'F.gelu(x, approximate="tanh")', ref: (x) => 0.5 * x * (1 + Math.tanh(Math.sqrt(2 / Math.PI) * (x + 0.044715 * x ** 3))) },
    { input: 'jax.nn.gelu(x, approximate=False)', ref: (x) => 0.5 * x * (1 + erf(x / Math.SQRT2)) },
    { input: 'jnp.log1p(jnp.exp(x))', ref: softplus },
    { input: 'tf.math.expm1(x) * math.erf(x)', ref: (x) => Math.expm1(x) * erf(x) },
    { input: 'np.heaviside(x, 0.5) * x', ref: (x) => (x > 0 ? x : 0) },
    { input: 'lambda z: z * torch.sigmoid(z)', ref: (z) => z * sig(z), variable: 'z' },
    { input: 'def swish(v): return v * torch.sigmoid(v)', ref: (v) => v * sig(v), variable: 'v' },
    { input: 'return math.exp(-x) / (1.0 + math.exp(-x))', ref: (x) => Math.exp(-x) / (1 + Math.exp(-x)) },
    { input: 'torch.nn.functional.softplus(x, beta=2)', ref: (x) => softplus(2 * x) / 2 },
  ],
  'C / C++ / CUDA': [
    { input: '__fdividef(1.0f, 1.0f + __expf(-x))', ref: sig },
    { input: '__saturatef(x) + fmaf(x, 2.0f, 1.0f)', ref: (x) => Math.min(Math.max(x, 0), 1) + 2 * x + 1 },
    { input: '1.0f / (1.0f + __expf(-x))', ref: sig, guess: 'cuda' },
    { input: 'tanhf(x) * 0.5f', ref: (x) => Math.tanh(x) * 0.5 },
    { input: 'fmaxf(x, 0.0f)', ref: (x) => Math.max(x, 0), guess: 'c' },
    { input: 'std::max(0.0, x) + std::log1p(std::exp(-std::abs(x)))', ref: (x) => Math.max(0, x) + Math.log1p(Math.exp(-Math.abs(x))), guess: 'cpp' },
    { input: 'x > 0.0f ? x : 0.01f * x', ref: (x) => (x > 0 ? x : 0.01 * x) },
    { input: 'float y = (float)x * expf(x);', ref: (x) => x * Math.exp(x) },
    { input: 'static_cast<float>(x) / (1 + fabsf(x))', ref: (x) => x / (1 + Math.abs(x)) },
    { input: '2.5e-1f * x', ref: (x) => 0.25 * x },
  ],
  rust: [
    { input: 'if x > 0.0 { x } else { 0.01 * x }', ref: (x) => (x > 0 ? x : 0.01 * x) },
    { input: 'fn act(x: f32) -> f32 { x * x.exp() }', ref: (x) => x * Math.exp(x) },
    { input: 'x.mul_add(2.0, 1.0)', ref: (x) => 2 * x + 1 },
    { input: 'x.exp()', ref: Math.exp },
    { input: '1.0 / (1.0 + (-x).exp())', ref: sig, guess: 'rust' },
    { input: 'x.max(0.0)', ref: (x) => Math.max(x, 0) },
    { input: 'x.tanh() * 2.0_f32', ref: (x) => Math.tanh(x) * 2 },
    { input: 'f32::exp(x) + x.powi(2)', ref: (x) => Math.exp(x) + x * x, guess: 'rust' },
    { input: 'x.abs().max(0.5)', ref: (x) => Math.max(Math.abs(x), 0.5) },
    { input: '(x as f64).ln_1p()', ref: (x) => Math.log1p(x), pts: [0.4, 1.9, 3.1] },
    { input: '|x| x * x.exp()', ref: (x) => x * Math.exp(x) },
  ],
  go: [
    { input: 'func act(x float64) float64 { return math.Max(x, 0) }', ref: (x) => Math.max(x, 0) },
    { input: 'float64(x) * math.Log1p(x * x)', ref: (x) => x * Math.log1p(x * x) },
    { input: 'math.Exp(-x)', ref: (x) => Math.exp(-x), guess: 'go' },
    { input: 'math.Max(x, 0) + math.Tanh(x)', ref: (x) => Math.max(x, 0) + Math.tanh(x), guess: 'go' },
    { input: 'y := 1 / (1 + math.Exp(-x))', ref: sig },
  ],
  julia: [
    { input: '@. 1 / (1 + exp(-x))', ref: sig },
    { input: 'σ.(x) .* x', ref: (x) => sig(x) * x },
    { input: 'exp.(x) ./ (1 .+ exp.(x))', ref: sig, guess: 'julia' },
    { input: 'f(x) = x .^ 2', ref: (x) => x * x },
  ],
  r: [
    { input: 'function(x) 1/(1+exp(-x))', ref: sig },
    { input: 'pmax(x, 0)', ref: (x) => Math.max(x, 0), guess: 'r' },
    { input: 'ifelse(x > 0, x, exp(x) - 1)', ref: (x) => (x > 0 ? x : Math.expm1(x)), guess: 'r' },
    { input: 'y <- pmin(x, 1)', ref: (x) => Math.min(x, 1) },
  ],
  'MATLAB / Octave': [
    { input: 'y = x.*(x>0);', ref: (x) => (x > 0 ? x : 0) },
    { input: 'y = 1 ./ (1 + exp(-x));', ref: sig, guess: 'matlab' },
    { input: 'x .* tanh(x)', ref: (x) => x * Math.tanh(x) },
    { input: 'x.^2 ./ 2', ref: (x) => x * x / 2 },
    { input: '@(x) max(x, 0)', ref: (x) => Math.max(x, 0) },
  ],
  fortran: [
    { input: '1.0d0 / (1.0d0 + exp(-x))', ref: sig, guess: 'fortran' },
    { input: 'x**2 * 0.5_dp', ref: (x) => x * x * 0.5 },
    { input: 'merge(x, 0.0d0, x > 0.0d0)', ref: (x) => (x > 0 ? x : 0) },
    { input: 'MAX(X, 0.0) + TANH(X)', ref: (x) => Math.max(x, 0) + Math.tanh(x), variable: 'X' },
  ],
  'JavaScript / TypeScript': [
    { input: 'function (z) { return Math.max(0, z); }', ref: (z) => Math.max(0, z), variable: 'z' },
    { input: 'Math.tanh(x)', ref: Math.tanh, guess: 'javascript' },
    { input: 'const y = x => Math.max(0, x) ** 2;', ref: (x) => Math.max(0, x) ** 2 },
    { input: '(x: number) => 1 / (1 + Math.exp(-x))', ref: sig },
    { input: 'x > 0 && x < 1 ? x : 0', ref: (x) => (x > 0 && x < 1 ? x : 0) },
  ],
  'Java / Kotlin': [
    { input: 'if (x > 0) x else 0.01 * x', ref: (x) => (x > 0 ? x : 0.01 * x) },
    { input: 'fun act(x: Double) = x.coerceAtLeast(0.0)', ref: (x) => Math.max(x, 0) },
    { input: '(float) Math.exp(-x) * Math.pow(x, 2)', ref: (x) => Math.exp(-x) * x * x },
    { input: 'Math.exp(x) / (1 + Math.exp(x))', ref: sig },
    { input: 'kotlin.math.exp(-x) * x', ref: (x) => Math.exp(-x) * x, guess: 'kotlin' },
    { input: 'return x * 2.0d;', ref: (x) => x * 2, lang: 'java' },
  ],
  lua: [
    { input: 'math.exp(x) - 1', ref: (x) => Math.expm1(x) },
    { input: 'local y = math.max(x, 0) -- relu', ref: (x) => Math.max(x, 0), lang: 'lua' },
  ],
};

const PARAMS: Record<string, number> = { alpha: 0.3, lambda: 1.5 };

describe('notation → canonical stock mathjs', () => {
  for (const [family, cases] of Object.entries(CASES)) {
    describe(family, () => {
      for (const c of cases) {
        it(c.input, () => {
          const f = parseFormula(c.input, c.lang ? { language: c.lang } : {});
          assert.equal(f.variable, c.variable ?? 'x');
          if (c.guess) assert.equal(f.language, c.guess);
          const params: Record<string, number> = {};
          for (const u of f.unbound) {
            assert.ok(u in PARAMS, `unexpected free symbol ${u} in ${f.expression}`);
            params[u] = PARAMS[u] as number;
          }
          const g = stockFn(f.expression, f.variable, params);
          for (const x of c.pts ?? PTS) assertClose(g(x), c.ref(x), 1e-12, `${c.input} → ${f.expression} at ${x}`);
          // Canonical form is self-consistent: reading it again gives the same text.
          assert.equal(parseFormula(f.expression, { variable: f.variable }).expression, f.expression);
        });
      }
    });
  }

  it('keeps Greek parameter names as ASCII symbols and maps them back in display', () => {
    const f = parseFormula('α·x + β');
    assert.deepEqual(f.unbound.sort(), ['alpha', 'beta']);
  });

  it('drops the implicit left-hand side and names the variable from it', () => {
    const f = parseFormula('act(t) = t * tanh(t)');
    assert.equal(f.variable, 't');
    assert.equal(f.name, 'act');
  });

  it('notes that ^ is XOR in C-family code and reads it as a power', () => {
    const f = parseFormula('x ^ 2', { language: 'c' });
    assert.equal(f.expression, 'x ^ 2');
    assert.ok(f.notes.some((n) => n.includes('XOR')));
  });

  it('reports a tanh approximation default of jax.nn.gelu and the exact form of torch', () => {
    assert.equal(parseFormula('jax.nn.gelu(x)').recognised, 'gelu_tanh');
    assert.equal(parseFormula('torch.nn.functional.gelu(x)').recognised, 'gelu');
  });

  it('maps long runs of characters in linear time without errors other than SlopewiseError', () => {
    for (const s of ['x'.repeat(1900), '('.repeat(40) + 'x' + ')'.repeat(40), '1'.repeat(1999), '.'.repeat(500) + 'x']) {
      try {
        parseFormula(s);
      } catch (e) {
        assert.equal((e as Error).name, 'SlopewiseError', `${s.slice(0, 20)}…: ${(e as Error).message}`);
      }
    }
  });
});
