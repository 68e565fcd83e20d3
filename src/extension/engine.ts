/**
 * The extension's one door into the core's engine, analysis, detection and checking. Everything
 * else in src/extension calls these functions, so the adapters do not depend on the core's module
 * layout, and a failure is classified once (user error vs bug) for logging.
 */
import type { MathNode } from 'mathjs';
import { isSlopewiseError, SlopewiseError } from '../core/errors';
import { LANGUAGES, type Derivatives, type Finding, type FloatType, type Formula, type FoundFormula, type Language, type ParseOptions } from '../core/types';
import { parseFormula, derive, displayForm } from '../core/expr';
import { compileScalar } from '../core/expr/compile';
import { math } from '../core/math';
import { analyzeFormula } from '../core/analysis';
import { findFormulas } from '../core/detect';
import { checkText, createChecker, type CheckOptions } from '../core/check';
import { LIMITS } from '../core/limits';
import { coreLanguage } from './languages';
import { grid, safeEval } from '../core/plot/sample';
import type { HoverInput } from '../core/hover';
import type { CurveInput } from '../core/plot/spec';
import type * as vscode from 'vscode';

export interface InspectOptions {
  variable?: string | undefined;
  language?: Language | undefined;
  params?: Record<string, number> | undefined;
  saturationThreshold?: number;
  floatTypes?: FloatType[];
}

export interface Derived {
  expression: string;
  node: MathNode;
  variable: string;
  parameters: Record<string, number>;
  unbound: string[];
  first: string;
  firstNode: MathNode;
  firstDisplay: string;
  second: string;
  secondNode: MathNode;
  secondDisplay: string;
}

/** Parses, derives and analyses one formula: the hover card's input (the inspect fields). */
export function inspectText(text: string, opts: InspectOptions): HoverInput {
  const { formula, derivs } = parseAndDerive(text, opts);
  const analysis = analyzeFormula(formula, derivs, {
    ...(opts.saturationThreshold !== undefined ? { saturationThreshold: opts.saturationThreshold } : {}),
    ...(opts.floatTypes ? { types: opts.floatTypes } : {}),
  });
  const out: HoverInput = {
    input: formula.input,
    expression: formula.expression,
    expressionDisplay: displayForm(formula.node),
    variable: formula.variable,
    parameters: formula.parameters,
    unbound: formula.unbound,
    notes: formula.notes,
    derivative: derivs.first,
    derivativeDisplay: derivs.firstDisplay,
    secondDerivative: derivs.second,
    secondDerivativeDisplay: derivs.secondDisplay,
    threshold: analysis.threshold,
    domain: analysis.domain,
  };
  if (formula.recognised) out.recognised = formula.recognised;
  if (derivs.simplifyNote) out.simplifyNote = derivs.simplifyNote;
  if (analysis.derivativeInOutput !== undefined) out.derivativeInOutput = outputFormDisplay(analysis.derivativeInOutput);
  if (analysis.saturation) out.saturation = analysis.saturation;
  if (analysis.kinks) out.kinks = analysis.kinks;
  if (analysis.discontinuities) out.discontinuities = analysis.discontinuities;
  if (analysis.range) out.range = analysis.range;
  if (analysis.monotone) out.monotone = analysis.monotone;
  if (analysis.lipschitz !== undefined) out.lipschitz = analysis.lipschitz;
  if (analysis.lipschitzAt !== undefined) out.lipschitzAt = analysis.lipschitzAt;
  if (analysis.gain !== undefined) out.gain = analysis.gain;
  if (analysis.floatLimits) out.floatLimits = analysis.floatLimits;
  if (analysis.suggestions) out.suggestions = analysis.suggestions;
  if (formula.unbound.length === 0) {
    const f = compileScalar(formula.node, formula.variable, formula.parameters);
    const df = compileScalar(derivs.firstNode, formula.variable, formula.parameters);
    const xs = grid(SPARK_DOMAIN[0], SPARK_DOMAIN[1], 120);
    out.spark = { xs, f: xs.map((x) => safeEval(f, x)), df: xs.map((x) => safeEval(df, x)) };
  }
  return out;
}

/** The analysis writes f′(y) in stock-mathjs syntax; show it in the same display form as f′ (text we generated, only parsed). */
function outputFormDisplay(expr: string | null): string | null {
  if (expr === null) return null;
  try {
    return displayForm(math.parse(expr));
  } catch {
    return expr;
  }
}

/** The x range of the hover card's small plot. */
const SPARK_DOMAIN: [number, number] = [-6, 6];

type FormulaOpts = { variable?: string | undefined; language?: string | undefined; params?: Record<string, number> | undefined };

function parseOptions(opts: FormulaOpts): ParseOptions {
  const p: ParseOptions = {};
  if (opts.variable) p.variable = opts.variable;
  if (opts.language && (LANGUAGES as readonly string[]).includes(opts.language)) p.language = opts.language as Language;
  if (opts.params) p.params = opts.params;
  return p;
}

/**
 * Parsing and deriving under a small LRU: the hover, the plot (every slider step and zoom) and the
 * commands ask for the same formulas again and again, and simplification is the slow part (100s of ms).
 */
const DERIVED_CACHE_SIZE = 64;
const derivedCache = new Map<string, { formula: Formula; derivs: Derivatives }>();

