// Formulas in comments of every comment syntax, and text that only looks mathematical.
import * as assert from 'node:assert/strict';
import { findFormulas } from '../../../src/core/detect/index';

function texts(src: string, fileName: string): string[] {
  return findFormulas(src, { fileName }).filter((f) => f.origin === 'comment').map((f) => f.text);
}

function one(src: string, fileName: string) {
  const fs = findFormulas(src, { fileName }).filter((f) => f.origin === 'comment');
  assert.equal(fs.length, 1, `expected one comment formula in ${fileName}, got ${JSON.stringify(fs.map((f) => f.text))}`);
  return fs[0]!;
}

describe('detect: comment syntaxes', () => {
  const cases: [string, string, string][] = [
    ['#', 'a.py', '# f(x) = 1/(1+exp(-x))\n'],
    ['//', 'a.c', '// f(x) = 1/(1+exp(-x))\nint a;\n'],
    ['/* */', 'a.c', '/*\n * f(x) = 1/(1+exp(-x))\n */\nint a;\n'],
    ['///', 'a.rs', '/// f(x) = 1/(1+exp(-x))\nfn a() {}\n'],
    ['//!', 'a.rs', '//! f(x) = 1/(1+exp(-x))\n'],
    ['--', 'a.lua', '-- f(x) = 1/(1+exp(-x))\n'],
    ['--[[ ]]', 'a.lua', '--[[\n  f(x) = 1/(1+exp(-x))\n]]\n'],
    ['%', 'a.m', '% f(x) = 1/(1+exp(-x))\n'],
    ['!', 'a.f90', '! f(x) = 1/(1+exp(-x))\n'],
    ['; (lisp)', 'a.lisp', '; f(x) = 1/(1+exp(-x))\n'],
    ["#' (roxygen)", 'a.R', "#' f(x) = 1/(1+exp(-x))\nf <- 1\n"],
    ['Python """docstring"""', 'a.py', 'def f(x):\n    """Logistic.\n\n    f(x) = 1/(1+exp(-x))\n    """\n    pass\n'],
    ["Python '''docstring'''", 'a.py', "def f(x):\n    '''f(x) = 1/(1+exp(-x))'''\n    pass\n"],
    ['Julia """docstring"""', 'a.jl', '"""\n    f(x)\n\nf(x) = 1/(1+exp(-x))\n"""\nfunction g end\n'],
    ['Julia @doc', 'a.jl', '@doc """f(x) = 1/(1+exp(-x))""" g\n'],
    ['Julia #= =#', 'a.jl', '#= f(x) = 1/(1+exp(-x)) =#\n'],
    ['unknown extension (fallback)', 'notes.xyz', '# f(x) = 1/(1+exp(-x))\n'],
    ['markdown prose line', 'notes.md', 'The logistic: f(x) = 1/(1+exp(-x)).\n'],
  ];
  for (const [label, file, src] of cases) {
    it(`reads ${label}`, () => {
      const f = one(src, file);
      assert.equal(f.text.replace(/\s+/g, ''), '1/(1+exp(-x))');
      assert.equal(f.role, 'activation');
      assert.equal(f.variable, 'x');
      // the span starts at the formula's left-hand side
      assert.equal(src.slice(f.span.start, f.span.start + 4), 'f(x)');
    });
  }

  it('ignores comment markers inside string literals', () => {
    assert.deepEqual(texts('s = "# f(x) = x^2"\nt = \'# g(x) = x^3\'\n', 'a.py'), []);
    assert.deepEqual(texts('const char *s = "// f(x) = x^2";\n', 'a.c'), []);
    assert.deepEqual(texts('local s = "-- f(x) = x^2"\n', 'a.lua'), []);
    assert.deepEqual(texts("let s = r#\"// f(x) = x^2\"#;\n", 'a.rs'), []);
  });

  it("keeps MATLAB transposes apart from strings: x' is not a quote", () => {
    assert.deepEqual(texts("y = x' * 2; % f(x) = x^2\n", 'a.m').map((t) => t.replace(/\s/g, '')), ['x^2']);
  });
});

