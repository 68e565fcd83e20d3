import { strict as assert } from 'node:assert';
import { f16round } from '@petamoriken/float16';
import {
  FLOAT_FORMATS, roundToFormat, roundTo, bf16round, bfloat16FromFloat32Bits, float32Bits, ulp, f16roundFast,
} from '../../src/core/floats';
// deterministic (mulberry32), so failures reproduce
import { uniformStream as rng } from '../../fuzz/rng';


/** Random doubles spread over the exponent range of a format (subnormals, normals, overflow). */
function randomDoubles(n: number, emin: number, emax: number, precision: number, seed: number): number[] {
  const r = rng(seed);
  const out: number[] = [];
  for (let i = 0; i < n; i++) {
    const e = Math.floor(emin - precision - 2 + r() * (emax - emin + precision + 6));
    let v = (1 + r()) * 2 ** e;
    if (i % 7 === 0) {
      // an exact tie: a representable value plus half an ulp of the format
      const q = 2 ** (Math.max(e, emin) - precision + 1);
      v = (Math.floor(v / q) + 0.5) * q;
    }
    out.push(r() < 0.5 ? -v : v);
  }
  return out;
}

describe('floats: IEEE 754 formats', () => {
  it('binary16 constants match IEEE 754-2008 §3.6 (max 65504, min normal 2^-14, min subnormal 2^-24, p = 11)', () => {
    const f = FLOAT_FORMATS.float16;
    assert.equal(f.max, 65504);
    assert.equal(f.minNormal, 2 ** -14);
    assert.equal(f.minSubnormal, 2 ** -24);
    assert.equal(f.precision, 11);
    assert.equal(f.epsilon, 2 ** -10);
  });
  it('binary32 constants match IEEE 754-2008 §3.6 (max ≈ 3.4028235e38, p = 24)', () => {
    const f = FLOAT_FORMATS.float32;
    assert.equal(f.max, 3.4028234663852886e38);
    assert.equal(Math.fround(f.max), f.max);
    assert.equal(f.minSubnormal, 2 ** -149);
    assert.equal(f.precision, 24);
  });
  it('bfloat16 is the top 16 bits of binary32: max 0x7f7f0000 ≈ 3.3895e38, p = 8', () => {
    // bfloat16 format: 1 sign, 8 exponent, 7 fraction bits (the upper half of a binary32 word).
    const f = FLOAT_FORMATS.bfloat16;
    assert.equal(float32Bits(f.max), 0x7f7f0000);
    assert.ok(Math.abs(f.max - 3.3895e38) / 3.3895e38 < 1e-4);
    assert.equal(f.precision, 8);
    assert.equal(float32Bits(f.minSubnormal), 0x00010000);
  });
  it('bfloat16 keeps the upper half of the binary32 pattern, rounded to nearest even (worked by hand)', () => {
    // π in binary32 is 0x40490FDB: low half 0x0FDB < 0x8000 → 0x4049 = 3.140625.
    assert.equal(roundTo('bfloat16', Math.PI), 3.140625);
    assert.equal(float32Bits(roundTo('bfloat16', Math.PI)), 0x40490000);
    // 1/3 in binary32 is 0x3EAAAAAB: low half 0xAAAB > 0x8000 → 0x3EAB = 0.333984375.
    assert.equal(float32Bits(roundTo('bfloat16', 1 / 3)), 0x3eab0000);
    assert.equal(roundTo('bfloat16', 1 / 3), 0.333984375);
  });
});

describe('floats: rounding cross-checks', () => {
  it('float32 rounding equals Math.fround on 200k random doubles, and the generic rounder agrees', () => {
    const xs = randomDoubles(200_000, -126, 127, 24, 1);
    for (const v of xs) {
      const want = Math.fround(v);
      assert.equal(roundTo('float32', v), want);
      const got = roundToFormat(v, 24, -126, 127);
      if (!Object.is(got, want)) assert.fail(`generic rounder: ${v} → ${got}, Math.fround → ${want}`);
    }
  });
  it('float16 rounding (@petamoriken/float16 f16round) equals the generic rounder on 200k random doubles', () => {
    const xs = randomDoubles(200_000, -14, 15, 11, 2);
    for (const v of xs) {
      const want = f16round(v);
      const got = roundToFormat(v, 11, -14, 15);
      if (!Object.is(got, want)) assert.fail(`generic rounder: ${v} → ${got}, f16round → ${want}`);
      const fast = f16roundFast(v);
      if (!Object.is(fast, want)) assert.fail(`f16roundFast: ${v} → ${fast}, f16round → ${want}`);
      assert.equal(roundTo('float16', v), want);
    }
  });
  it('bfloat16 rounding from doubles equals the generic rounder on 200k random doubles (no double rounding)', () => {
    const xs = randomDoubles(200_000, -126, 127, 8, 3);
    for (const v of xs) {
      const want = roundToFormat(v, 8, -126, 127);
      const got = bf16round(v);
      if (!Object.is(got, want)) assert.fail(`bf16round: ${v} → ${got}, generic → ${want}`);
    }
  });
  it('bfloat16 from binary32 bits (round-to-nearest-even on the low half) equals the generic rounder on binary32 values', () => {
    const xs = randomDoubles(100_000, -126, 127, 24, 4).map(Math.fround);
    for (const v of xs) {
      if (!Number.isFinite(v)) continue;
      const want = roundToFormat(v, 8, -126, 127);
      const got = bfloat16FromFloat32Bits(float32Bits(v));
      if (!Object.is(got, want)) assert.fail(`bits rounder: ${v} → ${got}, generic → ${want}`);
    }
  });
  it('rounds ties to even and overflows at max + ulp/2 (IEEE 754 roundTiesToEven)', () => {
    // binary16: 2049 lies halfway between 2048 and 2050 → 2048 (even significand); 2051 → 2052.
    assert.equal(roundTo('float16', 2049), 2048);
    assert.equal(roundTo('float16', 2051), 2052);
    assert.equal(roundTo('float16', 65519.99), 65504);
    assert.equal(roundTo('float16', 65520), Infinity);
    assert.equal(roundTo('bfloat16', FLOAT_FORMATS.bfloat16.overflowThreshold), Infinity);
    assert.equal(roundTo('bfloat16', FLOAT_FORMATS.bfloat16.overflowThreshold * (1 - 1e-9)), FLOAT_FORMATS.bfloat16.max);
    // bfloat16: 1 + 2^-8 is a tie between 1 and 1 + 2^-7 → 1.
    assert.equal(roundTo('bfloat16', 1 + 2 ** -8), 1);
    assert.equal(roundTo('bfloat16', 1 + 3 * 2 ** -8), 1 + 2 ** -6);
    assert.ok(Number.isNaN(roundTo('bfloat16', NaN)));
    assert.equal(ulp('float16', 1), 2 ** -10);
    assert.equal(ulp('bfloat16', 1), 2 ** -7);
    assert.equal(ulp('float16', 1e-7), 2 ** -24);
  });
});
