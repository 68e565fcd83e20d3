/**
 * Code emission: every emitted expression must compute what the canonical tree computes.
 * Reference values: stock mathjs `evaluate` on the canonical text (mathjs is the project's parser, but
 * its evaluator is independent of our generator). Where a compiler or interpreter for the target
 * language is installed (python3 + numpy, gcc, g++, rustc, java), the emitted code is compiled and run
 * there — the real check; otherwise that language's run is skipped and only its text is checked.
 */
import { strict as assert } from 'node:assert';
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { create, all } from 'mathjs';
import { math } from '../../src/core/math';
import { emitCode, emitFunction, emitLanguageFor, type EmitLanguage } from '../../src/core/emit';

const stock = create(all!, {});

const CASES = [
  '1 / (1 + exp(-x))',
  'x > 0 ? x : 0.5 * (exp(x) - 1)',
  '0.5 * x * (1 + tanh(0.7978845608028654 * (x + 0.044715 * x ^ 3)))',
  'log(1 + exp(x))',
  'log1p(exp(-abs(x))) + max(x, 0)',
  '-x ^ 2',
  '(-x) ^ 2',
  'x - (x - 1) / (2 * x)',
  'sign(x) * abs(x) ^ 0.5',
  'x < 0 ? -x : (x > 1 ? 1 : x)',
  'min(max(x, -1), 1)',
  'exp(-x ^ 2 / 2) / sqrt(2 * pi)',
  'sqrt(x ^ 2 + 1) - expm1(x / 3)',
  'x >= -1 and x <= 1 ? x ^ 3 : 2 ^ x',
];
const XS = [-3.1, -1, -0.25, 0.3, 0.9, 2.5];

function reference(expr: string, x: number): number {
  return Number(stock.evaluate(expr, { x }));
}

const close = (a: number, b: number, rel: number): boolean => a === b || Math.abs(a - b) <= rel * Math.max(1, Math.abs(b));

function have(cmd: string, args: string[]): boolean {
  const r = spawnSync(cmd, args, { encoding: 'utf8' });
  return !r.error && r.status === 0;
}

function run(cmd: string, args: string[], cwd: string): string {
  const r = spawnSync(cmd, args, { cwd, encoding: 'utf8', timeout: 60_000 });
  if (r.error || r.status !== 0) throw new Error(`${cmd} ${args.join(' ')} failed:\n${r.stderr}\n${r.stdout}`);
  return r.stdout;
}

function compareOutput(lang: string, out: string, rel: number): void {
  const lines = out.trim().split('\n');
  assert.equal(lines.length, CASES.length * XS.length, `${lang}: one value per case and point`);
  let i = 0;
  for (const expr of CASES) {
    for (const x of XS) {
      const got = Number(lines[i++]);
      const want = reference(expr, x);
      assert.ok(close(got, want, rel), `${lang}: ${expr} at x = ${x}: got ${got}, mathjs ${want}`);
    }
  }
}

