/**
 * Property tests (fast-check), against references outside the engine:
 * - f′ and f″ of random compositions of catalogue functions agree with central finite differences
 *   (Richardson-checked: a point where two step sizes disagree is a kink and is skipped);
 * - the derivative in terms of the output, where reported, equals f′ at y = f(x);
 * - breakdown intervals are consistent between a type and a wider one: where float32 overflows and
 *   the exact value is representable in float16, float16 breaks down too (IEEE 754: binary16's
 *   largest finite value 65504 is below binary32's ≈ 3.4028e38, so every overflowing intermediate
 *   of binary32 also overflows in binary16);
 * - the webview message validator never throws and accepts only well-formed messages.
 * Seeds are fixed so a failure reproduces; fast-check prints the shrunk counterexample.
 */
import assert from 'node:assert/strict';
import fc from 'fast-check';
import { derive, parseFormula } from '../../../src/core/expr';
import { compileRounded, compileScalar } from '../../../src/core/expr/compile';
import { inspect } from '../../../src/core/inspect';
import { math } from '../../../src/core/math';
import { breakdownIntervals } from '../../../src/core/analysis';
import { roundTo } from '../../../src/core/floats';
import { parseWebviewMessage } from '../../../src/core/plot/protocol';

const SMOOTH = ['sigmoid', 'tanh', 'softplus', 'silu', 'gelu', 'gelu_tanh', 'mish', 'logsigmoid', 'softsign', 'elu', 'selu', 'celu'];
const PIECEWISE = ['relu', 'leaky_relu', 'hardtanh', 'hardsigmoid', 'relu6', 'hardswish', 'abs'];

/** Central differences with a Richardson check; undefined at kinks and where values blow up. */
function centralDifference(g: (x: number) => number, x: number): number | undefined {
  const h = 1e-4 * Math.max(1, Math.abs(x));
  const d1 = (g(x + h) - g(x - h)) / (2 * h);
  const d2 = (g(x + h / 2) - g(x - h / 2)) / h;
  if (!Number.isFinite(d1) || !Number.isFinite(d2) || Math.abs(d1) > 1e6) return undefined;
  if (Math.abs(d1 - d2) > 1e-4 * Math.max(1, Math.abs(d2))) return undefined;
  // One-sided differences disagree at a kink even when the central ones agree (|x| at 0).
  const fwd = (g(x + h) - g(x)) / h;
  const bwd = (g(x) - g(x - h)) / h;
  if (Math.abs(fwd - bwd) > 1e-2 * Math.max(1, Math.abs(d1))) return undefined;
  return (4 * d2 - d1) / 3;
}

/**
 * Points off the round numbers where kinks sit: fast-check favours 0 and small integers, where every
 * piecewise function here switches branch, and the engine's value at an exact tie is a convention
 * (see the note on celu in the bench/fuzz report), not the derivative.
 */
const point = (min: number, max: number): fc.Arbitrary<number> => fc.double({ min, max, noNaN: true }).map((x) => x + Math.PI * 1e-4);

const composition = fc.array(fc.constantFrom(...SMOOTH, ...PIECEWISE), { minLength: 1, maxLength: 3 })
  .chain((names) => fc.record({ names: fc.constant(names), scale: fc.constantFrom(1, 0.5, 2, -1.5), shift: fc.constantFrom(0, 0.3, -1) }))
  .map(({ names, scale, shift }) => names.reduceRight((inner, n) => `${n}(${inner})`, `${scale} * x + ${shift}`));

