import { strict as assert } from 'node:assert';
import { f16round } from '@petamoriken/float16';
import { math } from '../../../src/core/math';
import { compileScalar, compileRounded, compileMulti, compileSource, compileProbed, compileAsWritten, numberLiteral } from '../../../src/core/expr/compile';
import { SlopewiseError } from '../../../src/core/errors';
import { CATALOGUE } from '../../../src/core/expr/catalogue';
import { derive } from '../../../src/core/expr/derive';
import { parseFormula } from '../../../src/core/expr/parse';

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

/** The tree evaluated as written, every occurrence computed; Math.pow, or products for small powers. */
const straight = (node: ReturnType<typeof P>, variable: string, params: Record<string, number>, products = false) => {
  const f = compileAsWritten(node, [variable], params, { products });
  return (x: number) => f(x);
};

/** Identical results (Object.is, so −0 and NaN count). */
function assertSame(got: number, want: number, what: string): void {
  assert.ok(Object.is(got, want), `${what}: ${got} vs ${want}`);
}

/** Same value, or both NaN; equal infinities; else relative/absolute 1e-15 (a few ulps). */
function assertNear(got: number, want: number, what: string, tol = 1e-15): void {
  if (Number.isNaN(want)) return assert.ok(Number.isNaN(got), `${what}: ${got}, expected NaN`);
  if (!Number.isFinite(want)) return assert.equal(got, want, what);
  assert.ok(Math.abs(got - want) <= tol * Math.max(1, Math.abs(want)), `${what}: ${got} vs ${want} (diff ${got - want})`);
}

/** Inputs: a fine grid that avoids kinks, the kinks themselves, and the far tails. */
function samplePoints(domain: [number, number]): number[] {
  const [a, b] = domain;
  const xs: number[] = [];
  for (let i = 0; i <= 400; i++) xs.push(a + ((i + 0.37) / 401) * (b - a));
  for (const k of [-6, -3, -2.5, -1, -0.5, 0, 0.5, 1, 2.5, 3, 6, -40, 40, -800, 800]) if (k >= a && k <= b) xs.push(k);
  return xs;
}