describe('emitCode', () => {
  const parse = (s: string) => math.parse(s);

  it('JavaScript and TypeScript output evaluates like mathjs at every point', () => {
    for (const expr of CASES) {
      const code = emitCode(parse(expr), 'javascript');
      assert.equal(emitCode(parse(expr), 'typescript'), code);
      const fn = new Function('x', `return ${code};`) as (x: number) => number;
      for (const x of XS) assert.ok(close(fn(x), reference(expr, x), 1e-12), `${expr} → ${code} at ${x}`);
    }
  });

  it('writes conditionals in each language\'s own form', () => {
    const n = parse('x > 0 ? x : 0.1 * x');
    assert.equal(emitCode(n, 'python'), 'x if x > 0.0 else 0.1 * x');
    assert.equal(emitCode(n, 'numpy'), 'np.where(x > 0.0, x, 0.1 * x)');
    assert.equal(emitCode(n, 'pytorch'), 'torch.where(x > 0.0, x, 0.1 * x)');
    assert.equal(emitCode(n, 'c'), 'x > 0.0f ? x : 0.1f * x');
    assert.equal(emitCode(n, 'cuda'), 'x > 0.0f ? x : 0.1f * x');
    assert.equal(emitCode(n, 'rust'), 'if x > 0.0_f32 { x } else { 0.1_f32 * x }');
    assert.equal(emitCode(n, 'julia'), 'x > 0.0 ? x : 0.1 * x');
    assert.equal(emitCode(n, 'go'), 'func() float64 { if x > 0.0 { return x }; return 0.1 * x }()');
    assert.equal(emitCode(n, 'java'), 'x > 0.0 ? x : 0.1 * x');
  });

  it('uses float functions and suffixes in C and CUDA, std:: in C++', () => {
    const n = parse('exp(-x) + tanh(x) + max(x, 0)');
    assert.equal(emitCode(n, 'c'), 'expf(-x) + tanhf(x) + fmaxf(x, 0.0f)');
    assert.equal(emitCode(n, 'cpp'), 'std::exp(-x) + std::tanh(x) + std::fmax(x, 0.0f)');
  });

  it('PyTorch clamps against a number instead of calling torch.maximum on a float', () => {
    assert.equal(emitCode(parse('max(x, 0)'), 'pytorch'), 'torch.clamp(x, min=0.0)');
    assert.equal(emitCode(parse('max(x, y)'), 'pytorch'), 'torch.maximum(x, y)');
  });

  it('keeps a unary minus away from ** in JavaScript (a syntax error there)', () => {
    const code = emitCode(parse('(-x) ^ 2'), 'javascript');
    assert.equal(code, '(-x) ** 2');
    assert.equal(emitCode(parse('-x ^ 2'), 'javascript'), '-(x ** 2)');
  });

  it('inlines bound parameters as literals', () => {
    const n = parse('alpha * (exp(x) - 1)');
    assert.equal(emitCode(n, 'c', { params: { alpha: 1.5 } }), '1.5f * (expf(x) - 1.0f)');
  });

  it('refuses functions a language lacks, naming them', () => {
    assert.throws(() => emitCode(parse('erf(x)'), 'javascript'), /erf\(\) has no standard-library equivalent in javascript/);
    assert.throws(() => emitCode(parse('erf(x)'), 'rust'), /erf/);
  });

  it('picks NumPy or PyTorch for Python files that import them', () => {
    assert.equal(emitLanguageFor('python', 'import torch\n'), 'pytorch');
    assert.equal(emitLanguageFor('python', 'import numpy as np\n'), 'numpy');
    assert.equal(emitLanguageFor('python', 'import math\n'), 'python');
    assert.equal(emitLanguageFor('cuda'), 'cuda');
    assert.equal(emitLanguageFor('fortran'), undefined);
  });

  it('emitFunction declares free parameters after the variable', () => {
    const src = emitFunction('d_elu', parse('x > 0 ? 1 : alpha * exp(x)'), 'x', 'typescript');
    assert.equal(src, 'function d_elu(x: number, alpha: number): number {\n  return x > 0 ? 1 : alpha * Math.exp(x);\n}');
    const fn = new Function(`${src.replace(/: number/g, '')}; return d_elu;`)() as (x: number, a: number) => number;
    assert.equal(fn(-1, 2), 2 * Math.exp(-1));
  });

  describe('compiled and run in the target language (skipped where the tool is missing)', function () {
    this.timeout(120_000);
    let dir: string;
    before(() => { dir = fs.mkdtempSync(path.join(os.tmpdir(), 'slopewise-emit-')); });
    after(() => fs.rmSync(dir, { recursive: true, force: true }));

    const pyProgram = (lang: EmitLanguage, header: string): string => {
      const lines = [header];
      CASES.forEach((e, i) => lines.push(emitFunction(`f${i}`, math.parse(e), 'x', lang)));
      lines.push(`for f in [${CASES.map((_, i) => `f${i}`).join(', ')}]:`,
        `    for x in [${XS.join(', ')}]:`, '        print(repr(float(f(x))))');
      return lines.join('\n');
    };

    it('Python (math)', function () {
      if (!have('python3', ['--version'])) this.skip();
      fs.writeFileSync(path.join(dir, 'a.py'), pyProgram('python', 'import math'));
      compareOutput('python', run('python3', ['a.py'], dir), 1e-12);
    });

    it('Python (NumPy)', function () {
      if (!have('python3', ['-c', 'import numpy'])) this.skip();
      fs.writeFileSync(path.join(dir, 'b.py'), pyProgram('numpy', 'import numpy as np\nnp.seterr(all="ignore")'));
      compareOutput('numpy', run('python3', ['b.py'], dir), 1e-12);
    });

    const cProgram = (lang: 'c' | 'cpp'): string => {
      const lines = [lang === 'c' ? '#include <math.h>\n#include <stdio.h>' : '#include <cmath>\n#include <cstdio>'];
      CASES.forEach((e, i) => lines.push(emitFunction(`f${i}`, math.parse(e), 'x', lang)));
      lines.push(`typedef float (*fn)(float);\nint main(void) {\n  fn fs[] = {${CASES.map((_, i) => `f${i}`).join(', ')}};`,
        `  float xs[] = {${XS.map((x) => `(float)${x}`).join(', ')}};`,
        `  for (int i = 0; i < ${CASES.length}; i++) for (int j = 0; j < ${XS.length}; j++) printf("%.9g\\n", (double)fs[i](xs[j]));`,
        '  return 0;\n}');
      return lines.join('\n');
    };

    it('C (float, gcc)', function () {
      if (!have('gcc', ['--version'])) this.skip();
      fs.writeFileSync(path.join(dir, 'a.c'), cProgram('c'));
      run('gcc', ['-std=c11', '-Wall', '-Werror', '-o', 'ac', 'a.c', '-lm'], dir);
      compareOutput('c', run(path.join(dir, 'ac'), [], dir), 2e-6);
    });

    it('C++ (float, g++)', function () {
      if (!have('g++', ['--version'])) this.skip();
      fs.writeFileSync(path.join(dir, 'a.cpp'), cProgram('cpp'));
      run('g++', ['-std=c++17', '-Wall', '-Werror', '-o', 'acpp', 'a.cpp'], dir);
      compareOutput('cpp', run(path.join(dir, 'acpp'), [], dir), 2e-6);
    });

    it('Rust (f32, rustc)', function () {
      if (!have('rustc', ['--version'])) this.skip();
      const lines = ['#![allow(dead_code, unused_parens)]'];
      CASES.forEach((e, i) => lines.push(emitFunction(`f${i}`, math.parse(e), 'x', 'rust')));
      lines.push(`fn main() {\n  let fs: [fn(f32) -> f32; ${CASES.length}] = [${CASES.map((_, i) => `f${i}`).join(', ')}];`,
        `  for f in fs.iter() { for x in [${XS.map((x) => `${x}_f32`).join(', ')}] { println!("{:e}", f(x)); } }\n}`);
      fs.writeFileSync(path.join(dir, 'a.rs'), lines.join('\n'));
      run('rustc', ['--edition=2021', '-o', 'ars', 'a.rs'], dir);
      compareOutput('rust', run(path.join(dir, 'ars'), [], dir), 2e-6);
    });

    it('Java (double, single-file launch)', function () {
      if (!have('java', ['-version'])) this.skip();
      const lines = ['public class A {'];
      CASES.forEach((e, i) => lines.push(emitFunction(`f${i}`, math.parse(e), 'x', 'java')));
      lines.push('  public static void main(String[] a) {',
        `    double[] xs = {${XS.join(', ')}};`,
        `    java.util.function.DoubleUnaryOperator[] fs = {${CASES.map((_, i) => `A::f${i}`).join(', ')}};`,
        '    for (var f : fs) for (double x : xs) System.out.println(f.applyAsDouble(x));', '  }', '}');
      fs.writeFileSync(path.join(dir, 'A.java'), lines.join('\n'));
      compareOutput('java', run('java', ['A.java'], dir), 1e-12);
    });
  });
});
