/**
 * The float types Slopewise reasons about, and rounding a double to each of them.
 *
 * Formats (IEEE 754-2008 §3.6 binary16 and binary32; bfloat16 is the top 16 bits of binary32:
 * 1 sign bit, the same 8 exponent bits, 7 stored significand bits):
 *
 * | type     | p (significand bits incl. implicit 1) | emin | emax | max finite            |
 * |----------|----------------------------------------|------|------|-----------------------|
 * | float16  | 11                                     | −14  | 15   | 65504                 |
 * | bfloat16 | 8                                      | −126 | 127  | (2 − 2⁻⁷)·2¹²⁷ ≈ 3.3895e38 |
 * | float32  | 24                                     | −126 | 127  | (2 − 2⁻²³)·2¹²⁷ ≈ 3.4028235e38 |
 *
 * Rounding is round-to-nearest, ties-to-even, with gradual underflow (subnormals) and overflow to ±∞
 * when the rounded magnitude would be 2^(emax+1).
 */
import { f16round } from '@petamoriken/float16';
import type { FloatType } from './types';

export interface FloatFormat {
  type: FloatType;
  /** Significand precision in bits, including the implicit leading bit. */
  precision: number;
  emin: number;
  emax: number;
  /** Largest finite value. */
  max: number;
  /** Smallest positive normal value, 2^emin. */
  minNormal: number;
  /** Smallest positive subnormal value, 2^(emin − p + 1). */
  minSubnormal: number;
  /** Machine epsilon: distance from 1 to the next larger value, 2^(1 − p). */
  epsilon: number;
  /** Smallest magnitude that rounds to ∞: max + ulp(max)/2 = (2 − 2^−p)·2^emax. */
  overflowThreshold: number;
}

function format(type: FloatType, precision: number, emin: number, emax: number): FloatFormat {
  return {
    type,
    precision,
    emin,
    emax,
    max: (2 - 2 ** (1 - precision)) * 2 ** emax,
    minNormal: 2 ** emin,
    minSubnormal: 2 ** (emin - precision + 1),
    epsilon: 2 ** (1 - precision),
    overflowThreshold: (2 - 2 ** -precision) * 2 ** emax,
  };
}

export const FLOAT_FORMATS: Readonly<Record<FloatType, FloatFormat>> = {
  float16: format('float16', 11, -14, 15),
  bfloat16: format('bfloat16', 8, -126, 127),
  float32: format('float32', 24, -126, 127),
};

/**
 * Rounds a double to the nearest value of a binary format with `precision` significand bits and
 * exponent range [emin, emax], ties to even. Independent of the platform routines below; used to
 * cross-check them and for formats they do not cover.
 */
export function roundToFormat(v: number, precision: number, emin: number, emax: number): number {
  if (!Number.isFinite(v) || v === 0) return v;
  const a = Math.abs(v);
  let e = Math.floor(Math.log2(a));
  // log2 can be off by one near powers of two: fix e so that 2^e ≤ a < 2^(e+1).
  if (2 ** e > a) e--;
  else if (2 ** (e + 1) <= a) e++;
  const q = 2 ** (Math.max(e, emin) - precision + 1); // the quantum (ulp) at a
  const n = a / q; // exact: scaling by a power of two (q ≥ 2^-1074 for all formats here)
  const fl = Math.floor(n);
  const frac = n - fl;
  const m = frac > 0.5 || (frac === 0.5 && fl % 2 === 1) ? fl + 1 : fl;
  const r = m * q;
  if (r >= 2 ** (emax + 1)) return v < 0 ? -Infinity : Infinity;
  return v < 0 ? -r : r;
}

const f32 = new Float32Array(1);
const u32 = new Uint32Array(f32.buffer);

/** The binary32 bit pattern of a value that is exactly representable in binary32. */
export function float32Bits(v: number): number {
  f32[0] = v;
  return u32[0] as number;
}

export function float32FromBits(bits: number): number {
  u32[0] = bits >>> 0;
  return f32[0] as number;
}

