/**
 * Sampling f, f′, f″ on a domain for the plot. Non-finite values (NaN, ±∞) end a line segment
 * instead of being drawn, and so do jumps far outside the visible range (a pole such as 1/x would
 * otherwise draw a vertical spike joining −∞ to +∞).
 */
import type { ScalarFn } from '../types';

export interface Sample {
  x: number;
  y: number;
  /** Segment index: the plot draws each segment as its own line. */
  segment: number;
}

export const MAX_SAMPLES = 4000;

/** `n` evenly spaced points over [from, to], ends included. */
export function grid(from: number, to: number, n: number): number[] {
  const k = Math.max(2, Math.min(MAX_SAMPLES, Math.floor(n)));
  const out = new Array<number>(k);
  for (let i = 0; i < k; i++) out[i] = from + ((to - from) * i) / (k - 1);
  return out;
}

/** Evaluates without ever throwing: a throwing function yields NaN at that point. */
export function safeEval(fn: ScalarFn, x: number): number {
  try {
    const y = fn(x);
    return typeof y === 'number' ? y : NaN;
  } catch {
    return NaN;
  }
}

/**
 * Samples `fn` on `xs`. A point is dropped and the segment broken where the value is not finite,
 * or where |y| exceeds `clip` (values that far outside the chart carry no visual information).
 */
export function sampleCurve(fn: ScalarFn, xs: number[], clip = 1e12): Sample[] {
  const out: Sample[] = [];
  let segment = 0;
  let open = false;
  for (const x of xs) {
    const y = safeEval(fn, x);
    if (!Number.isFinite(y) || Math.abs(y) > clip) {
      if (open) segment++;
      open = false;
      continue;
    }
    out.push({ x, y, segment });
    open = true;
  }
  return out;
}

/** A y-range that shows the curves' body: percentile-clipped when one end grows without bound. */
export function viewRange(values: number[]): [number, number] {
  const finite = values.filter(Number.isFinite).sort((a, b) => a - b);
  if (finite.length === 0) return [-1, 1];
  const at = (p: number): number => finite[Math.min(finite.length - 1, Math.max(0, Math.round(p * (finite.length - 1))))]!;
  let lo = finite[0]!;
  let hi = finite[finite.length - 1]!;
  const qlo = at(0.03);
  const qhi = at(0.97);
  if (hi - lo > 5 * (qhi - qlo) && qhi > qlo) {
    lo = qlo;
    hi = qhi;
  }
  if (hi - lo < 1e-12) {
    const c = lo;
    lo = c - 1;
    hi = c + 1;
  }
  const m = (hi - lo) * 0.08;
  return [lo - m, hi + m];
}

/**
 * Splits segments at jumps: where two neighbouring samples differ by more than `threshold` and
 * bisecting between them keeps the gap open (a discontinuity such as f″ of softsign at 0), the line is
 * broken instead of drawing a vertical stroke that looks like part of the curve. A steep but
 * continuous stretch closes under bisection and stays joined.
 */
export function splitJumps(fn: ScalarFn, samples: Sample[], threshold: number): Sample[] {
  if (!(threshold > 0) || samples.length < 2) return samples;
  const out: Sample[] = [];
  let shift = 0;
  for (let i = 0; i < samples.length; i++) {
    const s = samples[i]!;
    const prev = samples[i - 1];
    if (prev && prev.segment === s.segment && Math.abs(s.y - prev.y) > threshold && isJump(fn, prev, s)) shift++;
    out.push(shift ? { ...s, segment: s.segment + shift } : s);
  }
  return out;
}

function isJump(fn: ScalarFn, a: Sample, b: Sample): boolean {
  let lo = a;
  let hi = b;
  const gap = Math.abs(b.y - a.y);
  for (let k = 0; k < 30; k++) {
    const x = (lo.x + hi.x) / 2;
    if (x === lo.x || x === hi.x) break;
    const y = safeEval(fn, x);
    if (!Number.isFinite(y)) return true;
    // Keep the half that still holds most of the gap.
    if (Math.abs(y - lo.y) > Math.abs(hi.y - y)) hi = { x, y, segment: hi.segment };
    else lo = { x, y, segment: lo.segment };
  }
  return Math.abs(hi.y - lo.y) > 0.5 * gap;
}
