/**
 * Where each float type breaks a formula.
 *
 * Three findings per type, for f and for f′:
 * 1. Intermediate overflow — for every operation in the tree as written, where its *exact* value
 *    (double precision, input not rounded) reaches the type's overflow threshold max + ulp/2.
 *    Found on a 501-point grid over the domain, edges refined by bisection; an end is null when the
 *    operation still overflows at ±1e9 (it runs to ±∞).
 * 2. Rounding to the asymptote — when f has a finite limit L at ±∞, the x beyond which the value
 *    rounds to round(L). Two models, both reported: `exactFrom` rounds the exact value once ("exact
 *    value, then rounded"; σ in float16: x ≈ 8.3175); `computedFrom` evaluates every operation in the
 *    type (σ in float16: x ≈ 7.62). Not reported where f equals L exactly (ReLU for x < 0).
 * 3. Breakdown intervals — the tree as written, one operation at a time, input and every
 *    intermediate rounded to the type (`compileRounded`), against the exact value at the same
 *    (rounded) input rounded to the type. Kinds, in order of precedence: `nan` (NaN where the exact
 *    value is a number), `overflow` (±∞ where the exact value is finite in the type), `zero` (0 where
 *    the exact value rounds to a non-zero number), `inaccurate` (|got − exact| > 1e-2·max(|exact|,
 *    min normal) — relative error, measured against the smallest normal below it so that subnormal
 *    granularity is not reported). Points where the exact value itself overflows the type are not
 *    breakdowns of the formula and are skipped. Grid: 1001 points over the domain (default
 *    [−100, 100]), each change of kind refined by bisection on x.
 * Approximate: a breakdown narrower than the grid step (0.2 on [−100, 100]) between two good
 * points is missed; the exact reference is double precision, which is itself inexact where the
 * formula cancels catastrophically in double.
 */
import type { MathNode } from 'mathjs';
import { compileProbed, compileRounded, compileScalar } from '../expr/compile';
import { FLOAT_FORMATS, rounder } from '../floats';
import type { FloatType, ScalarFn } from '../types';
import { behaviourGrid, bisectBoundary, tidy, uniformGrid, DENSE_HALF_WIDTH, FAR } from './numeric';
import { stableForm } from './patterns';

export type BreakdownKind = 'overflow' | 'nan' | 'zero' | 'inaccurate';

export interface BreakdownInterval {
  from: number;
  to: number;
  kind: BreakdownKind;
}

export interface IntermediateOverflow {
  /** The operation, in stock-mathjs syntax, as it appears in the tree. */
  operation: string;
  /** Where its exact value overflows the type; null ends run to ±∞. */
  from: number | null;
  to: number | null;
}

export interface AsymptoteRounding {
  side: '-inf' | '+inf';
  /** The limit, rounded to the type. */
  limit: number;
  /** Beyond this x the exact value, rounded once to the type, equals `limit`. */
  exactFrom: number | null;
  /** Beyond this x the value computed one operation at a time in the type equals `limit`. */
  computedFrom: number | null;
}

export interface FunctionFloatLimits {
  overflows: IntermediateOverflow[];
  asymptotes: AsymptoteRounding[];
  breakdown: BreakdownInterval[];
}

export interface FloatLimits extends FunctionFloatLimits {
  type: FloatType;
  max: number;
  precision: number;
  /** The same findings for f′ (null when there is no derivative to evaluate). */
  derivative: FunctionFloatLimits | null;
}

export const RELATIVE_TOLERANCE = 1e-2;
export const BREAKDOWN_POINTS = 1000;
const OVERFLOW_POINTS = 500;
const MAX_OPERATIONS = 40;
const MAX_INTERVALS = 40;

type Kind = BreakdownKind | 'ok';

/** Breakdown kind from the exact value at the rounded input (`ev`) and the value computed in the type (`g`). */
function kindOf(ev: number, g: number, R: (v: number) => number, minNormal: number): Kind {
  if (Number.isNaN(ev)) return 'ok'; // outside the formula's domain: nothing to compare
  const e = R(ev);
  if (Number.isNaN(g)) return 'nan';
  if (!Number.isFinite(e)) return 'ok'; // the exact value overflows the type itself
  if (!Number.isFinite(g)) return 'overflow';
  if (g === 0 && e !== 0) return 'zero';
  if (Math.abs(g - e) > RELATIVE_TOLERANCE * Math.max(Math.abs(e), minNormal)) return 'inaccurate';
  return 'ok';
}