describe('detect: formula shapes in comments', () => {
  it('reads a piecewise definition spread over lines', () => {
    const f = one('# leaky(x) = x        if x > 0\n#            0.01 x   otherwise\n', 'a.py');
    assert.equal(f.text, '(x > 0) ? (x) : (0.01 x)');
    assert.equal(f.name, 'leaky');
  });

  it('reads brace-style and LaTeX cases', () => {
    const a = one('# f(x) = { x,     x > 0\n#        { 0.1x,  x <= 0\n', 'a.py');
    assert.equal(a.text, '(x > 0) ? (x) : (0.1x)');
    const b = one('% f(x) = \\begin{cases} x & x > 0 \\\\ 0 & \\text{otherwise} \\end{cases}\n', 'a.tex');
    assert.equal(b.text, '(x > 0) ? (x) : (0)');
  });

  it('reads an inline a if c else b', () => {
    assert.equal(one('# elu(x) = x if x > 0 else a*(exp(x) - 1)\n', 'a.py').text, '(x > 0) ? (x) : (a*(exp(x) - 1))');
  });

  // variable undefined = not declared on the left (the checker takes the forward's variable)
  const derivs: [string, string | undefined, string | undefined, 'input' | 'output', string | undefined][] = [
    ["# f'(x) = σ(x)(1 - σ(x))", 'x', undefined, 'input', 'σ(x)(1 - σ(x))'],
    ['# d/dx tanh(x) = 1 - tanh(x)^2', 'x', 'tanh', 'input', undefined],
    ['# dy/dx = 1 - y^2', 'y', undefined, 'output', undefined],
    ['# ∂L/∂p = (p - y) / (p (1 - p))', 'p', 'L', 'input', undefined],
    ['# derivative: s*(1-s)', 's', undefined, 'output', undefined],
    ['# derivative of softplus: 1/(1+exp(-x))', undefined, 'softplus', 'input', undefined],
    ['# grad = 2 * (p - t)', undefined, undefined, 'input', undefined],
  ];
  for (const [src, variable, fwd, arg] of derivs) {
    it(`reads the declared derivative ${src}`, () => {
      const f = one(src + '\n', 'a.py');
      assert.equal(f.role, 'derivative');
      assert.equal(f.variable, variable);
      assert.equal(f.forwardName, fwd);
      assert.equal(f.argument, arg);
    });
  }

  it('gives losses their role', () => {
    const f = one('# L(p, y) = -(y log(p) + (1 - y) log(1 - p))\n', 'a.py');
    assert.equal(f.role, 'loss');
    assert.equal(f.variable, 'p');
  });
});

describe('detect: text that only looks mathematical', () => {
  const notFormulas: [string, string][] = [
    ['date', '# released = 2024-03-01\n# date = 12/03/2023\n'],
    ['version', '# version = 1.2.3\n# v = v2.0\n'],
    ['URL', '# docs = https://example.invalid/a?x=1&y=2\n'],
    ['array shape', '# shape = (B, T, C)\n# out = [N, D]\n'],
    ['section number', '# see Section 3.2 = the proof\n# 2.1.4 = Setup\n'],
    ['index arithmetic', '# j = i + 1\n# last = n - 1\n# idx = x[i+1]\n'],
    ['ASCII art', '# +-----+ = +---+\n# x ---> y = z\n# |===| = |\n'],
    ['prose with an equals sign', '# the learning rate = a number we tune by hand\n'],
    ['configuration constant', '# lr = 0.001\n# eps = 1e-8\n'],
  ];
  for (const [label, src] of notFormulas) {
    it(`rejects ${label}`, () => assert.deepEqual(texts(src, 'a.py'), []));
  }
});
