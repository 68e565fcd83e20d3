// The differentiator against outside references: the independent CAS algebrite (npm devDependency,
// given exact rationals; its derivative text is evaluated with the full mathjs package), handbook
// identities (Abramowitz & Stegun, DLMF), and piecewise rules.
import * as assert from 'node:assert/strict';
import * as mathjs from 'mathjs';
import type { MathNode } from 'mathjs';
import { derive, differentiate, parseFormula } from '../../../src/core/expr';
import { STOCK_DERIVATIVE_NAMES, stockDerivative } from '../../../src/core/expr/differentiate';
import { math } from '../../../src/core/math';
import { POINTS, assertClose, stockFn } from './support';
// algebrite ships no types.
// eslint-disable-next-line @typescript-eslint/no-require-imports
const Algebrite = require('algebrite') as { run(s: string): string };

/** [ours, the same function in exact rationals for algebrite, points] */
const AGAINST_ALGEBRITE: [string, string, number[]][] = [
  ['sigmoid(x)', '1/(1+exp(-x))', POINTS],
  ['tanh(x)', 'tanh(x)', POINTS],
  ['softplus(x)', 'log(1+exp(x))', POINTS],
  ['gelu_tanh(x)', '1/2*x*(1+tanh(sqrt(2/pi)*(x+44715/1000000*x^3)))', POINTS],
  ['gelu(x)', '1/2*x*(1+erf(x/sqrt(2)))', POINTS],
  ['gelu_sigmoid(x)', 'x/(1+exp(-1702/1000*x))', POINTS],
  ['silu(x)', 'x/(1+exp(-x))', POINTS],
  ['mish(x)', 'x*tanh(log(1+exp(x)))', POINTS],
  ['logsigmoid(x)', '-log(1+exp(-x))', POINTS],
  ['tanhshrink(x)', 'x-tanh(x)', POINTS],
  ['normal_pdf(x)', 'exp(-x^2/2)/sqrt(2*pi)', POINTS],
  ['bce(p, 0.3)', '-(3/10*log(p)+(1-3/10)*log(1-p))', [0.1, 0.4, 0.7, 0.9]],
  ['x^x', 'x^x', [0.3, 1.2, 2.5]],
  ['exp(-x^2) * log(1 + x^2)', 'exp(-x^2)*log(1+x^2)', POINTS],
];

describe('differentiate: against algebrite (independent CAS)', () => {
  for (const [ours, exact, points] of AGAINST_ALGEBRITE) {
    it(`${ours}: f′ and f″ agree with algebrite`, () => {
      const f = parseFormula(ours);
      const d = derive(f);
      const v = f.variable;
      // algebrite d(f, v) and d(f, v, 2), printed as text, evaluated by the full mathjs package.
      const a1 = stockFn(Algebrite.run(`d(${exact},${v})`), v);
      const a2 = stockFn(Algebrite.run(`d(${exact},${v},2)`), v);
      const o1 = stockFn(d.first, v);
      const o2 = stockFn(d.second, v);
      for (const x of points) {
        assertClose(o1(x), a1(x), 1e-12, `${ours} f′(${x})`);
        assertClose(o2(x), a2(x), 1e-11, `${ours} f″(${x})`);
      }
    });
  }
});

describe('differentiate: handbook identities', () => {
  const node = (s: string) => parseFormula(s).node;
  const check = (expr: string, expected: string, points = POINTS): void => {
    const d = differentiate(node(expr), 'x').toString();
    const ours = stockFn(d, 'x');
    const ref = stockFn(expected, 'x');
    for (const x of points) assertClose(ours(x), ref(x), 1e-13, `d/dx ${expr} at ${x}`);
  };
  it('d/dx erf x = 2/√π·e^(−x²) (Abramowitz & Stegun 7.1.19; DLMF 7.10.1)', () => {
    check('erf(x)', '2 / sqrt(pi) * exp(-x^2)');
    assert.equal(differentiate(node('erf(x)'), 'x').toString(), '2 / sqrt(pi) * exp(-x ^ 2)');
  });
  it('d/dx tanh x = sech² x (DLMF §4.34; section from memory)', () => check('tanh(x)', 'sech(x)^2'));
  it('d/dx ln(1 + x) = 1/(1 + x) (d/dx ln x = 1/x with the chain rule; standard, from memory)', () => check('log1p(x)', '1 / (1 + x)', [0.2, 1.5, 4]));
  it('d/dx (eˣ − 1) = eˣ (standard, from memory)', () => check('expm1(x)', 'exp(x)'));
  it('d/dx asinh x = 1/√(1 + x²) (A&S §4.6; equation number from memory)', () => check('asinh(x)', '1 / sqrt(1 + x^2)'));
  it('d/dx atan x = 1/(1 + x²) (A&S §4.4; equation number from memory)', () => check('atan(x)', '1 / (1 + x^2)'));
  it('d/dx |x| = sign x away from 0', () => check('abs(x)', 'sign(x)'));
  it('d²/dx² σ = σ(1 − σ)(1 − 2σ) (from σ′ = σ(1 − σ))', () => {
    const d2 = derive(parseFormula('sigmoid(x)')).second;
    check('sigmoid(x)', '1 / (1 + exp(-x)) * (1 - 1 / (1 + exp(-x)))');
    const f = stockFn(d2, 'x');
    const s = (x: number) => 1 / (1 + Math.exp(-x));
    for (const x of POINTS) assertClose(f(x), s(x) * (1 - s(x)) * (1 - 2 * s(x)), 1e-14, `σ″(${x})`);
  });
});