/** Breakdown kind at x: rounded evaluation against the exact value at the rounded input. */
export function breakdownClassifier(exact: ScalarFn, rounded: ScalarFn, type: FloatType): (x: number) => Kind {
  const R = rounder(type);
  const minNormal = FLOAT_FORMATS[type].minNormal;
  return (x: number): Kind => {
    const ev = exact(R(x));
    return kindOf(ev, Number.isNaN(ev) ? NaN : rounded(x), R, minNormal);
  };
}

/**
 * The exact values on the breakdown grid of one type and domain (input rounded to the type), to be
 * shared by every breakdown scan against the same reference: a formula and each of its rewrites.
 */
export interface ExactOnGrid {
  type: FloatType;
  domain: readonly [number, number];
  values: Float64Array;
}

export function exactOnGrid(exact: ScalarFn, type: FloatType, domain: readonly [number, number]): ExactOnGrid {
  const R = rounder(type);
  const grid = uniformGrid(domain[0], domain[1], BREAKDOWN_POINTS);
  const values = new Float64Array(grid.length);
  for (let i = 0; i < grid.length; i++) values[i] = exact(R(grid[i] as number));
  return { type, domain, values };
}

/**
 * Bisection that stops once both ends round to neighbouring values of the type (inputs are
 * rounded to the type before evaluation, so finer steps cannot change the answer).
 */
