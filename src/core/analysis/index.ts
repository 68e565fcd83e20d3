/**
 * What a formula does to gradients, and where each float type breaks it.
 *
 * `analyzeFormula` runs every part on the canonical tree of f and of f′ (from the engine) and returns
 * plain data named as in `slopewise inspect --format json`. A part that cannot run (unbound
 * parameters, a tree that does not evaluate, a derivative missing) is absent from the result and
 * listed in `skipped` with the reason; nothing is ever guessed. Each part's cost is in `timings` (ms).
 */
import type { MathNode } from 'mathjs';
import { FLOAT_TYPES, type Derivatives, type FloatType, type Formula } from '../types';
import { LIMITS } from '../limits';
import { prepare, type Prepared } from './prepare';
import { saturationIntervals, type SaturationInterval } from './saturation';
import { kinksAndJumps, type KinkResult } from './kinks';
import { range, monotonicity, lipschitz, type RangeResult, type Monotonicity } from './shape';
import { normalMoments } from './gain';
import { floatLimits, floatShared, type FloatLimits } from './floatLimits';
import { derivativeInOutput } from './outputForm';
import { stableRewrites, type Suggestion } from './rewrites';

export type { SaturationInterval, SaturationKind } from './saturation';
export type { RangeResult, Monotonicity, LipschitzResult } from './shape';
export type { FloatLimits, FunctionFloatLimits, BreakdownInterval, BreakdownKind, IntermediateOverflow, AsymptoteRounding } from './floatLimits';
export type { Suggestion } from './rewrites';
export { analyzePairing, LOSSES, type PairingAnalysis } from './losses';
export { vectorForms, type VectorForms } from './vector';
export { breakdownIntervals, breakdownClassifier, functionFloatLimits } from './floatLimits';
export { derivativeInOutput } from './outputForm';
export { stableRewrites } from './rewrites';

/** Default |f′| below which an interval is reported as saturating (`--saturation-threshold`). */
export const DEFAULT_SATURATION_THRESHOLD = 0.01;
/** Default domain of the float breakdown scan (`--domain a,b`). */
export const DEFAULT_DOMAIN: readonly [number, number] = [-100, 100];

export type AnalysisPart =
  | 'derivativeInOutput'
  | 'saturation'
  | 'kinks'
  | 'shape'
  | 'gain'
  | 'floatLimits'
  | 'suggestions';

export const ANALYSIS_PARTS: readonly AnalysisPart[] = ['derivativeInOutput', 'saturation', 'kinks', 'shape', 'gain', 'floatLimits', 'suggestions'];

export interface AnalysisOptions {
  /** |f′| below this is saturating. Default 0.01. */
  saturationThreshold?: number;
  /** Domain of the float breakdown scan; at least as wide as given. Default [−100, 100]. */
  domain?: readonly [number, number];
  /** Float types to analyse. Default all three. */
  types?: readonly FloatType[];
  /** Parts to compute. Default all. */
  parts?: readonly AnalysisPart[];
  /**
   * Wall-clock budget (ms) for the whole analysis; parts that would start after it is spent are
   * skipped and listed in `skipped`. Default `LIMITS.formulaBudgetMs`.
   */
  budgetMs?: number;
}

export interface Analysis {
  threshold: number;
  domain: [number, number];
  /** f′ as a stock-mathjs expression in y = f(x) (parameters in scope), or null when there is none. */
  derivativeInOutput?: string | null;
  saturation?: SaturationInterval[];
  kinks?: number[];
  discontinuities?: number[];
  range?: RangeResult;
  monotone?: Monotonicity;
  /** |E[f(z)]| ≤ 5% of √E[f(z)²] for z ~ N(0, 1). */
  zeroCentred?: boolean;
  /** E[f(z)] for z ~ N(0, 1). */
  outputMean?: number;
  /** sup |f′| over ℝ; null when unbounded. */
  lipschitz?: number | null;
  /** Where sup |f′| is reached ('+inf'/'-inf': only approached). */
  lipschitzAt?: number | '+inf' | '-inf' | null;
  /** 1/√E[f(z)²] for z ~ N(0, 1); null when E[f²] is 0 or infinite. */
  gain?: number | null;
  /** E[f(z)²] for z ~ N(0, 1). */
  outputMeanSquare?: number;
  /** E[f′(z)²] for z ~ N(0, 1). */
  derivativeMeanSquare?: number;
  floatLimits?: Partial<Record<FloatType, FloatLimits>>;
  suggestions?: Suggestion[];
  /** Remarks a reader needs to interpret the figures (models, truncations). */
  notes: string[];
  /** Parts not computed, and why. */
  skipped: Array<{ part: AnalysisPart; reason: string }>;
  /** Milliseconds per part. */
  timings: Partial<Record<AnalysisPart | 'prepare', number>>;
}

