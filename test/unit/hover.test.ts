/** The hover card: content, compactness, the hand-drawn SVG plot, command links. */
import { strict as assert } from 'node:assert';
import { buildHoverCard, num, interval, svgDataUri, type HoverInput } from '../../src/core/hover';
import { sparkSvg, pathData } from '../../src/core/plot/spark';
import { grid } from '../../src/core/plot/sample';

const sigmoid = (x: number): number => 1 / (1 + Math.exp(-x));
const xs = grid(-6, 6, 80);

// Float figures for the sigmoid as recorded in the shared library facts (IEEE 754 formats): the exact
// value rounds to 1 above ≈ 8.3175 in float16 and ≈ 6.2364 in bfloat16.
const SIGMOID: HoverInput = {
  input: '1/(1+exp(-x))',
  expression: '1 / (1 + exp(-x))',
  expressionDisplay: 'σ(x)',
  recognised: 'sigmoid',
  variable: 'x',
  derivative: 'exp(-x) / (1 + exp(-x)) ^ 2',
  derivativeDisplay: 'σ(x)·(1 − σ(x))',
  secondDerivativeDisplay: 'σ(x)·(1 − σ(x))·(1 − 2σ(x))',
  derivativeInOutput: 'y * (1 - y)',
  saturation: [{ from: null, to: -4.5951, kind: 'saturating' }, { from: 4.5951, to: null, kind: 'saturating' }],
  threshold: 0.01,
  kinks: [],
  range: { inf: 0, sup: 1, infAttained: false, supAttained: false },
  monotone: 'increasing',
  lipschitz: 0.25,
  lipschitzAt: 0,
  gain: 1.7,
  domain: [-100, 100],
  floatLimits: {
    float16: { breakdown: [{ from: 8.3175, to: 100, kind: 'inaccurate' }], derivative: { breakdown: [{ from: -100, to: -17.3, kind: 'zero' }] } },
    bfloat16: { breakdown: [{ from: 6.2364, to: 100, kind: 'inaccurate' }], derivative: null },
    float32: { breakdown: [], derivative: { breakdown: [] } },
  },
  spark: { xs, f: xs.map(sigmoid), df: xs.map((x) => sigmoid(x) * (1 - sigmoid(x))) },
};

