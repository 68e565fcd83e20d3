/**
 * The plot spec: valid against vega-lite's published JSON schema, compiles with vega-lite, and renders
 * with vega (in Node, renderer "none") to exactly the marks the data implies.
 */
import { strict as assert } from 'node:assert';
import fs from 'node:fs';
import { createRequire } from 'node:module';
import Ajv from 'ajv';
import { buildPlotData, buildPlotSpec, plotTemplate, type CurveInput } from '../../../src/core/plot/spec';
import { countMarks } from '../../../src/core/plot/marks';

const require_ = createRequire(__filename);

const sigmoid = (x: number): number => 1 / (1 + Math.exp(-x));
// Handbook identity: σ′ = σ(1 − σ), σ″ = σ′(1 − 2σ).
const SIGMOID: CurveInput = {
  label: 'sigmoid',
  f: sigmoid,
  df: (x) => sigmoid(x) * (1 - sigmoid(x)),
  d2f: (x) => sigmoid(x) * (1 - sigmoid(x)) * (1 - 2 * sigmoid(x)),
  saturation: [{ from: null, to: -4.59, kind: 'saturating' }, { from: 4.59, to: null, kind: 'saturating' }],
  breakdown: { float16: [{ from: 8.32, to: null, kind: 'inaccurate' }] },
};
const RELU: CurveInput = {
  label: 'relu',
  f: (x) => Math.max(x, 0),
  df: (x) => (x > 0 ? 1 : 0),
  d2f: () => 0,
  saturation: [{ from: null, to: 0, kind: 'dead' }],
  kinks: [0],
};

async function render(spec: object): Promise<{ counts: Record<string, number>; vg: Record<string, unknown>; warnings: string[] }> {
  const vl = await import('vega-lite');
  const vega = await import('vega');
  const warnings: string[] = [];
  const logger = {
    level: () => logger, error: (...a: unknown[]) => { warnings.push(a.join(' ')); return logger; },
    warn: (...a: unknown[]) => { warnings.push(a.join(' ')); return logger; },
    info: () => logger, debug: () => logger,
  };
  const vg = vl.compile(spec as never, { logger: logger as never }).spec as unknown as Record<string, unknown>;
  const view = new vega.View(vega.parse(vg as never), { renderer: 'none' });
  view.width(640).height(360);
  await view.runAsync();
  await view.toSVG();
  const counts = countMarks((view.scenegraph() as unknown as { root: unknown }).root);
  view.finalize();
  return { counts, vg, warnings };
}