describe('compile: shared sub-trees and products for powers (double precision)', () => {
  // Every catalogue function and both derivatives, against three references:
  // 1. the tree as written with the same products for powers, no sharing, no folding: computing a
  //    shared sub-tree once and folding constants are exact rewrites, so results are identical;
  // 2. the tree as written with Math.pow (the evaluator before these optimisations): x·x·x and
  //    Math.pow(x, 3) differ by an ulp, which the cancellation in forms like 1 − tanh²(u) amplifies,
  //    hence 1e-14 on the larger of |value| and 1 (most points agree to 1e-16);
  // 3. mathjs's own evaluator on the same tree (its own function implementations): 1e-13.
  for (const e of CATALOGUE) {
    it(`${e.name}: f, f′, f″ equal the as-written evaluation and mathjs evaluate`, () => {
      const isLoss = e.role === 'loss';
      const variable = e.args[0] as string;
      const given: Record<string, number> = isLoss ? { [e.args[1] as string]: e.name.includes('hinge') ? 1 : 0.3 } : {};
      const formula = parseFormula(`${e.name}(${e.args.join(', ')})`, { variable, params: given });
      const d = derive(formula);
      const params = formula.parameters;
      const domain: [number, number] = e.name === 'bce' ? [0.001, 0.999] : [-8, 8];
      const xs = samplePoints(domain);
      for (const [order, node] of [['f', formula.node], ["f'", d.firstNode], ["f''", d.secondNode]] as const) {
        const fast = compileScalar(node, variable, params);
        const same = straight(node, variable, params, true);
        const withPow = straight(node, variable, params);
        for (const x of xs) {
          const got = fast(x);
          assertSame(got, same(x), `${e.name} ${order} at ${x}`);
          assertNear(got, withPow(x), `${e.name} ${order} at ${x} vs Math.pow`, 1e-14);
          if (Number.isFinite(got) && Math.abs(x) < 50) {
            const m = node.evaluate({ ...params, [variable]: x }) as number | boolean;
            assertNear(got, typeof m === 'boolean' ? Number(m) : m, `${e.name} ${order} at ${x} vs mathjs evaluate`, 1e-13);
          }
        }
      }
    });
  }

  it('losses in two variables: compileMulti equals the as-written evaluation', () => {
    for (const e of CATALOGUE.filter((c) => c.role === 'loss')) {
      const node = P(e.definition);
      const params = Object.fromEntries(e.params.filter((p) => p.default !== undefined).map((p) => [p.name, p.default as number]));
      const [a, b] = e.args as [string, string];
      const fast = compileMulti(node, [a, b], params);
      for (const y of [-1, 0, 0.3, 1]) {
        const asWritten = straight(node, a, { ...params, [b]: y });
        for (const p of samplePoints(e.name === 'bce' ? [0.001, 0.999] : [-5, 5])) assertNear(fast(p, y), asWritten(p), `${e.name}(${p}, ${y})`, 1e-14);
      }
    }
  });

  it('writes x^3 as a product, no Math.pow; the rounded evaluator keeps Math.pow (one rounding per operation)', () => {
    const src = compileSource(P('0.044715 * x ^ 3 + x ^ 2 - x ^ (-2)'), 'x');
    assert.doesNotMatch(src, /Math\.pow/, src);
    assert.match(compileSource(P('x ^ 3'), 'x', {}, 'float32'), /Math\.pow/);
    // Not integer, or too large: Math.pow stays.
    assert.match(compileSource(P('x ^ 0.5'), 'x'), /Math\.pow/);
    assert.match(compileSource(P('x ^ 7'), 'x'), /Math\.pow/);
  });

  it('products for powers match Math.pow: exactly at 0, ±0, ±∞, NaN, ±1 and for x^±1; within 2 ulps otherwise', () => {
    for (const n of [-4, -3, -2, -1, 1, 2, 3, 4]) {
      const f = compileScalar(P(`x ^ ${n < 0 ? `(${n})` : n}`), 'x');
      const g = compileScalar(P(`(x + 0) ^ k`), 'x', { k: n });
      // IEEE 754 pow special cases (§9.2.1): pow(±0, n), pow(±∞, n), pow(NaN, n) for integer n ≠ 0.
      for (const x of [0, -0, Infinity, -Infinity, NaN, 1, -1]) {
        assert.ok(Object.is(f(x), Math.pow(x, n)), `x^${n} at ${x}: ${f(x)} vs ${Math.pow(x, n)}`);
        assert.ok(Object.is(g(x + 0), Math.pow(x + 0, n)), `(x+0)^${n} at ${x}`);
      }
      for (let x = -9.7; x < 9.7; x += 0.0731) {
        const want = Math.pow(x, n);
        if (Math.abs(n) === 1) assert.equal(f(x), want, `x^${n} at ${x}`);
        else assert.ok(Math.abs(f(x) - want) <= 4.5e-16 * Math.abs(want), `x^${n} at ${x}: ${f(x)} vs ${want}`);
      }
    }
  });

  it('computes a repeated sub-tree once', () => {
    // tanh′ = 1 − tanh², written with tanh(x) three times.
    const node = P('tanh(x) * (1 - tanh(x) ^ 2) + exp(-x ^ 2) / (1 + exp(-x ^ 2))');
    const src = compileSource(node, 'x');
    assert.equal(src.split('Math.tanh(').length - 1, 1, src);
    assert.equal(src.split('Math.exp(').length - 1, 1, src);
    const f = compileScalar(node, 'x');
    for (let x = -5; x <= 5; x += 0.1) {
      const t = Math.tanh(x);
      const u = Math.exp(-(x * x));
      assert.equal(f(x), t * (1 - t * t) + u / (1 + u));
    }
  });

  it('keeps work used by one branch inside that branch, and hoists work used by both or by the condition', () => {
    const oneBranch = compileSource(P('x > 0 ? exp(x) * exp(x) : -x'), 'x');
    assert.equal(oneBranch.split('Math.exp(').length - 1, 1, oneBranch);
    assert.ok(oneBranch.indexOf('Math.exp(') > oneBranch.indexOf('if ('), oneBranch);
    const both = compileSource(P('tanh(x) > 0.5 ? tanh(x) ^ 2 : 1 - tanh(x)'), 'x');
    assert.equal(both.split('Math.tanh(').length - 1, 1, both);
    const f = compileScalar(P('x > 0 ? exp(x) * exp(x) : (x < -1 ? exp(x) + 1 : log(-x) * log(-x))'), 'x');
    for (let x = -4; x <= 4; x += 0.05) {
      const want = x > 0 ? Math.exp(x) * Math.exp(x) : x < -1 ? Math.exp(x) + 1 : Math.log(-x) * Math.log(-x);
      assert.ok(Object.is(f(x), want), `at ${x}: ${f(x)} vs ${want}`);
    }
  });

  it('computes operations on constants once, at compile time, with the same result', () => {
    const src = compileSource(P('x / sqrt(2) * sqrt(2 / pi) + 0 * exp(1)'), 'x');
    assert.doesNotMatch(src, /Math\.(sqrt|exp)/, src);
    const f = compileScalar(P('x / sqrt(2) * sqrt(2 / pi)'), 'x');
    assert.equal(f(1.7), (1.7 / Math.sqrt(2)) * Math.sqrt(2 / Math.PI));
  });

  it('still refuses what is outside the whitelist, also inside shared or constant sub-trees', () => {
    for (const src of ['gamma(2) + x', 'x > 0 ? x : [1, 2]', 'f(x) = 1', 'y * y + x']) {
      assert.throws(() => compileScalar(P(src), 'x'), SlopewiseError, src);
    }
  });
});