describe('hover card', () => {
  const card = buildHoverCard(SIGMOID, {
    floatTypes: ['float16', 'float32'],
    links: { plot: 'command:slopewise.plotFormula?%5B%5D', copy: 'command:slopewise.copyDerivative?%5B%5D' },
  });
  const lines = card.split('\n');

  it('leads with the recognised name and the formula', () => {
    assert.equal(lines[0], '**sigmoid**  ');
    assert.equal(lines[1], '`f(x) = σ(x)`');
  });

  it('keeps the command links on the second line, above anything the widget might scroll away', () => {
    assert.equal(lines[3], '[$(graph-line) Plot](command:slopewise.plotFormula?%5B%5D "Plot f, f′ and f″ in a panel") · '
      + '[$(copy) Copy f′](command:slopewise.copyDerivative?%5B%5D "Copy the derivative as code")');
  });

  it('shows f′, f″ and f′ in terms of the output, one labelled line each', () => {
    assert.ok(lines.includes('**f′** `σ(x)·(1 − σ(x))`  '));
    assert.ok(lines.includes('**f″** `σ(x)·(1 − σ(x))·(1 − 2σ(x))`  '));
    assert.ok(lines.includes('**f′ in y = f(x)** `y * (1 - y)`'));
  });

  it('merges a patchy breakdown into one region and clips very long derivatives', () => {
    const slivers = Array.from({ length: 30 }, (_, i) => ({ from: -100 + i, to: -99.6 + i, kind: 'inaccurate' }));
    const c = buildHoverCard({ ...SIGMOID, secondDerivativeDisplay: 'x'.repeat(300),
      floatLimits: { float16: { breakdown: slivers, derivative: null } } }, { floatTypes: ['float16'] });
    assert.ok(c.includes('- `fp16` f inaccurate [−100, −70.6] (patchy)'), c);
    assert.ok(c.split('\n').some((l) => l.startsWith('**f″** `xxx') && l.includes('…') && l.length < 110));
  });

  it('states saturating ranges with open ends as ±∞, and the shape figures on one line', () => {
    assert.ok(card.includes('**saturates** (|f′| < 0.01) on (−∞, −4.595] ∪ [4.595, +∞)'), card);
    assert.ok(card.includes('- range (0, 1) · increasing · Lipschitz 0.25 at x = 0 · gain 1.7'), card);
  });

  it('has one line per requested float type, f and f′ breakdowns together, others left out', () => {
    const fp16 = lines.filter((l) => l.includes('`fp16`'));
    assert.deepEqual(fp16, ['- `fp16` f inaccurate [8.318, 100] · f′ flushes to 0 [−100, −17.3]']);
    assert.deepEqual(lines.filter((l) => l.includes('`fp32`')), ['- `fp32` no breakdown on [−100, 100]']);
    assert.equal(lines.filter((l) => l.includes('bf16')).length, 0);
  });

  it('embeds the plot as an SVG data URI and links to the plot and copy commands', () => {
    const img = /!\[[^\]]*\]\((data:image\/svg\+xml;base64,[A-Za-z0-9+/=]+)\)/.exec(card);
    assert.ok(img, 'an image');
    const svg = Buffer.from(img[1]!.split(',')[1]!, 'base64').toString('utf8');
    assert.match(svg, /^<svg xmlns="http:\/\/www.w3.org\/2000\/svg"/);
    assert.equal((svg.match(/<path /g) ?? []).length, 2);
    assert.ok(card.includes('[$(graph-line) Plot](command:slopewise.plotFormula?%5B%5D'));
    assert.ok(card.includes('[$(copy) Copy f′](command:slopewise.copyDerivative?%5B%5D'));
  });

  it('stays compact: at most 22 lines for a fully analysed formula', () => {
    assert.ok(lines.length <= 22, `${lines.length} lines:\n${card}`);
  });

  it('names the source function and says when the card is about a hand-written derivative', () => {
    const c = buildHoverCard({ ...SIGMOID, name: 'conf_grad', role: 'derivative', recognised: undefined }, { floatTypes: [] });
    assert.ok(c.startsWith('**conf\\_grad** *(hand-written derivative: f below is this function)*  \n`f(x) = σ(x)`'), c.split('\n')[0]);
    const d = buildHoverCard({ ...SIGMOID, name: 'squash' }, { floatTypes: [] });
    assert.ok(d.startsWith('**squash · sigmoid**  '), d.split('\n')[0]);
  });

  it('says what is unbound instead of showing figures it cannot have', () => {
    const c = buildHoverCard({ input: 'a*x', expression: 'a * x', variable: 'x', derivative: 'a', unbound: ['a'] }, { floatTypes: ['float16'] });
    assert.ok(c.includes('*unbound: a*'), c);
    assert.ok(!c.includes('fp16'));
  });

  it('escapes markdown in formulas (backticks cannot break out of the code span)', () => {
    const c = buildHoverCard({ input: 'x', expression: 'x`**bold**', variable: 'x', derivative: '1' }, { floatTypes: [] });
    assert.ok(c.startsWith('`` f(x) = x`**bold** ``'), c);
    assert.ok(!c.includes('**bold**  '));
  });
});

describe('hover numbers', () => {
  it('prints numbers with 4 significant digits and unicode signs', () => {
    assert.equal(num(-4.59512), '−4.595');
    assert.equal(num(1e-7), '1.00e-7');
    assert.equal(num(65504), '65504');
    assert.equal(num(null), '—');
    assert.equal(interval({ from: null, to: 0 }), '(−∞, 0]');
  });
});

describe('spark plot', () => {
  it('breaks the path at non-finite values instead of drawing through them', () => {
    const x = [0, 1, 2, 3, 4, 5];
    const y = [0, 1, NaN, 3, Infinity, 5];
    const d = pathData(x, y, (v) => v, (v) => v, [0, 5]);
    assert.equal(d, 'M0.0 0.0L1.0 1.0M3.0 3.0M5.0 5.0');
  });

  it('returns nothing when there is nothing finite to draw', () => {
    assert.equal(sparkSvg([0, 1], [NaN, NaN], [NaN, Infinity]), undefined);
  });

  it('does not let an exponential tail flatten the body', () => {
    const x = grid(-2, 30, 100);
    const svg = sparkSvg(x, x.map(Math.exp), x.map(Math.exp))!;
    assert.ok(svg.length < 8000, `${svg.length} bytes`);
    assert.match(svgDataUri(svg), /^data:image\/svg\+xml;base64,/);
  });
});