describe('reliability: properties', function () {
  this.timeout(120_000);

  it('f′ and f″ of random compositions agree with central finite differences (mathematical definition of the derivative)', () => {
    fc.assert(fc.property(composition, fc.array(point(-6, 6), { minLength: 4, maxLength: 4 }), (text, xs) => {
      const f = parseFormula(text, { variable: 'x' });
      const d = derive(f);
      const fx = compileScalar(f.node, 'x', f.parameters);
      const d1 = compileScalar(d.firstNode, 'x', f.parameters);
      const d2 = compileScalar(d.secondNode, 'x', f.parameters);
      for (const x of xs) {
        const fd1 = centralDifference(fx, x);
        if (fd1 !== undefined) assert.ok(Math.abs(d1(x) - fd1) <= 1e-5 * Math.max(1, Math.abs(fd1)), `${text}: f′(${x}) = ${d1(x)}, finite differences ${fd1}`);
        const fd2 = centralDifference(d1, x);
        if (fd2 !== undefined) assert.ok(Math.abs(d2(x) - fd2) <= 1e-4 * Math.max(1, Math.abs(fd2)), `${text}: f″(${x}) = ${d2(x)}, finite differences ${fd2}`);
      }
    }), { seed: 20261201, numRuns: 60 });
  });

  it('the derivative in terms of the output, where reported, equals f′ at y = f(x)', () => {
    let reported = 0;
    fc.assert(fc.property(fc.constantFrom(...SMOOTH, ...PIECEWISE, 'exp', 'softplus'), fc.array(point(-5, 5), { minLength: 6, maxLength: 6 }), (name, xs) => {
      const r = inspect(`${name}(x)`, { parts: ['derivativeInOutput'] });
      if (typeof r.derivativeInOutput !== 'string') return;
      reported++;
      const f = compileScalar(math.parse(r.expression), 'x', r.parameters);
      const df = compileScalar(math.parse(r.derivative), 'x', r.parameters);
      const dy = compileScalar(math.parse(r.derivativeInOutput), 'y', r.parameters);
      for (const x of xs) {
        if (Math.abs(df(x + 1e-7) - df(x - 1e-7)) > 1e-4) continue; // a kink or jump of f′
        const want = df(x);
        const got = dy(f(x));
        assert.ok(Math.abs(got - want) <= 1e-7 * Math.max(1, Math.abs(want)), `${name}: f′ in y = ${r.derivativeInOutput} gives ${got} at x = ${x}, f′ = ${want}`);
      }
    }), { seed: 7, numRuns: 40 });
    assert.ok(reported >= 5, `only ${reported} output forms reported (σ, tanh, exp, ELU, ReLU have one)`);
  });

  it('where float32 overflows and the exact value is representable in float16, float16 breaks down too', () => {
    const formulas = fc.array(fc.constantFrom('exp', 'softplus', 'sigmoid', 'silu', 'mish', 'cosh', 'sinh', 'gelu_tanh', 'tanh', 'logsigmoid'), { minLength: 1, maxLength: 2 })
      .chain((names) => fc.record({ names: fc.constant(names), k: fc.constantFrom(1, 0.5, 2, 0.01) }))
      .map(({ names, k }) => names.reduceRight((inner, n) => `${n}(${inner})`, `${k} * x`));
    let checked = 0;
    fc.assert(fc.property(formulas, (text) => {
      const f = parseFormula(text, { variable: 'x' });
      const exact = compileScalar(f.node, 'x', f.parameters);
      const domain: [number, number] = [-100, 100];
      const b32 = breakdownIntervals(exact, compileRounded(f.node, 'x', f.parameters, 'float32'), 'float32', domain);
      const b16 = breakdownIntervals(exact, compileRounded(f.node, 'x', f.parameters, 'float16'), 'float16', domain);
      const inside = (x: number, list: typeof b16): boolean => list.some((b) => (b.from === null || x >= b.from - 1e-9) && (b.to === null || x <= b.to + 1e-9));
      for (const b of b32.filter((i) => i.kind === 'overflow')) {
        const from = Math.max(b.from ?? domain[0], domain[0]);
        const to = Math.min(b.to ?? domain[1], domain[1]);
        for (let i = 0; i <= 8; i++) {
          const x = from + ((to - from) * i) / 8;
          const xr = roundTo('float16', x);
          if (!Number.isFinite(roundTo('float16', exact(xr)))) continue; // not representable in float16: no breakdown to report
          checked++;
          assert.ok(inside(x, b16) || inside(xr, b16), `${text}: float32 overflows at ${x} but float16 reports no breakdown there (${JSON.stringify(b16)})`);
        }
      }
    }), { seed: 11, numRuns: 25 });
    assert.ok(checked > 0, 'no float32 overflow met: the property was never exercised');
  });

  it('the webview message validator never throws and accepts only messages of known types', () => {
    const known = new Set(['ready', 'rendered', 'domain', 'param', 'floatType', 'remove', 'export', 'error']);
    const message = fc.oneof(
      fc.anything(),
      fc.record({ type: fc.constantFrom(...known, 'eval', '__proto__', 'constructor'), from: fc.anything(), to: fc.anything(), name: fc.anything(), value: fc.anything(), index: fc.anything(), format: fc.anything(), data: fc.anything(), message: fc.anything(), layers: fc.anything(), marks: fc.anything(), formulas: fc.anything() }, { requiredKeys: ['type'] }),
    );
    fc.assert(fc.property(message, (m) => {
      const r = parseWebviewMessage(m);
      if (r === undefined) return;
      assert.ok(known.has(r.type), `accepted type ${String(r.type)}`);
      for (const v of Object.values(r)) if (typeof v === 'number') assert.ok(Number.isFinite(v), 'accepted a non-finite number');
    }), { seed: 3, numRuns: 3000 });
  });
});
