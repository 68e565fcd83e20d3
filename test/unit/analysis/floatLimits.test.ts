import { strict as assert } from 'node:assert';
import { analyzeFormula, type Analysis, type BreakdownInterval } from '../../../src/core/analysis';
import { FLOAT_FORMATS } from '../../../src/core/floats';
import type { FloatType } from '../../../src/core/types';
import { formula, SIGMOID, SOFTPLUS, ELU } from './helpers';

function limits(expr: string, opts: { derivative?: string; params?: Record<string, number>; domain?: [number, number] } = {}): Analysis {
  const { formula: f, derivs } = formula(expr, opts);
  return analyzeFormula(f, derivs, { parts: ['floatLimits', 'suggestions'], ...(opts.domain ? { domain: opts.domain } : {}) });
}

const near = (a: number | null | undefined, b: number, tol: number, what: string): void => {
  assert.ok(typeof a === 'number' && Math.abs(a - b) <= tol, `${what}: ${a} vs ${b}`);
};

const has = (b: readonly BreakdownInterval[] | undefined, kind: string): BreakdownInterval | undefined => b?.find((r) => r.kind === kind);

describe('analysis: float limits', () => {
  // IEEE 754-2008 §3.6: binary16 max 65504 (ulp 32 there), binary32 max (2 − 2^−23)·2^127;
  // bfloat16 (top half of binary32) max (2 − 2^−7)·2^127. exp overflows once e^x ≥ max + ulp/2.
  const expEdges: Record<FloatType, number> = {
    float16: Math.log(65504 + 16), // 11.0901
    bfloat16: Math.log((2 - 2 ** -8) * 2 ** 127), // 88.7209
    float32: Math.log((2 - 2 ** -24) * 2 ** 127), // 88.7228391
  };
  it('exp(x) overflows at ln(max + ulp/2): 11.0901 (fp16), 88.7209 (bf16), 88.7228391 (fp32)', () => {
    const a = limits('exp(x)');
    for (const type of ['float16', 'bfloat16', 'float32'] as const) {
      const o = a.floatLimits?.[type]?.overflows ?? [];
      assert.equal(o.length, 1, type);
      assert.equal(o[0]?.operation, 'exp(x)');
      near(o[0]?.from, expEdges[type], 1e-9, type);
      assert.equal(o[0]?.to, null);
      assert.equal(a.floatLimits?.[type]?.max, FLOAT_FORMATS[type].max);
    }
    near(expEdges.float16, 11.0901, 1e-4, 'library-facts fp16');
    near(expEdges.float32, 88.7228391, 1e-7, 'library-facts fp32');
  });
  it('sigmoid rounds to 1 at ln(2^(p+1) − 1) for the exact value rounded once: 8.3175, 6.2364, 17.3287', () => {
    // σ(x) rounds to 1 once 1 − σ(x) ≤ 2^−(p+1) (half an ulp below 1), i.e. e^x ≥ 2^(p+1) − 1.
    const a = limits(SIGMOID);
    for (const type of ['float16', 'bfloat16', 'float32'] as const) {
      const p = FLOAT_FORMATS[type].precision;
      const up = a.floatLimits?.[type]?.asymptotes.find((s) => s.side === '+inf');
      assert.equal(up?.limit, 1);
      near(up?.exactFrom, Math.log(2 ** (p + 1) - 1), 1e-8, `${type} exact model`);
      // Every operation in the type: 1 + e^(−x) rounds to 1 once e^(−x) ≤ 2^−p, x ≳ p·ln 2
      // (inputs are rounded too, so the figure is the nearest representable input above).
      near(up?.computedFrom, p * Math.LN2, type === 'float32' ? 1e-6 : 0.01, `${type} computed model`);
    }
  });
  it('softplus as written overflows in fp16 above x ≈ 11.09; the stable rewrite removes it', () => {
    const a = limits(SOFTPLUS);
    const b = a.floatLimits?.float16?.breakdown;
    const o = has(b, 'overflow');
    near(o?.from, 11.09, 0.01, 'overflow edge');
    assert.equal(o?.to, 100);
    const s = a.suggestions?.find((x) => x.rule === 'softplus' && x.target === 'function');
    assert.ok(s, 'softplus rewrite offered');
    assert.equal(s?.expression, 'max(x, 0) + log1p(exp(-abs(x)))');
    assert.deepEqual(s?.after.float16, []);
    assert.ok((s?.before.float16?.length ?? 0) > 0);
  });
  it('the sigmoid derivative as written returns NaN once exp(−x) overflows near −88.72 in fp32, and 0 before', () => {
    const a = limits(SIGMOID);
    const d = a.floatLimits?.float32?.derivative?.breakdown;
    const nan = has(d, 'nan');
    assert.equal(nan?.from, -100);
    near(nan?.to, -expEdges.float32, 1e-5, 'NaN edge');
    assert.ok(has(d, 'zero'));
    // and the forward returns 0 where σ(x) ≈ 1e-39 is still representable
    const z = has(a.floatLimits?.float32?.breakdown, 'zero');
    near(z?.to, -expEdges.float32, 1e-5, 'zero edge');
  });
  it('the naive sigmoid is replaced by the exp(−|x|) form, which has no breakdown', () => {
    const a = limits(SIGMOID);
    const s = a.suggestions?.find((x) => x.rule === 'sigmoid' && x.target === 'function');
    assert.ok(s);
    for (const type of ['float16', 'bfloat16', 'float32'] as const) assert.deepEqual(s?.after[type], [], type);
  });
  it('log(1 + x) loses small x in fp16; log1p(x) does not', () => {
    const a = limits('log(1 + x)', { domain: [-1e-3, 1e-3] });
    assert.ok((a.floatLimits?.float16?.breakdown.length ?? 0) > 0);
    const s = a.suggestions?.find((x) => x.rule === 'log1p');
    assert.equal(s?.expression, 'log1p(x)');
    assert.deepEqual(s?.after.float16, []);
  });
  it('tanh written with exponentials gives NaN (inf/inf) in fp16 beyond |x| ≈ 11.09; tanh(x) does not', () => {
    const a = limits('(exp(x) - exp(-x)) / (exp(x) + exp(-x))');
    const nans = (a.floatLimits?.float16?.breakdown ?? []).filter((r) => r.kind === 'nan');
    assert.equal(nans.length, 2);
    near(nans[0]?.to, -11.09, 0.01, 'NaN edge below');
    near(nans[1]?.from, 11.09, 0.01, 'NaN edge above');
    const s = a.suggestions?.find((x) => x.rule === 'tanh');
    assert.equal(s?.expression, 'tanh(x)');
    assert.deepEqual(s?.after.float16, []);
  });
  it('log-sigmoid as written loses −∞ < x < −11.09 in fp16 (log of 0); the rewrite keeps it', () => {
    const a = limits('log(1 / (1 + exp(-x)))');
    assert.ok((a.floatLimits?.float16?.breakdown.length ?? 0) > 0);
    const s = a.suggestions?.find((x) => x.rule === 'log-sigmoid');
    assert.ok(s);
    assert.deepEqual(s?.after.float16, []);
  });
  it('ELU’s exp(x) − 1 cancels in bfloat16 just below 0; expm1 fixes it', () => {
    const a = limits(ELU.f, { derivative: ELU.d, params: { alpha: 1 } });
    assert.ok(has(a.floatLimits?.bfloat16?.breakdown, 'inaccurate'));
    const s = a.suggestions?.find((x) => x.rule === 'expm1');
    assert.ok(s);
    assert.deepEqual(s?.after.bfloat16, []);
  });
  it('nothing breaks for ReLU, and nothing is suggested', () => {
    const a = limits('max(x, 0)', { derivative: 'x > 0 ? 1 : 0' });
    for (const type of ['float16', 'bfloat16', 'float32'] as const) {
      assert.deepEqual(a.floatLimits?.[type]?.breakdown, []);
      assert.deepEqual(a.floatLimits?.[type]?.asymptotes, []);
    }
    assert.deepEqual(a.suggestions, []);
  });
});
