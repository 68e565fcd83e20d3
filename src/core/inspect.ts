/**
 * `inspect`: everything the engine and the analysis know about one formula, as plain JSON-ready
 * data. Used by `slopewise inspect` and the editor hover; results are cached (LRU) because the hover
 * asks for the same formula again and again.
 */
import { analyzeFormula, type Analysis, type AnalysisOptions } from './analysis';
import { SlopewiseError } from './errors';
import { derive, displayForm, latexForm, parseFormula } from './expr';
import type { Language, ParameterSource } from './types';

export interface InspectOptions {
  /** Variable to differentiate by (default: guessed). */
  variable?: string;
  /** Dialect of the text (default: guessed). */
  language?: Language;
  /** Parameter values (`--param name=value`). */
  params?: Record<string, number>;
  /** |f′| below this is saturating (default 0.01). */
  saturationThreshold?: number;
  /** Domain of the float breakdown scan (default [−100, 100]). */
  domain?: readonly [number, number];
  /** Run the analysis stage (default true). */
  analysis?: boolean;
  /** Budget per simplification (ms). */
  simplifyBudgetMs?: number;
  /** Parts of the analysis to compute (default all). */
  parts?: AnalysisOptions['parts'];
}

export interface EngineFields {
  input: string;
  language: Language;
  /** Canonical stock-mathjs text of f. */
  expression: string;
  expressionDisplay: string;
  variable: string;
  parameters: Record<string, number>;
  parameterSources: Record<string, ParameterSource>;
  unbound: string[];
  /** Recognised catalogue function, when the whole formula is one. */
  recognised?: string;
  /** Name on the left-hand side, when written. */
  name?: string;
  /** f′ and f″ in stock-mathjs syntax (evaluable by mathjs with the variable and parameters in scope). */
  derivative: string;
  secondDerivative: string;
  derivativeDisplay: string;
  secondDerivativeDisplay: string;
  latex: { expression: string; derivative: string; secondDerivative: string };
  /** Set when a simplification ran out of budget. */
  simplifyNote?: string;
  notes: string[];
}

export type InspectResult = EngineFields & Partial<Omit<Analysis, 'notes'>>;

const CACHE_SIZE = 64;
const cache = new Map<string, InspectResult>();

function cacheKey(input: string, opts: InspectOptions): string {
  const params = opts.params ? Object.keys(opts.params).sort().map((k) => [k, opts.params?.[k]]) : [];
  return JSON.stringify([input, opts.variable ?? null, opts.language ?? null, params, opts.saturationThreshold ?? null,
    opts.domain ?? null, opts.analysis ?? true, opts.simplifyBudgetMs ?? null, opts.parts ?? null]);
}

function compute(input: string, opts: InspectOptions): InspectResult {
  const parseOpts: { variable?: string; language?: Language; params?: Record<string, number> } = {};
  if (opts.variable !== undefined) parseOpts.variable = opts.variable;
  if (opts.language !== undefined) parseOpts.language = opts.language;
  if (opts.params !== undefined) parseOpts.params = opts.params;
  const formula = parseFormula(input, parseOpts);
  const derivs = derive(formula, opts.simplifyBudgetMs === undefined ? {} : { budgetMs: opts.simplifyBudgetMs });
  const notes = [...formula.notes];
  if (derivs.simplifyNote) notes.push(derivs.simplifyNote);
  const engine: EngineFields = {
    input,
    language: formula.language,
    expression: formula.expression,
    expressionDisplay: displayForm(formula.node),
    variable: formula.variable,
    parameters: formula.parameters,
    parameterSources: formula.parameterSources,
    unbound: formula.unbound,
    derivative: derivs.first,
    secondDerivative: derivs.second,
    derivativeDisplay: derivs.firstDisplay,
    secondDerivativeDisplay: derivs.secondDisplay,
    latex: { expression: latexForm(formula.node), derivative: latexForm(derivs.firstNode), secondDerivative: latexForm(derivs.secondNode) },
    notes,
  };
  if (formula.recognised !== undefined) engine.recognised = formula.recognised;
  if (formula.name !== undefined) engine.name = formula.name;
  if (derivs.simplifyNote !== undefined) engine.simplifyNote = derivs.simplifyNote;
  if (opts.analysis === false) return engine;
  const aopts: AnalysisOptions = {};
  if (opts.saturationThreshold !== undefined) aopts.saturationThreshold = opts.saturationThreshold;
  if (opts.domain !== undefined) aopts.domain = opts.domain;
  if (opts.parts !== undefined) aopts.parts = opts.parts;
  let full: Analysis;
  try {
    full = analyzeFormula(formula, derivs, aopts);
  } catch (e) {
    // Option errors (threshold, domain) are the caller's to fix.
    if (e instanceof RangeError) throw new SlopewiseError('bad-argument', e.message);
    throw e;
  }
  const { notes: analysisNotes, ...analysis } = full;
  return { ...engine, ...analysis, notes: [...notes, ...analysisNotes] };
}

/**
 * Inspects one formula (cached; the returned object is shared between callers — do not mutate it).
 * Throws SlopewiseError for input the engine cannot read or options out of range.
 */
export function inspect(input: string, opts: InspectOptions = {}): InspectResult {
  const k = cacheKey(input, opts);
  const hit = cache.get(k);
  if (hit) {
    // Refresh recency.
    cache.delete(k);
    cache.set(k, hit);
    return hit;
  }
  const result = compute(input, opts);
  cache.set(k, result);
  if (cache.size > CACHE_SIZE) cache.delete(cache.keys().next().value as string);
  return result;
}

/** Empties the inspect cache (tests, settings changes). */
export function clearInspectCache(): void {
  cache.clear();
}