describe('plot spec', function () {
  this.timeout(30_000);

  it('is valid against vega-lite\'s JSON schema (build/vega-lite-schema.json), with and without data', () => {
    const schema = JSON.parse(fs.readFileSync(require_.resolve('vega-lite/vega-lite-schema.json'), 'utf8'));
    const ajv = new Ajv({ strict: false, allErrors: true, validateFormats: false });
    const validate = ajv.compile(schema);
    const data = buildPlotData([SIGMOID, RELU], { domain: [-6, 6], samples: 120, floatType: 'float16', variable: 'z' });
    for (const spec of [plotTemplate(), buildPlotSpec(data)]) {
      const ok = validate(spec);
      assert.ok(ok, JSON.stringify(validate.errors?.slice(0, 5), null, 1));
    }
  });

  it('renders one line per visible curve and segment, a rect per range, a diamond per kink', async () => {
    const data = buildPlotData([SIGMOID, RELU], { domain: [-10, 10], samples: 100, floatType: 'float16' });
    const { counts, warnings } = await render(buildPlotSpec(data));
    assert.deepEqual(warnings, []);
    // f and f′ shown by default (f″ off): 2 formulas × 2 layers, one segment each.
    assert.equal(counts.line, 4);
    // sigmoid: two saturating ranges + one float16 breakdown; relu: one dead range → 4 rects.
    assert.equal(counts.rect, 4);
    // Rules: the zero line and the kink's rule.
    assert.equal(counts.rule, 2);
    assert.equal(counts.symbol, 1);
  });

  it('breaks lines at NaN and ±∞ instead of joining across them', async () => {
    const curve: CurveInput = { label: 'pole', f: (x) => 1 / x, df: (x) => -1 / (x * x) };
    // 101 points on [-1, 1] hit x = 0 exactly: ±∞ there, and NaN for log of negatives below.
    const data = buildPlotData([curve, { label: 'log', f: Math.log, df: (x) => 1 / x }],
      { domain: [-1, 1], samples: 101, floatType: 'float32' });
    assert.ok(data.series.every((r) => r.y !== null && Number.isFinite(r.y)));
    const segs = new Set(data.series.filter((r) => r.curve === 'pole' && r.layer === 'f').map((r) => r.segment));
    assert.equal(segs.size, 2);
    const logXs = data.series.filter((r) => r.curve === 'log' && r.layer === 'f').map((r) => r.x);
    assert.ok(Math.min(...logXs) > 0);
    const { counts } = await render(buildPlotSpec(data));
    // pole: f and f′ each split in two at 0; log: f only right of 0, f′ = 1/x split in two.
    assert.equal(counts.line, 7);
  });

  it('breaks a line at a jump (f″ of softsign at 0) but keeps a steep continuous curve joined', () => {
    // f″ of x/(1+|x|) is −2·sign(x)/(1+|x|)³: it jumps from +2 to −2 at 0 (derived by hand from the quotient rule).
    const jump = (x: number): number => (-2 * Math.sign(x)) / (1 + Math.abs(x)) ** 3;
    const steep = (x: number): number => Math.tanh(40 * x);
    const data = buildPlotData([{ label: 'j', f: jump, df: steep }], { domain: [-1, 1], samples: 100, floatType: 'float32' });
    const segs = (layer: string): number => new Set(data.series.filter((r) => r.layer === layer).map((r) => r.segment)).size;
    assert.equal(segs('f'), 2);
    assert.equal(segs('f′'), 1);
  });

  it('keeps exponential tails from flattening the chart (y range from the body of the data)', () => {
    const data = buildPlotData([{ label: 'exp', f: Math.exp, df: Math.exp }], { domain: [-2, 40], samples: 400, floatType: 'float32' });
    assert.ok(data.view.yMax < 1e16, `yMax ${data.view.yMax}`);
    assert.ok(data.view.yMin < 0.2);
  });

  it('clips ranges to the domain and labels them with their true ends', () => {
    const data = buildPlotData([SIGMOID], { domain: [-10, 10], samples: 50, floatType: 'float16' });
    const left = data.ranges.find((r) => r.to < 0)!;
    assert.equal(left.from, -10);
    assert.match(left.label, /−∞, -4\.59/);
    assert.equal(data.breakdown.length, 1);
    assert.equal(data.breakdown[0]!.to, 10);
    assert.equal(buildPlotData([SIGMOID], { domain: [-10, 10], samples: 50, floatType: 'bfloat16' }).breakdown.length, 0);
  });

  it('titles both axes explicitly (a layered chart would otherwise title x "from, x")', async () => {
    const data = buildPlotData([SIGMOID], { domain: [-3, 3], samples: 30, floatType: 'float16', variable: 'z' });
    const { vg } = await render(buildPlotSpec(data));
    const axes = vg.axes as { scale: string; title?: unknown }[];
    assert.equal(axes.find((a) => a.scale === 'x' && a.title !== undefined)?.title, 'z');
    assert.equal(axes.find((a) => a.scale === 'y' && a.title !== undefined)?.title, 'value');
  });

  it('compares several formulas on one chart, each in its own colour', async () => {
    const tanh: CurveInput = { label: 'tanh', f: Math.tanh, df: (x) => 1 - Math.tanh(x) ** 2 };
    const data = buildPlotData([SIGMOID, RELU, tanh], { domain: [-4, 4], samples: 60, floatType: 'float16' });
    const { vg, counts } = await render(buildPlotSpec(data));
    // sigmoid f, f′; relu f and f′ in two pieces (its step at 0 is a jump, not drawn as a vertical stroke); tanh f, f′.
    assert.equal(counts.line, 7);
    const color = (vg.scales as { name: string; domain?: unknown }[]).find((s) => s.name === 'color');
    assert.ok(color, 'a color scale over the formulas');
  });
});
