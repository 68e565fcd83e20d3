// The computing expression of functions in each supported language.
import * as assert from 'node:assert/strict';
import { findFormulas } from '../../../src/core/detect/index';
import { parseFormula } from '../../../src/core/expr/parse';
import { compileScalar } from '../../../src/core/expr/compile';

/** The code formula named `name`, evaluated at a few points against a reference function. */
function expectCode(src: string, fileName: string, name: string, reference: (x: number) => number, params: Record<string, number> = {}): void {
  const all = findFormulas(src, { fileName });
  const f = all.find((x) => x.origin === 'code' && x.name === name);
  assert.ok(f, `no code formula ${name} in ${fileName}: found ${JSON.stringify(all.map((x) => [x.name, x.text]))}`);
  const formula = parseFormula(f.text, { language: f.language, ...(f.variable ? { variable: f.variable } : {}), params: { ...f.params, ...params } });
  const fn = compileScalar(formula.node, formula.variable, formula.parameters);
  for (const x of [-3.3, -0.7, 0.4, 2.9]) {
    assert.ok(Math.abs(fn(x) - reference(x)) < 1e-9, `${name}(${x}) = ${fn(x)}, expected ${reference(x)} (text ${f.text})`);
  }
}

const sigmoid = (x: number): number => 1 / (1 + Math.exp(-x));
const leaky = (x: number): number => (x > 0 ? x : 0.01 * x);
const elu = (x: number): number => (x > 0 ? x : Math.exp(x) - 1);

