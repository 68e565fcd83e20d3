// `slopewise inspect` through the built command line (out/cli.js): JSON and text output, exit codes,
// and errors as JSON on stdout with no stack trace. The derivative strings are checked by
// evaluating them with the full mathjs package at a few points.
import * as assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import * as fs from 'node:fs';
import * as path from 'node:path';
import { evaluate } from 'mathjs';

const CLI = path.resolve(__dirname, '..', '..', 'out', 'cli.js');

function run(args: string[]): { status: number | null; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [CLI, ...args], { encoding: 'utf8', timeout: 60_000 });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}

function json(args: string[]): Record<string, unknown> {
  const r = run([...args, '--format', 'json']);
  assert.equal(r.status, 0, r.stdout + r.stderr);
  assert.equal(r.stderr, '');
  return JSON.parse(r.stdout) as Record<string, unknown>;
}

function usageError(args: string[]): { message: string; position?: number } {
  const r = run(args);
  assert.equal(r.status, 2, r.stdout);
  assert.equal(r.stderr, '');
  assert.doesNotMatch(r.stdout, /\n\s+at /, 'stack trace in output');
  const parsed = JSON.parse(r.stdout) as { error: { message: string; position?: number } };
  assert.equal(typeof parsed.error.message, 'string');
  return parsed.error;
}

describe('cli: slopewise inspect', function () {
  this.timeout(60_000);
  before(() => assert.ok(fs.existsSync(CLI), `${CLI} is missing: run the build first`));

  it('prints the required JSON fields; derivatives evaluate in stock mathjs', () => {
    const r = json(['inspect', 'torch.sigmoid(x)']);
    for (const k of ['input', 'expression', 'variable', 'parameters', 'derivative', 'secondDerivative', 'derivativeDisplay', 'saturation', 'floatLimits']) {
      assert.ok(k in r, `missing ${k}`);
    }
    assert.equal(r.input, 'torch.sigmoid(x)');
    assert.equal(r.variable, 'x');
    assert.equal(r.derivativeDisplay, 'σ(x)·(1 − σ(x))');
    const s = (x: number) => 1 / (1 + Math.exp(-x));
    for (const x of [-2, 0.5, 3]) {
      assert.ok(Math.abs((evaluate(r.derivative as string, { x }) as number) - s(x) * (1 - s(x))) < 1e-15);
      assert.ok(Math.abs((evaluate(r.secondDerivative as string, { x }) as number) - s(x) * (1 - s(x)) * (1 - 2 * s(x))) < 1e-15);
    }
  });

  it('--var, --lang and repeated --param are honoured', () => {
    const r = json(['inspect', 'a * t + b', '--var', 't', '--param', 'a=2', '--param', 'b=-1', '--no-analysis']);
    assert.equal(r.variable, 't');
    assert.deepEqual(r.parameters, { a: 2, b: -1 });
    assert.equal(r.derivative, 'a');
    const c = json(['inspect', 'x ^ 2', '--lang', 'c', '--no-analysis']);
    assert.equal(c.language, 'c');
  });

  it('--saturation-threshold and --domain reach the analysis', () => {
    const r = json(['inspect', 'tanh(x)', '--saturation-threshold', '0.1', '--domain', '-20,20']);
    assert.equal(r.threshold, 0.1);
    assert.deepEqual(r.domain, [-20, 20]);
  });

  it('text format is for people: f, f′, f″ first', () => {
    const r = run(['inspect', 'softplus(x)', '--no-analysis']);
    assert.equal(r.status, 0);
    const lines = r.stdout.split('\n');
    assert.match(lines[0] ?? '', /^f\(x\) {2}= softplus\(x\)/);
    assert.match(lines[1] ?? '', /^f′\(x\) = σ\(x\)$/);
    assert.match(lines[2] ?? '', /^f″\(x\) = σ\(x\)·\(1 − σ\(x\)\)$/);
  });

  it('a formula the engine refuses is exit 2 with message and position', () => {
    const e = usageError(['inspect', 'f(x)=x^2; f(3)']);
    assert.equal(e.position, 8);
    assert.match(e.message, /one expression/);
    assert.equal(usageError(['inspect', 'x + fooo(x)']).position, 4);
  });

  it('10 000 nested parentheses are a clean error, not a crash', () => {
    const e = usageError(['inspect', '('.repeat(10_000) + 'x' + ')'.repeat(10_000)]);
    assert.match(e.message, /limit|deep/);
  });

  it('usage errors: missing formula, bad --param, bad --domain, unknown option, bad --lang', () => {
    assert.match(usageError(['inspect']).message, /needs a formula/);
    assert.match(usageError(['inspect', 'x', '--param', 'k']).message, /name=value/);
    assert.match(usageError(['inspect', 'x', '--param', 'k=abc']).message, /number/);
    assert.match(usageError(['inspect', 'x', '--domain', '3,1']).message, /a < b/);
    assert.match(usageError(['inspect', 'x', '--frobnicate']).message, /Unknown option/);
    assert.match(usageError(['inspect', 'x', '--lang', 'cobol']).message, /must be one of/);
    assert.match(usageError(['inspect', 'x', '--saturation-threshold', '-1']).message, /positive/);
  });

  it('inspect --help lists the options', () => {
    const r = run(['inspect', '--help']);
    assert.equal(r.status, 0);
    for (const o of ['--var', '--lang', '--param', '--format', '--saturation-threshold', '--domain']) assert.ok(r.stdout.includes(o), o);
  });
});