const now = (): number => (typeof performance !== 'undefined' ? performance.now() : Date.now());

function checkOptions(opts: AnalysisOptions): { threshold: number; domain: [number, number] } {
  const threshold = opts.saturationThreshold ?? DEFAULT_SATURATION_THRESHOLD;
  if (!(threshold > 0) || !Number.isFinite(threshold)) throw new RangeError(`saturation threshold must be a positive number, got ${threshold}`);
  const d = opts.domain ?? DEFAULT_DOMAIN;
  const domain: [number, number] = [d[0], d[1]];
  if (!Number.isFinite(domain[0]) || !Number.isFinite(domain[1]) || !(domain[0] < domain[1])) {
    throw new RangeError(`domain must be two finite numbers a < b, got ${domain.join(',')}`);
  }
  return { threshold, domain };
}

export function analyzeFormula(formula: Formula, derivs: Derivatives, opts: AnalysisOptions = {}): Analysis {
  const { threshold, domain } = checkOptions(opts);
  const parts = new Set(opts.parts ?? ANALYSIS_PARTS);
  const types = opts.types ?? FLOAT_TYPES;
  const result: Analysis = { threshold, domain, notes: [], skipped: [], timings: {} };
  const skipAll = (reason: string): Analysis => {
    for (const part of ANALYSIS_PARTS) if (parts.has(part)) result.skipped.push({ part, reason });
    return result;
  };
  if (formula.unbound.length > 0) return skipAll(`no value for ${formula.unbound.join(', ')}: give it with --param`);

  const t = now();
  let p: Prepared;
  try {
    p = prepare(formula.node, derivs.firstNode, formula.variable, formula.parameters);
  } catch (e) {
    return skipAll(`cannot evaluate the formula or its derivative: ${(e as Error).message}`);
  }
  result.timings.prepare = now() - t;

  const deadline = t + (opts.budgetMs ?? LIMITS.formulaBudgetMs);
  const run = (part: AnalysisPart, body: () => void): void => {
    if (!parts.has(part)) return;
    const start = now();
    if (start > deadline) {
      result.skipped.push({ part, reason: `time budget of ${opts.budgetMs ?? LIMITS.formulaBudgetMs} ms spent before this part` });
      return;
    }
    try {
      body();
    } catch (e) {
      result.skipped.push({ part, reason: (e as Error).message });
    }
    result.timings[part] = now() - start;
  };

  let kinkPoints: number[] = [];
  let jumpPoints: number[] = [];
  let jumps: KinkResult | null = null;
  run('kinks', () => {
    const k = kinksAndJumps(p);
    jumps = k;
    kinkPoints = k.kinks;
    jumpPoints = k.discontinuities;
    result.kinks = k.kinks;
    result.discontinuities = k.discontinuities;
  });
  run('derivativeInOutput', () => {
    result.derivativeInOutput = derivativeInOutput(p);
  });
  run('saturation', () => {
    const s = saturationIntervals(p, threshold);
    result.saturation = s.intervals;
    if (s.truncated) result.notes.push(`saturation: only the first ${s.intervals.length} intervals are listed`);
    if (s.oscillating) result.notes.push('saturation: f′ keeps changing class beyond |x| = 20 (oscillates); only intervals within [−20, 20] are listed');
  });
  run('shape', () => {
    // Jumps and poles are found by the kinks part; run it here if it was not asked for.
    const k: KinkResult = jumps ?? kinksAndJumps(p);
    const r = range(p);
    for (const pole of k.poles) {
      if (pole.left < 0 || pole.right < 0) r.inf = null;
      if (pole.left > 0 || pole.right > 0) r.sup = null;
    }
    if (r.inf === null) r.infAttained = false;
    if (r.sup === null) r.supAttained = false;
    result.range = r;
    result.monotone = acrossJumps(monotonicity(p), k);
    if (jumpPoints.length > 0) {
      // A jump has no finite Lipschitz constant, whatever f′ is away from it.
      result.lipschitz = null;
      result.lipschitzAt = null;
    } else {
      const l = lipschitz(p);
      result.lipschitz = l.value;
      result.lipschitzAt = l.at;
    }
  });
  run('gain', () => {
    // Split the quadrature at kinks and jumps, and at every branch switch (harmless when smooth).
    const m = normalMoments(p, [...p.breaks, ...kinkPoints, ...jumpPoints]);
    if (!Number.isFinite(m.mean) || !Number.isFinite(m.meanSquare)) throw new Error('E[f(z)] or E[f(z)²] is not finite for z ~ N(0, 1)');
    result.gain = m.gain;
    result.outputMean = m.mean;
    result.outputMeanSquare = m.meanSquare;
    result.derivativeMeanSquare = m.derivativeMeanSquare;
    result.zeroCentred = Math.abs(m.mean) <= 0.05 * Math.sqrt(m.meanSquare);
  });
  run('floatLimits', () => {
    const out: Partial<Record<FloatType, FloatLimits>> = {};
    const shared = floatShared(p.node, p.dnode, p.variable, p.params, domain);
    for (const type of types) out[type] = floatLimits(p.node, p.dnode, p.variable, p.params, type, domain, shared);
    result.floatLimits = out;
    result.notes.push(
      'floatLimits: breakdown compares the formula as written, every operation rounded to the type, with the exact value rounded once; ' +
        'asymptotes give both models (exactFrom: exact value then rounded, computedFrom: every operation in the type)',
    );
  });
  run('suggestions', () => {
    // Reuse the breakdowns floatLimits found rather than computing them again.
    const fl = result.floatLimits;
    const known = fl
      ? {
          function: Object.fromEntries(types.map((t) => [t, fl[t]?.breakdown])),
          derivative: Object.fromEntries(types.map((t) => [t, fl[t]?.derivative?.breakdown])),
        }
      : {};
    result.suggestions = stableRewrites(p.node, p.dnode, p.variable, p.params, types, domain, known, deadline);
  });
  return result;
}