/**
 * bfloat16 from a binary32 bit pattern: round-to-nearest-even on the low 16 bits (the usual
 * conversion `(bits + 0x7fff + ((bits >> 16) & 1)) >> 16`), NaN kept NaN.
 */
export function bfloat16FromFloat32Bits(bits: number): number {
  if ((bits & 0x7fffffff) > 0x7f800000) return NaN;
  const rounded = (bits + 0x7fff + ((bits >>> 16) & 1)) >>> 16;
  return float32FromBits((rounded << 16) >>> 0);
}

/**
 * Rounds a double to bfloat16 in one rounding: first to binary32 with round-to-odd (sticky last bit),
 * then round-to-nearest-even on the binary32 bit pattern. Round-to-odd into a format with at least
 * p + 2 bits (24 ≥ 8 + 2) makes the second rounding exact, so there is no double-rounding error.
 */
export function bf16round(v: number): number {
  if (Number.isNaN(v)) return NaN;
  const f = Math.fround(v);
  if (!Number.isFinite(f)) return f; // |v| ≥ binary32's overflow threshold > bfloat16's
  let bits = float32Bits(f);
  if (f !== v && (bits & 1) === 0) {
    // f is even and inexact: step to the odd neighbour on v's side of f (toward zero if |f| > |v|).
    bits = Math.abs(f) > Math.abs(v) ? bits - 1 : bits + 1;
  }
  return bfloat16FromFloat32Bits(bits);
}

/**
 * Rounds a double to binary16 in one rounding, like `f16round` of @petamoriken/float16 (the tests
 * check they agree) but several times faster: round-to-odd into binary32 (24 ≥ 11 + 2 bits, so the
 * second rounding is exact), then round-to-nearest-even on the binary32 bit pattern — dropping 13
 * significand bits for normals, quantum 2^−24 for subnormals.
 */
export function f16roundFast(v: number): number {
  if (Number.isNaN(v)) return NaN;
  const a = Math.abs(v);
  if (a >= 65520) return v > 0 ? Infinity : -Infinity; // 65504 + ulp/2: overflow threshold
  if (a < 6.103515625e-5) {
    // subnormal (or zero): multiples of 2^-24, ties to even; a·2^24 is exact in double
    const n = a * 16777216;
    const fl = Math.floor(n);
    const frac = n - fl;
    const m = frac > 0.5 || (frac === 0.5 && fl % 2 === 1) ? fl + 1 : fl;
    const r = m / 16777216;
    return v < 0 ? -r : r;
  }
  const f = Math.fround(a);
  let bits = float32Bits(f);
  if (f !== a && (bits & 1) === 0) bits = f > a ? bits - 1 : bits + 1;
  const rounded = ((bits + 0xfff + ((bits >>> 13) & 1)) & ~0x1fff) >>> 0;
  const r = float32FromBits(rounded);
  return v < 0 ? -r : r;
}

/** The reference binary16 rounding from npm (@petamoriken/float16), for cross-checks. */
export const f16roundReference: (v: number) => number = f16round;

const ROUNDERS: Readonly<Record<FloatType, (v: number) => number>> = {
  float16: f16roundFast,
  bfloat16: bf16round,
  float32: Math.fround,
};

/** The rounding function of a type. */
export function rounder(type: FloatType): (v: number) => number {
  return ROUNDERS[type];
}

/** `v` rounded to `type` (round-to-nearest-even). */
export function roundTo(type: FloatType, v: number): number {
  return ROUNDERS[type](v);
}

/** Distance from |v| (rounded to the type) to the next larger value of the type. */
export function ulp(type: FloatType, v: number): number {
  const fmt = FLOAT_FORMATS[type];
  const a = Math.abs(roundTo(type, v));
  if (!Number.isFinite(a)) return Infinity;
  if (a < fmt.minNormal) return fmt.minSubnormal;
  const e = Math.floor(Math.log2(a));
  const ee = 2 ** e > a ? e - 1 : 2 ** (e + 1) <= a ? e + 1 : e;
  return 2 ** (ee - fmt.precision + 1);
}
