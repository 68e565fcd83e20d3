import { strict as assert } from 'node:assert';
import { analyzeFormula, ANALYSIS_PARTS, DEFAULT_SATURATION_THRESHOLD } from '../../../src/core/analysis';
import { formula, SIGMOID, GELU_TANH } from './helpers';

/** Every number in the result must survive JSON (no ±∞ or NaN hiding as null). */
function finiteEverywhere(v: unknown, path = '$'): void {
  if (typeof v === 'number') assert.ok(Number.isFinite(v), `${path} = ${v}`);
  else if (Array.isArray(v)) v.forEach((e, i) => finiteEverywhere(e, `${path}[${i}]`));
  else if (v && typeof v === 'object') for (const [k, e] of Object.entries(v)) finiteEverywhere(e, `${path}.${k}`);
}

describe('analysis: analyzeFormula contract', () => {
  it('returns every part for a catalogue function, JSON-safe, with per-part timings', () => {
    const { formula: f, derivs } = formula(GELU_TANH);
    const a = analyzeFormula(f, derivs);
    assert.equal(a.threshold, DEFAULT_SATURATION_THRESHOLD);
    assert.deepEqual(a.domain, [-100, 100]);
    for (const key of ['derivativeInOutput', 'saturation', 'kinks', 'discontinuities', 'range', 'monotone', 'lipschitz', 'gain', 'floatLimits', 'suggestions']) {
      assert.ok(key in a, `missing ${key}`);
    }
    assert.deepEqual(Object.keys(a.floatLimits ?? {}), ['float16', 'bfloat16', 'float32']);
    for (const part of ANALYSIS_PARTS) assert.equal(typeof a.timings[part], 'number', part);
    assert.deepEqual(a.skipped, []);
    finiteEverywhere(a.timings);
    finiteEverywhere(a.floatLimits);
    finiteEverywhere(a.range);
    assert.doesNotThrow(() => JSON.stringify(a));
  });
  it('computes only the parts asked for, and only the types asked for', () => {
    const { formula: f, derivs } = formula(SIGMOID);
    const a = analyzeFormula(f, derivs, { parts: ['floatLimits'], types: ['float16'] });
    assert.deepEqual(Object.keys(a.floatLimits ?? {}), ['float16']);
    assert.equal(a.saturation, undefined);
    assert.equal(a.gain, undefined);
  });
  it('skips everything, saying why, when a parameter has no value — never a made-up figure', () => {
    const { formula: f, derivs } = formula('x > 0 ? x : a * x', { derivative: 'x > 0 ? 1 : a' });
    const unbound = { ...f, unbound: ['a'] };
    const a = analyzeFormula(unbound, derivs);
    assert.equal(a.saturation, undefined);
    assert.equal(a.floatLimits, undefined);
    assert.equal(a.skipped.length, ANALYSIS_PARTS.length);
    assert.match(a.skipped[0]?.reason ?? '', /no value for a/);
  });
  it('skips the parts that would start after the time budget is spent, and says so', () => {
    const { formula: f, derivs } = formula(SIGMOID);
    const a = analyzeFormula(f, derivs, { budgetMs: 0 });
    assert.equal(a.floatLimits, undefined);
    assert.equal(a.skipped.length, ANALYSIS_PARTS.length);
    assert.match(a.skipped[0]?.reason ?? '', /time budget/);
  });
  it('uses the given threshold and domain, and refuses nonsense options', () => {
    const { formula: f, derivs } = formula(SIGMOID);
    const a = analyzeFormula(f, derivs, { saturationThreshold: 0.1, domain: [-20, 5], parts: ['saturation', 'floatLimits'], types: ['float16'] });
    assert.equal(a.threshold, 0.1);
    assert.deepEqual(a.domain, [-20, 5]);
    for (const b of a.floatLimits?.float16?.breakdown ?? []) assert.ok(b.from >= -20 && b.to <= 5);
    assert.throws(() => analyzeFormula(f, derivs, { saturationThreshold: -1 }), RangeError);
    assert.throws(() => analyzeFormula(f, derivs, { domain: [3, 1] }), RangeError);
  });
});