function typeBisect<K>(classify: (x: number) => K, a: number, b: number, ca: K, R: (v: number) => number): number {
  let lo = a;
  let hi = b;
  for (let i = 0; i < 60; i++) {
    const mid = 0.5 * (lo + hi);
    if (mid === lo || mid === hi || R(mid) === R(lo) || R(mid) === R(hi)) {
      // lo and hi are at most one representable input apart: the edge is the last input of lo's
      // kind, so a run is reported as [first, last] inputs of its kind.
      return R(lo);
    }
    if (classify(mid) === ca) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}

/** Runs of a classification on a grid, ends refined by bisection. */
function runs<K extends string>(grid: readonly number[], classify: (x: number) => K, skip: K, limit: number, precomputed?: readonly K[], bisect: (classify: (x: number) => K, a: number, b: number, ca: K) => number = bisectBoundary): Array<{ from: number; to: number; kind: K; atStart: boolean; atEnd: boolean }> {
  const n = grid.length;
  const cls = precomputed ?? grid.map(classify);
  const out: Array<{ from: number; to: number; kind: K; atStart: boolean; atEnd: boolean }> = [];
  let i = 0;
  while (i < n && out.length < limit) {
    const c = cls[i] as K;
    let j = i;
    while (j + 1 < n && cls[j + 1] === c) j++;
    if (c !== skip) {
      const from = i === 0 ? (grid[0] as number) : bisect(classify, grid[i] as number, grid[i - 1] as number, c);
      const to = j === n - 1 ? (grid[n - 1] as number) : bisect(classify, grid[j] as number, grid[j + 1] as number, c);
      out.push({ from, to, kind: c, atStart: i === 0, atEnd: j === n - 1 });
    }
    i = j + 1;
  }
  return out;
}

/**
 * `reference`, when given, holds `exact` on this type's grid over this domain (`exactOnGrid`): the
 * grid is then classified from it and `exact` is evaluated again only where an edge is refined.
 */
export function breakdownIntervals(exact: ScalarFn, rounded: ScalarFn, type: FloatType, domain: readonly [number, number], reference?: ExactOnGrid): BreakdownInterval[] {
  const classify = breakdownClassifier(exact, rounded, type);
  const grid = uniformGrid(domain[0], domain[1], BREAKDOWN_POINTS);
  const R = rounder(type);
  let cls: Kind[] | undefined;
  if (reference && reference.type === type && reference.domain[0] === domain[0] && reference.domain[1] === domain[1]) {
    const minNormal = FLOAT_FORMATS[type].minNormal;
    const ev = reference.values;
    cls = grid.map((x, i) => kindOf(ev[i] as number, Number.isNaN(ev[i]) ? NaN : rounded(x), R, minNormal));
  }
  const bisect = (c: (x: number) => Kind, a: number, b: number, ca: Kind): number => typeBisect(c, a, b, ca, R);
  return runs<Kind>(grid, classify, 'ok', MAX_INTERVALS, cls, bisect).map((r) => ({ from: tidy(r.from), to: tidy(r.to), kind: r.kind as BreakdownKind }));
}

/** Total length of breakdown intervals (to compare a formula with its rewrite). */
export function breakdownMeasure(b: readonly BreakdownInterval[]): number {
  return b.reduce((s, r) => s + (r.to - r.from), 0);
}

/**
 * Every operation's exact value on the overflow grid, from one compiled (probed) function; the
 * per-type thresholds are then read from the stored values, and only edge refinement evaluates again.
 */
export interface OverflowScan {
  grid: number[];
  operations: MathNode[];
  /** |value| of operation k at grid point i: abs[i * operations.length + k]. */
  abs: Float64Array;
  farLeft: Float64Array;
  farRight: Float64Array;
  /** |values| of all operations at x. */
  at: (x: number) => Float64Array;
}

export function scanOperations(node: MathNode, variable: string, params: Record<string, number>, domain: readonly [number, number]): OverflowScan {
  let row = new Float64Array(0);
  const probe = (k: number, v: number): number => {
    const a = Math.abs(v);
    // NaN compares false: keep it as NaN (not an overflow)
    row[k] = a;
    return v;
  };
  const { fn, operations } = compileProbed(node, variable, params, probe);
  const m = operations.length;
  const at = (x: number): Float64Array => {
    row = new Float64Array(m);
    fn(x);
    return row;
  };
  const grid = uniformGrid(domain[0], domain[1], OVERFLOW_POINTS);
  const abs = new Float64Array(grid.length * m);
  grid.forEach((x, i) => abs.set(at(x), i * m));
  return { grid, operations, abs, farLeft: at(-FAR), farRight: at(FAR), at };
}

function intermediateOverflows(scan: OverflowScan, type: FloatType): IntermediateOverflow[] {
  const threshold = FLOAT_FORMATS[type].overflowThreshold;
  const { grid, operations: ops, abs } = scan;
  const m = ops.length;
  const found: Array<{ op: MathNode; intervals: IntermediateOverflow[] }> = [];
  const seen = new Set<string>();
  for (let k = 0; k < m && found.length < MAX_OPERATIONS; k++) {
    const cls = grid.map((_, i) => ((abs[i * m + k] as number) >= threshold ? 'over' : 'ok') as 'over' | 'ok');
    if (!cls.includes('over')) continue;
    const op = ops[k] as MathNode;
    const text = op.toString();
    if (seen.has(text)) continue;
    seen.add(text);
    const classify = (x: number): 'over' | 'ok' => ((scan.at(x)[k] as number) >= threshold ? 'over' : 'ok');
    const intervals = runs(grid, classify, 'ok', MAX_INTERVALS, cls).map((r) => ({
      operation: text,
      from: r.atStart && (scan.farLeft[k] as number) >= threshold ? null : tidy(r.from),
      to: r.atEnd && (scan.farRight[k] as number) >= threshold ? null : tidy(r.to),
    }));
    if (intervals.length > 0) found.push({ op, intervals });
  }
  // An operation that overflows only because an operand does says nothing new: keep the innermost.
  const key = (iv: IntermediateOverflow[]): string => iv.map((r) => `${r.from === null ? 'n' : r.from.toPrecision(6)}:${r.to === null ? 'n' : r.to.toPrecision(6)}`).join('|');
  const out: IntermediateOverflow[] = [];
  for (const a of found) {
    const ka = key(a.intervals);
    const inner = found.some((b) => b !== a && key(b.intervals) === ka && containsNode(a.op, b.op));
    if (!inner) out.push(...a.intervals);
  }
  return out;
}

function containsNode(outer: MathNode, inner: MathNode): boolean {
  let hit = false;
  outer.traverse((c) => {
    if (c !== outer && c === inner) hit = true;
  });
  return hit;
}

/** Finite limit of h at dir·∞ when the tail has settled, else null. */
export function limitAt(h: ScalarFn, dir: 1 | -1): number | null {
  const a = h(dir * 1e7);
  const b = h(dir * FAR);
  if (!Number.isFinite(a) || !Number.isFinite(b)) return null;
  return Math.abs(a - b) <= 1e-6 * (1 + Math.abs(b)) ? b : null;
}

/**
 * Points of each half line, from the origin outward (computed once): every 10th point of the
 * behaviour grid's dense part (step 0.2), then its geometric tail. The threshold is refined by
 * bisection between the last point that has not reached the limit and the next one out.
 */
let halves: { neg: number[]; pos: number[] } | null = null;
function halfLines(): { neg: number[]; pos: number[] } {
  if (!halves) {
    const g = behaviourGrid().filter((x) => Math.abs(x) > DENSE_HALF_WIDTH || Math.abs(Math.round(x * 5) - x * 5) < 1e-9);
    halves = { neg: g.filter((x) => x < 0).reverse(), pos: g.filter((x) => x > 0) };
  }
  return halves;
}

function asymptotes(exact: ScalarFn, rounded: ScalarFn, type: FloatType): AsymptoteRounding[] {
  const R = rounder(type);
  const max = FLOAT_FORMATS[type].max;
  const out: AsymptoteRounding[] = [];
  for (const dir of [-1, 1] as const) {
    const L = limitAt(exact, dir);
    if (L === null) continue;
    const target = R(L);
    // Points of this half line, from 0 outward.
    const half = dir > 0 ? halfLines().pos : halfLines().neg;
    const threshold = (value: (x: number) => number, pts: number[]): number | null => {
      // the last point (from the origin outward) whose value is not yet the limit
      let last = pts.length - 1;
      while (last >= 0 && value(pts[last] as number) === target) last--;
      if (last === pts.length - 1) return null; // never settles on the grid
      if (last < 0) return 0;
      const inside = pts[last] as number;
      const outside = pts[last + 1] as number;
      return tidy(bisectBoundary((x) => value(x) === target, outside, inside, true));
    };
    const exactFrom = threshold((x) => R(exact(x)), half);
    if (exactFrom === null || exactFrom === 0) continue;
    // Skip when f equals its limit exactly beyond the threshold (a flat branch, not rounding).
    const beyond = half.filter((x) => Math.abs(x) > Math.abs(exactFrom));
    if (beyond.every((x) => exact(x) === L)) continue;
    const computedFrom = threshold(rounded, half.filter((x) => Math.abs(x) <= max));
    out.push({ side: dir > 0 ? '+inf' : '-inf', limit: target, exactFrom, computedFrom });
  }
  return out;
}

export function functionFloatLimits(node: MathNode, variable: string, params: Record<string, number>, type: FloatType, domain: readonly [number, number], reference?: ScalarFn, scan?: OverflowScan): FunctionFloatLimits {
  // The reference: the same function in its most accurate known form, in double precision.
  const exact = reference ?? compileScalar(stableForm(node), variable, params);
  const rounded = compileRounded(node, variable, params, type);
  return {
    overflows: intermediateOverflows(scan ?? scanOperations(node, variable, params, domain), type),
    asymptotes: asymptotes(exact, rounded, type),
    breakdown: breakdownIntervals(exact, rounded, type, domain),
  };
}

/** The double-precision reference of a tree: its most accurate known form (see `stableForm`). */
export function referenceOf(node: MathNode, variable: string, params: Record<string, number>): ScalarFn {
  return compileScalar(stableForm(node), variable, params);
}

/** What the per-type analyses share: references and operation scans of f and f′. */
export interface FloatShared {
  f: ScalarFn;
  df: ScalarFn | null;
  scanF: OverflowScan;
  scanDf: OverflowScan | null;
}

export function floatShared(node: MathNode, dnode: MathNode | null, variable: string, params: Record<string, number>, domain: readonly [number, number]): FloatShared {
  return {
    f: referenceOf(node, variable, params),
    df: dnode === null ? null : referenceOf(dnode, variable, params),
    scanF: scanOperations(node, variable, params, domain),
    scanDf: dnode === null ? null : scanOperations(dnode, variable, params, domain),
  };
}

export function floatLimits(node: MathNode, dnode: MathNode | null, variable: string, params: Record<string, number>, type: FloatType, domain: readonly [number, number], shared?: FloatShared): FloatLimits {
  const fmt = FLOAT_FORMATS[type];
  return {
    type,
    max: fmt.max,
    precision: fmt.precision,
    ...functionFloatLimits(node, variable, params, type, domain, shared?.f, shared?.scanF),
    derivative: dnode === null ? null : functionFloatLimits(dnode, variable, params, type, domain, shared?.df ?? undefined, shared?.scanDf ?? undefined),
  };
}