describe('differentiate: piecewise rules', () => {
  it('max and min become conditionals, with the variable side compared', () => {
    assert.equal(differentiate(parseFormula('max(x, 0)').node, 'x').toString(), '(x > 0) ? 1 : 0');
    assert.equal(differentiate(parseFormula('max(0, x)').node, 'x').toString(), '(x > 0) ? 1 : 0');
    assert.equal(differentiate(parseFormula('min(x, 1)').node, 'x').toString(), '(x < 1) ? 1 : 0');
  });
  it('conditionals differentiate branch-wise and are lifted to the top', () => {
    const d = differentiate(parseFormula('2 * (x > 0 ? x^2 : 3*x)').node, 'x');
    assert.equal(d.type, 'ConditionalNode');
    const f = stockFn(d.toString(), 'x');
    assertClose(f(1.5), 6, 1e-15, 'right branch');
    assertClose(f(-1.5), 6, 1e-15, 'left branch');
  });
  it('repeated conditions merge when lifted (no c ? (c ? a : b) : …)', () => {
    const d = derive(parseFormula('leaky_relu(x) * leaky_relu(x)'));
    assert.equal((d.first.match(/\?/g) ?? []).length, 1, d.first);
  });
  it('the derivative of a formula without the variable is 0', () => {
    assert.equal(differentiate(parseFormula('a * b', { variable: 'x' }).node, 'x').toString(), '0');
  });
  it('every derivative is evaluable by stock mathjs with only the variable and parameters in scope', () => {
    for (const s of ['elu(x, alpha)', 'huber(p, y, delta)', 'x > 0 and x < 1 ? x^2 : 0', 'clamp(x, -1, 1) * exp(-x)']) {
      const f = parseFormula(s, { params: { alpha: 0.5, y: 0.1, delta: 0.7 } });
      const d = derive(f);
      for (const text of [f.expression, d.first, d.second]) {
        const v = math.parse(text);
        assert.ok(v);
        const fn = stockFn(text, f.variable, f.parameters);
        assert.ok(Number.isFinite(fn(0.37)), `${text}`);
      }
    }
  });
});

describe('differentiate: the stock one-argument rules are the trees mathjs derivative builds', () => {
  // Outside reference: mathjs's own derivative, from the full mathjs package (npm), with
  // simplify: false: our table must give the same tree node for node, parentheses aside (the
  // differentiator rebuilds the tree without them), and cover every function it differentiates.
  type Shown = string;
  const show = (n: MathNode): Shown => {
    const a = n as unknown as { value?: unknown; name?: string; fn?: { name?: string } | string; op?: string; args?: MathNode[]; content?: MathNode };
    switch (n.type) {
      case 'ParenthesisNode': return show(a.content as MathNode);
      case 'ConstantNode': return `C(${String(a.value)})`;
      case 'SymbolNode': return `S(${a.name})`;
      case 'FunctionNode': return `F(${(a.fn as { name: string }).name}: ${(a.args ?? []).map(show).join(', ')})`;
      case 'OperatorNode': return `O(${a.op} ${String(a.fn)}: ${(a.args ?? []).map(show).join(', ')})`;
      default: return n.type;
    }
  };
  const viaMathjs = (name: string): MathNode => mathjs.derivative(mathjs.parse(`${name}(__t)`), '__t', { simplify: false });
  // Functions the differentiator's own rules handle before the table is consulted.
  const OWN_RULES = new Set(['sigmoid', 'softplus', 'exp', 'log', 'tanh', 'erf', 'log1p', 'expm1', 'abs', 'sign', 'max', 'min']);

  for (const name of STOCK_DERIVATIVE_NAMES) {
    it(`${name}′ is mathjs's tree`, () => {
      assert.equal(show(stockDerivative(name)), show(viaMathjs(name)));
    });
  }

  it('every function mathjs differentiates with one argument has a rule, ours or the table', () => {
    const names = Object.keys(mathjs).filter((k) => typeof (mathjs as unknown as Record<string, unknown>)[k] === 'function' && /^[a-z]\w*$/.test(k));
    const accepted = names.filter((name) => {
      try {
        viaMathjs(name);
        return true;
      } catch {
        return false;
      }
    });
    assert.ok(accepted.length > 20, accepted.join(', '));
    assert.deepEqual(accepted.filter((n) => !OWN_RULES.has(n) && !STOCK_DERIVATIVE_NAMES.includes(n)), []);
  });

  it('a function without a rule is refused with mathjs\'s words, as before', () => {
    assert.throws(() => stockDerivative('gamma'), (e: Error) => {
      assert.equal(e.message, errorOf(() => viaMathjs('gamma')).replace(/^/, 'No derivative rule for gamma(): '));
      return true;
    });
    assert.throws(() => differentiate(math.parse('gamma(x)'), 'x'), /No derivative rule for gamma\(\)/);
  });

  it('chain rule through a table rule: d/dx tan(x²) = sec(x²)²·2x (handbook: tan′ = sec²)', () => {
    const d = stockFn(differentiate(math.parse('tan(x^2)'), 'x').toString(), 'x');
    for (const x of [-1.1, -0.4, 0.3, 0.9]) assertClose(d(x), 2 * x / Math.cos(x * x) ** 2, 1e-13, `at ${x}`);
  });
});

function errorOf(f: () => unknown): string {
  try {
    f();
  } catch (e) {
    return (e as Error).message;
  }
  throw new Error('expected an error');
}