function parseAndDerive(text: string, opts: FormulaOpts): { formula: Formula; derivs: Derivatives } {
  const p = parseOptions(opts);
  const key = JSON.stringify([text, p.variable ?? '', p.language ?? '', Object.entries(p.params ?? {}).sort()]);
  const hit = derivedCache.get(key);
  if (hit) {
    derivedCache.delete(key);
    derivedCache.set(key, hit);
    return hit;
  }
  const formula = parseFormula(text, p);
  const entry = { formula, derivs: derive(formula) };
  derivedCache.set(key, entry);
  if (derivedCache.size > DERIVED_CACHE_SIZE) {
    const oldest = derivedCache.keys().next().value;
    if (oldest !== undefined) derivedCache.delete(oldest);
  }
  return entry;
}

export function deriveText(text: string, opts: FormulaOpts): Derived {
  const { formula, derivs } = parseAndDerive(text, opts);
  return {
    expression: formula.expression, node: formula.node, variable: formula.variable, parameters: formula.parameters,
    unbound: formula.unbound, first: derivs.first, firstNode: derivs.firstNode, firstDisplay: derivs.firstDisplay,
    second: derivs.second, secondNode: derivs.secondNode, secondDisplay: derivs.secondDisplay,
  };
}

export function findFormulasIn(text: string, opts: { languageId?: Language; fileName?: string }): FoundFormula[] {
  return findFormulas(text, opts);
}

export interface CheckInOptions { languageId?: Language; fileName?: string; maxFormulasPerFile?: number }

/** The core's check options from the extension's: settings may lower the core's limit, never raise it. */
function checkOptions(opts: CheckInOptions): CheckOptions {
  const o: CheckOptions = {};
  if (opts.languageId) o.languageId = opts.languageId;
  if (opts.fileName) o.fileName = opts.fileName;
  if (opts.maxFormulasPerFile !== undefined) o.limits = { maxFormulasPerFile: Math.min(opts.maxFormulasPerFile, LIMITS.maxFormulasPerFile) as typeof LIMITS.maxFormulasPerFile };
  return o;
}

export function checkTextIn(text: string, opts: CheckInOptions): Finding[] {
  return checkText(text, checkOptions(opts));
}

export interface DocumentChecker {
  check(text: string, opts: CheckInOptions): Finding[];
  /** The document's formulas (as findFormulasIn), through the same memory as its checks. */
  findFormulas(text: string, opts: { languageId?: Language; fileName?: string }): FoundFormula[];
}

/**
 * A checker for one document that keeps what it learnt between checks (core/check `createChecker`:
 * formulas, comparisons, detection results per function and comment block, the last lexing), so a
 * re-check after an edit redoes only what the edit touched and returns what a full check would.
 */
export function documentChecker(): DocumentChecker {
  const checker = createChecker();
  return {
    check: (text, opts) => checker.check(text, checkOptions(opts)),
    findFormulas: (text, opts) => checker.findFormulas(text, opts),
  };
}

/**
 * One plotted formula: compiled f, f′, f″ with slider overrides applied, and the analysis the chart
 * marks (saturating/dead ranges, kinks, breakdown ranges of the chosen float type).
 */
export function plotCurve(request: FormulaOpts & { formula: string }, overrides: Record<string, number>, floatType: FloatType,
  domain: [number, number] = [-6, 6]):
    { curve: CurveInput; variable: string; parameters: Record<string, number> } {
  const first = parseAndDerive(request.formula, request).formula;
  const applied: Record<string, number> = { ...first.parameters };
  let changed = false;
  for (const [k, v] of Object.entries(overrides)) {
    if (k in applied || first.unbound.includes(k)) {
      applied[k] = v;
      changed = true;
    }
  }
  const { formula, derivs } = parseAndDerive(request.formula, changed ? { ...request, params: { ...request.params, ...applied } } : request);
  if (formula.unbound.length) {
    throw new SlopewiseError('no-variable', `no value for ${formula.unbound.join(', ')}: plot a formula with its parameters bound`);
  }
  // Float limits only over what is on screen: the chart shows nothing else, and it keeps zooming quick.
  const analysis = analyzeFormula(formula, derivs, { types: [floatType], parts: ['saturation', 'kinks', 'floatLimits'], domain });
  const v = formula.variable;
  const curve: CurveInput = {
    label: formula.recognised ?? displayForm(formula.node),
    f: compileScalar(formula.node, v, formula.parameters),
    df: compileScalar(derivs.firstNode, v, formula.parameters),
    d2f: compileScalar(derivs.secondNode, v, formula.parameters),
  };
  if (analysis.saturation) curve.saturation = analysis.saturation;
  if (analysis.kinks) curve.kinks = analysis.kinks;
  const limits = analysis.floatLimits?.[floatType];
  if (limits) curve.breakdown = { [floatType]: [...limits.breakdown] };
  return { curve, variable: v, parameters: formula.parameters };
}

/** The detected formula nearest to `offset` (to follow a plotted formula while its file is edited). */
export function formulaNear(doc: vscode.TextDocument, offset: number, _previous: string): { text: string; offset: number; variable?: string } | undefined {
  const all = findFormulasIn(doc.getText(), { languageId: coreLanguage(doc.languageId) ?? 'plain', fileName: doc.fileName });
  let best: FoundFormula | undefined;
  for (const f of all) if (!best || Math.abs(f.span.start - offset) < Math.abs(best.span.start - offset)) best = f;
  if (!best) return undefined;
  const out: { text: string; offset: number; variable?: string } = { text: best.text, offset: best.span.start };
  if (best.variable) out.variable = best.variable;
  return out;
}

/** True for errors about the user's text (logged at debug level), false for bugs. */
export function isUserError(e: unknown): boolean {
  return isSlopewiseError(e);
}

export function describe(e: unknown): string {
  if (isSlopewiseError(e)) return e.position === undefined ? e.message : `${e.message} (at ${e.position})`;
  if (e instanceof Error) return e.stack ?? e.message;
  return String(e);
}
