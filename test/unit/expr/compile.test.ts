import { strict as assert } from 'node:assert';
import { f16round } from '@petamoriken/float16';
import { math } from '../../../src/core/math';
import { compileScalar, compileRounded, compileMulti, compileSource, compileProbed, numberLiteral } from '../../../src/core/expr/compile';
import { SlopewiseError } from '../../../src/core/errors';

const P = (s: string) => math.parse(s);

describe('compile: double precision', () => {
  const cases: Array<[string, Record<string, number>]> = [
    ['1 / (1 + exp(-x))', {}],
    ['0.5 * x * (1 + tanh(sqrt(2 / pi) * (x + 0.044715 * x ^ 3)))', {}],
    ['x > 0 ? x : alpha * (exp(x) - 1)', { alpha: 1.5 }],
    ['max(x, 0) + log1p(exp(-abs(x)))', {}],
    ['0.5 * x * (1 + erf(x / sqrt(2)))', {}],
    ['x / (1 + abs(x)) - sign(x) + cbrt(x) + expm1(x / 10)', {}],
    ['x >= 0 and x <= 6 ? x : (x > 6 ? 6 : 0)', {}],
    ['log(abs(x) + 1, 2) + cosh(x / 4) + asinh(x) + atan(x) + min(x, 1, 2) + x % 3', {}],
    ['not (x < 1) or x == -2 ? e : -x', {}],
  ];
  // Reference: mathjs's own evaluate on the same tree (the tree is ours, not user text).
  for (const [src, params] of cases) {
    it(`matches mathjs evaluate for ${src}`, () => {
      const node = P(src);
      const f = compileScalar(node, 'x', params);
      for (let x = -7.3; x <= 7.3; x += 0.173) {
        const want = node.evaluate({ x, ...params }) as number;
        const got = f(x);
        const w = typeof want === 'boolean' ? Number(want) : want;
        if (Number.isNaN(w)) assert.ok(Number.isNaN(got), `${src} at ${x}: ${got} vs NaN`);
        else assert.ok(Math.abs(got - w) <= 1e-15 * Math.max(1, Math.abs(w)), `${src} at ${x}: ${got} vs ${w}`);
      }
    });
  }
  it('erf matches handbook values (from memory, as tabulated in Abramowitz & Stegun table 7.1)', () => {
    const f = compileScalar(P('erf(x)'), 'x');
    // A&S 7.1: erf(0.5) = 0.5204998778, erf(1) = 0.8427007929, erf(2) = 0.9953222650
    assert.ok(Math.abs(f(0.5) - 0.5204998778) < 1e-10);
    assert.ok(Math.abs(f(1) - 0.8427007929) < 1e-10);
    assert.ok(Math.abs(f(-2) + 0.9953222650) < 1e-10);
  });
  it('sech is 1 / cosh (handbook definition)', () => {
    const f = compileScalar(P('sech(x)'), 'x');
    assert.equal(f(0), 1);
    assert.ok(Math.abs(f(1) - 0.6480542736638855) < 1e-15);
  });
  it('refuses node types outside the whitelist', () => {
    for (const src of ['f(x) = x^2', '{a: 1}["a"]', '[1, 2]', 'x = 3', 'a.b', '"text"', 'gamma(x)', 'x[1]', 'y + x']) {
      let err: unknown;
      try {
        compileScalar(P(src), 'x');
      } catch (e) {
        err = e;
      }
      assert.ok(err instanceof SlopewiseError, `${src} should be refused, got ${String(err)}`);
    }
  });
  it('does not resolve symbols through the prototype chain', () => {
    for (const src of ['constructor', 'x + toString', '__proto__ * x', 'hasOwnProperty(x)', 'valueOf(x)']) {
      assert.throws(() => compileScalar(P(src), 'x', {}), SlopewiseError, src);
    }
  });
  it('emits only numeric literals for constants and parameters', () => {
    const src = compileSource(P('a * x + 1e-300 - 2.5e+300'), 'x', { a: -0.25 });
    assert.ok(src.includes('(-0.25)) * (v0)'), src);
    assert.doesNotMatch(src, /\ba\b/);
    assert.equal(numberLiteral(-0), '(-0)');
    assert.equal(numberLiteral(1e21), '1e+21');
    assert.throws(() => numberLiteral('1;alert(1)' as unknown as number));
  });
  it('compileMulti binds variables in order', () => {
    const f = compileMulti(P('-(y * log(p) + (1 - y) * log(1 - p))'), ['p', 'y']);
    assert.ok(Math.abs(f(0.25, 1) - Math.log(4)) < 1e-15);
    assert.ok(Math.abs(f(0.25, 0) - Math.log(4 / 3)) < 1e-15);
  });
});

describe('compile: probed', () => {
  it('reports every operation’s value, in tree order, and returns the same result', () => {
    const seen: Array<[number, number]> = [];
    const { fn, operations } = compileProbed(P('log(1 + exp(x))'), 'x', {}, (k, v) => {
      seen.push([k, v]);
      return v;
    });
    assert.deepEqual(operations.map((o) => o.toString()), ['exp(x)', '1 + exp(x)', 'log(1 + exp(x))']);
    assert.equal(fn(2), Math.log(1 + Math.exp(2)));
    assert.deepEqual(seen.map(([k]) => k), [0, 1, 2]);
    assert.equal(seen[0]?.[1], Math.exp(2));
  });
});

describe('compile: rounded to a float type', () => {
  it('float32: matches a hand-written Math.fround evaluation of the sigmoid', () => {
    const f = compileRounded(P('1 / (1 + exp(-x))'), 'x', {}, 'float32');
    const F = Math.fround;
    for (let x = -100; x <= 100; x += 0.37) {
      const xr = F(x);
      const want = F(F(1) / F(F(1) + F(Math.exp(F(-xr)))));
      assert.equal(f(x), want);
    }
  });
  it('float16: exp overflows at ln(65504 + 16) ≈ 11.0901 (IEEE 754 binary16 max 65504, ulp 32 there)', () => {
    const f = compileRounded(P('exp(x)'), 'x', {}, 'float16');
    // Inputs are rounded too: 11.0859375 is the last binary16 value below ln(65520) = 11.09011.
    assert.equal(f(11.0859375), f16round(Math.exp(11.0859375)));
    assert.ok(Number.isFinite(f(11.0859375)));
    assert.equal(f(11.09375), Infinity);
  });
  it('float16: softplus as written overflows above x ≈ 11.09, the stable form does not', () => {
    const naive = compileRounded(P('log(1 + exp(x))'), 'x', {}, 'float16');
    const stable = compileRounded(P('max(x, 0) + log1p(exp(-abs(x)))'), 'x', {}, 'float16');
    assert.equal(naive(12), Infinity);
    assert.equal(stable(12), f16round(12 + Math.log1p(Math.exp(-12))));
  });
  it('rounds constants: 0.1 in bfloat16 is 0.10009765625', () => {
    const f = compileRounded(P('0.1 + 0 * x'), 'x', {}, 'bfloat16');
    assert.equal(f(1), 0.10009765625);
  });
});
