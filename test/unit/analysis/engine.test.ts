/**
 * The analysis on the engine's own output: every catalogue activation, read by parseFormula and
 * differentiated by derive, analyses completely, and the figures agree with facts stated beside them.
 */
import { strict as assert } from 'node:assert';
import { parseFormula, derive, CATALOGUE } from '../../../src/core/expr';
import { analyzeFormula, analyzePairing, type Analysis } from '../../../src/core/analysis';

const cache = new Map<string, Analysis>();
function analyse(text: string): Analysis {
  let a = cache.get(text);
  if (!a) {
    const f = parseFormula(text);
    a = analyzeFormula(f, derive(f));
    cache.set(text, a);
  }
  return a;
}

describe('analysis: catalogue activations through the engine', () => {
  for (const entry of CATALOGUE.filter((e) => e.role === 'activation')) {
    it(`${entry.name}: every part computed, nothing skipped, JSON-safe`, () => {
      const a = analyse(`${entry.name}(x)`);
      assert.deepEqual(a.skipped, []);
      for (const key of ['saturation', 'kinks', 'range', 'monotone', 'gain', 'floatLimits', 'suggestions', 'derivativeInOutput']) assert.ok(key in a, key);
      const json = JSON.parse(JSON.stringify(a)) as Record<string, unknown>;
      assert.ok(json['floatLimits']);
    });
  }
  it('kinks of the piecewise-linear ones are where their pieces meet (definitions in the catalogue)', () => {
    assert.deepEqual(analyse('relu6(x)').kinks, [0, 6]);
    assert.deepEqual(analyse('hardsigmoid(x)').kinks, [-3, 3]);
    assert.deepEqual(analyse('hardswish(x)').kinks, [-3, 3]);
    assert.deepEqual(analyse('leaky_relu(x)').kinks, [0]);
    assert.deepEqual(analyse('elu(x)').kinks, []); // α = 1: differentiable
    assert.deepEqual(analyse('celu(x)').kinks, []); // continuously differentiable by construction (Barron 2017)
    assert.deepEqual(analyse('sign(x)').discontinuities, [0]);
    assert.deepEqual(analyse('heaviside(x)').discontinuities, [0]);
  });
  it('hardswish is dead below −3 (its f′ = min(max(x + 3, 0), 6)/6 picks the 0 branch), and dips to −3/8', () => {
    const a = analyse('hardswish(x)');
    assert.deepEqual(a.saturation?.[0], { from: null, to: -3, kind: 'dead' });
    // derived: x(x + 3)/6 on [−3, 3] has its minimum −3/8 at x = −3/2
    assert.ok(Math.abs((a.range?.inf ?? 0) + 0.375) < 1e-12);
    assert.equal(a.monotone, 'none');
  });
  it('a step has no finite Lipschitz constant; CELU is increasing with no dead point at 0', () => {
    const h = analyse('heaviside(x)');
    assert.equal(h.lipschitz, null);
    const c = analyse('celu(x)');
    assert.equal(c.monotone, 'increasing');
    assert.ok(!(c.saturation ?? []).some((s) => s.kind === 'dead'));
  });
  it('SELU from the catalogue keeps mean 0 and second moment 1 (Klambauer et al. 2017)', () => {
    const a = analyse('selu(x)');
    assert.ok(Math.abs(a.outputMean ?? 1) < 1e-9);
    assert.ok(Math.abs((a.outputMeanSquare ?? 0) - 1) < 1e-9);
  });
  it('ReLU from the catalogue: gain √2 (He et al. 2015), dead below 0, f′ = [y > 0]', () => {
    const a = analyse('relu(x)');
    assert.ok(Math.abs((a.gain ?? 0) - Math.SQRT2) < 1e-12);
    assert.deepEqual(a.saturation, [{ from: null, to: 0, kind: 'dead' }]);
    assert.equal(a.derivativeInOutput, 'y <= 0 ? 0 : 1');
  });
  it('log-sigmoid: f′ = σ(−x) = 1 − e^y (since e^y = σ(x))', () => {
    assert.equal(analyse('logsigmoid(x)').derivativeInOutput, '1 - exp(y)');
  });
  it('softplus in fp16 overflows above ≈ 11.09 as written; the rewrite is offered', () => {
    const a = analyse('softplus(x)');
    const o = a.floatLimits?.float16?.breakdown.find((b) => b.kind === 'overflow');
    assert.ok(o && Math.abs(o.from - 11.09) < 0.01);
    assert.ok(a.suggestions?.some((s) => s.rule === 'softplus' && (s.after.float16 ?? []).length === 0));
  });
  it('pairs catalogue losses too: sigmoid with the engine’s log-cosh starves, with BCE it does not', () => {
    assert.equal(analyzePairing(parseFormula('sigmoid(x)'), 'log_cosh').starves, true);
    assert.equal(analyzePairing(parseFormula('sigmoid(x)'), 'bce').starves, false);
  });
});