describe('detect: code per language', () => {
  it('Python: return, locals substituted, if/elif/else, np.where, lambda, x.clamp', () => {
    const src = [
      'import numpy as np',
      'SLOPE = 0.01',
      'def sig(x):',
      '    e = np.exp(-x)',
      '    d = 1.0 + e',
      '    return 1.0 / d',
      'def leaky(x):',
      '    if x > 0:',
      '        return x',
      '    return SLOPE * x',
      'def leaky2(x):',
      '    return np.where(x > 0, x, SLOPE * x)',
      'elu = lambda x: x if x > 0 else np.exp(x) - 1',
      'def relu(x):',
      '    return x.clamp(min=0)',
      'def loop_relu(xs):',
      '    out = np.empty_like(xs)',
      '    for i in range(len(xs)):',
      '        out[i] = xs[i] if xs[i] > 0 else 0.0',
      '    return out',
    ].join('\n');
    expectCode(src, 'a.py', 'sig', sigmoid);
    expectCode(src, 'a.py', 'leaky', leaky);
    expectCode(src, 'a.py', 'leaky2', leaky);
    expectCode(src, 'a.py', 'elu', elu);
    expectCode(src, 'a.py', 'relu', (x) => Math.max(x, 0));
    expectCode(src, 'a.py', 'loop_relu', (x) => Math.max(x, 0));
  });

  it('C/C++/CUDA: ternary, if/else blocks, casts, a kernel body with a bounds guard, a macro', () => {
    const src = [
      '#define SLOPE 0.01f',
      '#define SQ(x) ((x) * (x))',
      'static inline float sig(float x) { return 1.0f / (1.0f + expf(-x)); }',
      'float leaky(float x) {',
      '  if (x > 0.0f) {',
      '    return x;',
      '  } else {',
      '    return SLOPE * x;',
      '  }',
      '}',
      'double halfsq(double x) { return (double)SQ(x) / 2.0; }',
      '__global__ void relu_k(const float* x, float* y, int n) {',
      '  int i = blockIdx.x * blockDim.x + threadIdx.x;',
      '  if (i < n) y[i] = x[i] > 0.0f ? x[i] : 0.0f;',
      '}',
    ].join('\n');
    expectCode(src, 'a.cu', 'sig', sigmoid);
    expectCode(src, 'a.cu', 'leaky', leaky);
    expectCode(src, 'a.cu', 'relu_k', (x) => Math.max(x, 0));
  });

  it('Rust: method calls, if-expressions as the value, consts', () => {
    const src = [
      'const A: f64 = 0.01;',
      'fn sig(x: f64) -> f64 { 1.0 / (1.0 + (-x).exp()) }',
      'fn leaky(x: f64) -> f64 {',
      '    let y = if x > 0.0 { x } else { A * x };',
      '    y',
      '}',
    ].join('\n');
    expectCode(src, 'a.rs', 'sig', sigmoid);
    expectCode(src, 'a.rs', 'leaky', leaky);
  });

  it('Go: early returns, := locals, method receivers', () => {
    const src = [
      'package a',
      'import "math"',
      'func Elu(x float64) float64 {',
      '\tif x > 0 {',
      '\t\treturn x',
      '\t}',
      '\te := math.Exp(x)',
      '\treturn e - 1',
      '}',
    ].join('\n');
    expectCode(src, 'a.go', 'Elu', elu);
  });

  it('Julia: f(x) = …, function … end, ternary, one(x)', () => {
    const src = ['σ(x) = 1 / (1 + exp(-x))', 'function lk(x)', '    x > 0 ? x : 0.01 * x', 'end', 'g(x) = x > 0 ? one(x) : zero(x)'].join('\n');
    expectCode(src, 'a.jl', 'σ', sigmoid);
    expectCode(src, 'a.jl', 'lk', leaky);
    expectCode(src, 'a.jl', 'g', (x) => (x > 0 ? 1 : 0));
  });

  it('R: <- function, last expression, ifelse, return()', () => {
    const src = ['sig <- function(x) {', '  1 / (1 + exp(-x))', '}', 'lk <- function(x, a = 0.01) {', '  return(ifelse(x > 0, x, a * x))', '}'].join('\n');
    expectCode(src, 'a.R', 'sig', sigmoid);
    expectCode(src, 'a.R', 'lk', leaky);
  });

  it('MATLAB/Octave: output variable, masked assignment, anonymous functions', () => {
    const src = ['function y = lk(x)', '  y = x;', '  y(x < 0) = 0.01 * x(x < 0);', 'end', 'sig = @(x) 1 ./ (1 + exp(-x));'].join('\n');
    expectCode(src, 'a.m', 'lk', leaky);
    expectCode(src, 'a.m', 'sig', sigmoid);
  });

  it('Fortran: function result, if/then/else, parameter constants, 1.0d0', () => {
    const src = [
      'module m',
      '  real(8), parameter :: a = 0.01d0',
      'contains',
      '  elemental real(8) function lk(x) result(y)',
      '    real(8), intent(in) :: x',
      '    if (x .gt. 0.0d0) then',
      '      y = x',
      '    else',
      '      y = a * x',
      '    end if',
      '  end function lk',
      'end module m',
    ].join('\n');
    expectCode(src, 'a.f90', 'lk', leaky);
  });

  it('JavaScript/TypeScript: arrow functions, Math.*, class methods', () => {
    const src = ['const sig = (x) => 1 / (1 + Math.exp(-x));', 'export function lk(x: number): number {', '  return x > 0 ? x : 0.01 * x;', '}'].join('\n');
    expectCode(src, 'a.ts', 'sig', sigmoid);
    expectCode(src, 'a.ts', 'lk', leaky);
  });

  it('Java/Kotlin: static methods, expression bodies, if-expressions', () => {
    expectCode('class A { static double sig(double x) { return 1.0 / (1.0 + Math.exp(-x)); } }', 'A.java', 'A.sig', sigmoid);
    expectCode('fun lk(x: Double): Double = if (x > 0.0) x else 0.01 * x', 'a.kt', 'lk', leaky);
  });

  it('Lua: function M.name, local function, if/then/else/end on one line', () => {
    const src = ['local M = {}', 'function M.sig(x)', '  return 1 / (1 + math.exp(-x))', 'end', 'local function lk(x)', '  if x > 0 then return x else return 0.01 * x end', 'end'].join('\n');
    expectCode(src, 'a.lua', 'sig', sigmoid);
    expectCode(src, 'a.lua', 'lk', leaky);
  });

  it('derivative roles and the argument they take', () => {
    const src = [
      'def sigmoid_grad(s):', '    return s * (1 - s)',
      'def dtanh(x):', '    return 1 - np.tanh(x) ** 2',
      'def relu_backward(grad_output, x):', '    return grad_output * (x > 0)',
    ].join('\n');
    const fs = findFormulas(src, { fileName: 'a.py' });
    const by = (n: string) => fs.find((f) => f.name === n)!;
    assert.equal(by('sigmoid_grad').role, 'derivative');
    assert.equal(by('sigmoid_grad').argument, 'output');
    assert.equal(by('dtanh').role, 'derivative');
    assert.equal(by('relu_backward').role, 'derivative');
    assert.equal(by('relu_backward').variable, 'x');
  });
});