/**
 * Monotonicity over ℝ from f′ on the pieces and the direction of every jump: 1/x decreases on both
 * sides of 0 but jumps up there, so it is not monotone; a step is non-decreasing.
 */
function acrossJumps(m: Monotonicity, k: KinkResult): Monotonicity {
  if (k.poles.length > 0) {
    // a pole from −∞ to +∞ (or back) breaks any monotonicity unless both sides agree with it
    const ups = k.poles.every((q) => q.left < 0 && q.right > 0);
    const downs = k.poles.every((q) => q.left > 0 && q.right < 0);
    if (!((ups && (m === 'increasing' || m === 'non-decreasing')) || (downs && (m === 'decreasing' || m === 'non-increasing')))) return 'none';
  }
  if (k.jumps.length === 0) return m;
  const up = k.jumps.every((j) => j.size > 0);
  const down = k.jumps.every((j) => j.size < 0);
  if (m === 'constant') return up ? 'non-decreasing' : down ? 'non-increasing' : 'none';
  if ((m === 'increasing' || m === 'non-decreasing') && up) return m;
  if ((m === 'decreasing' || m === 'non-increasing') && down) return m;
  return 'none';
}

/** Exposed for tests and the checker: the prepared samples of a formula. */
export function prepareFormula(node: MathNode, dnode: MathNode, variable: string, params: Record<string, number>): Prepared {
  return prepare(node, dnode, variable, params);
}
