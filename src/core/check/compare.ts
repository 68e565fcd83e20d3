/**
 * Numeric comparison of two scalar functions at many points away from kinks.
 *
 * Tolerance (relative + absolute, per point): |a − b| ≤ ABS_TOLERANCE + REL_TOLERANCE · max(|a|, |b|).
 * REL_TOLERANCE = 1e-4 lets code constants written with 5–6 digits (0.7978846, 0.044715) pass and
 * flags genuinely different formulas (an approximation against the exact function differs by
 * ≥ 1e-3 somewhere). Points where either function jumps within ±KINK_STEP are skipped: a derivative
 * written `x >= 0` where the forward says `x > 0` is not a bug.
 */
import type { ScalarFn } from '../types';

export const REL_TOLERANCE = 1e-4;
export const ABS_TOLERANCE = 1e-6;
/** Half-width of the neighbourhood in which a jump makes a point "near a kink". */
export const KINK_STEP = 1e-3;
/** Sample points on the real line (plus the same number in (0, 1) for probabilities). */
export const SAMPLE_POINTS = 121;
/** Fraction of points that must be comparable for a verdict. */
export const MIN_COMPARABLE = 8;

export interface Comparison {
  ok: boolean;
  /** Largest |expected − found| over the compared points. */
  maxError: number;
  /** The x with the largest error (or the first mismatching point). */
  x: number;
  expectedValue: number;
  foundValue: number;
  points: number;
  tolerance: number;
}

/** Sample points: a grid over [−6, 6] offset from 0 and from integers, a few large |x|, and (0, 1). */
export function samplePoints(): number[] {
  const out: number[] = [];
  for (let k = 0; k < SAMPLE_POINTS; k++) out.push(-6 + (12 * (k + 0.371)) / SAMPLE_POINTS);
  for (const x of [-15.3, -9.7, 8.9, 14.1]) out.push(x);
  for (let k = 0; k < 40; k++) out.push((k + 0.5) / 40);
  return out;
}

/** Does f jump within ±KINK_STEP of x? `c` is f(x), already known to the caller. */
function jumps(f: ScalarFn, x: number, c: number): boolean {
  const a = f(x - KINK_STEP);
  const b = f(x + KINK_STEP);
  if (!Number.isFinite(a) || !Number.isFinite(b) || !Number.isFinite(c)) return true;
  const scale = 1 + Math.abs(c);
  return Math.abs(a - c) > 0.05 * scale || Math.abs(b - c) > 0.05 * scale;
}

export function withinTolerance(a: number, b: number): boolean {
  return Math.abs(a - b) <= ABS_TOLERANCE + REL_TOLERANCE * Math.max(Math.abs(a), Math.abs(b));
}

/**
 * A function's values and kink flags at a list of points, each computed the first time it is
 * needed and kept with the function (by identity): a re-check compares an edited function against
 * unchanged ones, whose profiles are then already known. Functions must be pure (compiled trees are).
 */
interface Profile {
  value: Float64Array;
  /** 0 not computed, 1 computed (value only), 2 no jump, 3 jump. */
  state: Uint8Array;
}
const profiles = new WeakMap<ScalarFn, WeakMap<readonly number[], Profile>>();

function profileOf(f: ScalarFn, points: readonly number[]): Profile {
  let byPoints = profiles.get(f);
  if (!byPoints) { byPoints = new WeakMap(); profiles.set(f, byPoints); }
  let p = byPoints.get(points);
  if (!p) { p = { value: new Float64Array(points.length), state: new Uint8Array(points.length) }; byPoints.set(points, p); }
  return p;
}

function valueAt(f: ScalarFn, p: Profile, points: readonly number[], i: number): number {
  if (p.state[i] === 0) { p.value[i] = f(points[i]!); p.state[i] = 1; }
  return p.value[i]!;
}

function jumpsAt(f: ScalarFn, p: Profile, points: readonly number[], i: number): boolean {
  if (p.state[i]! < 2) p.state[i] = jumps(f, points[i]!, valueAt(f, p, points, i)) ? 3 : 2;
  return p.state[i] === 3;
}

/** The default sample points, one array for every comparison (profiles are kept per array). */
const SAMPLES: readonly number[] = Object.freeze(samplePoints());

/**
 * Compare expected and found at the sample points. Points where the expected value is not finite
 * (outside the forward's domain) or either side jumps nearby are skipped.
 */
export function compareFunctions(expected: ScalarFn, found: ScalarFn, points: readonly number[] = SAMPLES): Comparison | undefined {
  let worst: Comparison | undefined;
  let n = 0;
  let bad = false;
  const pe = profileOf(expected, points);
  const pf = profileOf(found, points);
  for (let i = 0; i < points.length; i++) {
    const x = points[i]!;
    const e = valueAt(expected, pe, points, i);
    if (!Number.isFinite(e)) continue;
    if (jumpsAt(expected, pe, points, i)) continue;
    const f = valueAt(found, pf, points, i);
    if (Number.isFinite(f) && jumpsAt(found, pf, points, i)) continue;
    n++;
    const err = Number.isFinite(f) ? Math.abs(e - f) : Infinity;
    const okHere = Number.isFinite(f) && withinTolerance(e, f);
    if (!okHere) bad = true;
    // Report the worst point; among failures prefer the largest relative error.
    const score = err / (1 + Math.abs(e));
    const worstScore = worst ? worst.maxError / (1 + Math.abs(worst.expectedValue)) : -1;
    if (!worst || score > worstScore) {
      worst = { ok: true, maxError: err, x, expectedValue: e, foundValue: f, points: 0, tolerance: REL_TOLERANCE };
    }
  }
  if (!worst || n < MIN_COMPARABLE) return undefined;
  worst.ok = !bad;
  worst.points = n;
  return worst;
}
