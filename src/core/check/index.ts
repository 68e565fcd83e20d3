/**
 * Checking: pair each hand-written derivative with its forward and compare them numerically; compare
 * comment formulas with the code under them; flag float breakdowns with a known stable rewrite and
 * activation–loss pairings that starve the gradient.
 *
 * Phases: 1. detect (../detect) → 2. read every candidate with the engine → 3. pair (pairing.ts) →
 * 4. compare (compare.ts) in the input or the saved-output form → 5. call sites of output-form
 * derivatives → 6. comment vs code → 7. unstable forms and vanishing pairs (../analysis).
 */
import type { MathNode } from 'mathjs';
import { LIMITS, type Limits } from '../limits';
import { FLOAT_TYPES, type Finding, type Formula, type FoundFormula, type Language, type ScalarFn, type Span } from '../types';
import { parseFormula } from '../expr/parse';
import { differentiate } from '../expr/differentiate';
import { lightClean } from '../expr/simplify';
import { compileScalar } from '../expr/compile';
import { analyzePairing, stableRewrites } from '../analysis/index';
import { emitCode, emitLanguageFor } from '../emit';
import { parseNumber } from '../detect/code';
import { analyzeSource, DetectMemo, findFormulas, derivativeBase, type DetectOptions, hasSymbol, replaceSymbol, stripKernelSuffix, type CodeFormula, type SourceModel } from '../detect/index';
import type { CommentFormula } from '../detect/comments';
import type { Token } from '../detect/lexer';
import { BATCH_SYMBOL, matchClose, splitArgs } from '../detect/stmt';
import { compareFunctions, samplePoints, type Comparison } from './compare';
import { math } from '../math';
import { MESSAGES } from './messages';
import { TARGET_NAMES, OUTPUT_NAMES, UPSTREAM_NAMES } from '../detect/words';
import { keyOf, Lru, memo, paramsKey } from '../cache';

/** Width (in x) of a float32 breakdown interval of kind zero/inaccurate that is worth a warning. */
export const SEVERE_WIDTH = 1;
/** Pre-activations that occur in practice (common practice): breakdowns of kind zero/inaccurate beyond ±30 are not reported. */
export const PRACTICAL_RANGE = 30;
/** Fraction of the peak magnitude below which a lost value is not worth a warning. */
export const SIGNIFICANT = 1e-3;

export interface CheckOptions {
  languageId?: string;
  fileName?: string;
  limits?: Partial<Limits>;
  /** Rules to run (default all). */
  rules?: readonly Finding['rule'][];
  /** Where to keep parsed formulas and comparisons (default: one shared, bounded cache; see ../cache.ts). */
  cache?: CheckCache;
}

/**
 * Results the checker reuses, each a pure function of its key (../cache.ts): formulas by (text,
 * notation, variable, parameter bindings); comparisons by the keys of both formulas plus the argument
 * form, the upstream names and the defaults both sides declare; float analyses by the formula's key.
 * Nothing keyed here depends on where in a file the formula is.
 */
export class CheckCache {
  readonly parse = new Lru<{ f?: Formula }>();
  readonly verdict = new Lru<{ v?: Verdict }>();
  readonly same = new Lru<{ c?: Comparison }>();
  readonly unstable = new Lru<{ u?: UnstableCore }>();
  readonly vanishing = new Lru<{ w?: VanishingCore }>();
  /** Code emitted for fixes, by (expression text, variables, target language). */
  readonly emitted = new Lru<{ code?: string }>();
  /** Detection results per function and per comment block (see DetectMemo). */
  readonly detect = new DetectMemo();
  clear(): void {
    this.detect.clear();
    this.emitted.clear();
    this.parse.clear();
    this.verdict.clear();
    this.same.clear();
    this.unstable.clear();
    this.vanishing.clear();
  }
}

const sharedCache = new CheckCache();
/** The cache of the check running now (checks are synchronous; restored when a check ends). */
let active: CheckCache = sharedCache;
/** The key a cached formula was read under (by identity; formulas are never mutated). */
const formulaKeys = new WeakMap<Formula, string>();

/** Empties the shared cache used by `checkText`/`checkSource` (the bench's cold checks; tests). */
export function clearCheckCaches(): void {
  sharedCache.clear();
}

/**
 * An incremental checker for one document: `check` returns exactly what `checkText` returns for the
 * same text, reusing the formulas, comparisons and float analyses of functions whose text (and the
 * text of the functions they pair with, and the parameter bindings) did not change since an earlier
 * check. Detection and pairing run on the whole text every time — pairing crosses functions, so
 * only results keyed by the contents of both sides are reused. Bounded; drop it with the document.
 */
export interface Checker {
  check(text: string, opts?: Omit<CheckOptions, 'cache'>): Finding[];
  checkSource(text: string, opts?: Omit<CheckOptions, 'cache'>): CheckResult;
  /** `findFormulas` (detect) through this checker's detection memo: the same document's formulas, cheaply after an edit. */
  findFormulas(text: string, opts?: Omit<DetectOptions, 'memo'>): FoundFormula[];
  clear(): void;
}

export function createChecker(): Checker {
  const cache = new CheckCache();
  return {
    check: (text, opts = {}) => checkSource(text, { ...opts, cache }).findings,
    checkSource: (text, opts = {}) => checkSource(text, { ...opts, cache }),
    findFormulas: (text, opts = {}) => findFormulas(text, { ...opts, memo: cache.detect }),
    clear: () => cache.clear(),
  };
}

export interface CheckResult {
  findings: Finding[];
  /** What was not checked and why (unreadable formulas, unpaired derivatives, budgets). */
  notes: string[];
  /** Pairs compared: derivative name → forward name, with the verdict. */
  pairs: { derivative: string; forward: string; how: string; argument: 'input' | 'output'; ok: boolean }[];
}

/** A formula read by the engine, with where it came from. */
interface Read {
  formula: Formula;
  name: string;
  span: Span;
  line: number;
  origin: 'code' | 'comment';
  code?: CodeFormula;
  comment?: CommentFormula;
  role: 'activation' | 'loss' | 'derivative';
  argument?: 'input' | 'output';
  /** The argument form is known for certain (saved tensors, a saved attribute), not guessed from names. */
  argumentCertain?: boolean;
}

export function checkText(text: string, opts: CheckOptions = {}): Finding[] {
  return checkSource(text, opts).findings;
}

export function checkSource(text: string, opts: CheckOptions = {}): CheckResult {
  const outer = active;
  active = opts.cache ?? sharedCache;
  try {
    return checkSourceWith(text, opts);
  } finally {
    active = outer;
  }
}

function checkSourceWith(text: string, opts: CheckOptions): CheckResult {
  const limits = { ...LIMITS, ...opts.limits };
  // Only a document's own checker keeps detection results: one-shot checks (the CLI over a tree) would only fill memory.
  const model = analyzeSource(text, active === sharedCache ? opts : { ...opts, memo: active.detect });
  const notes = [...model.skipped];
  const started = Date.now();
  const rules = new Set(opts.rules ?? ['derivative-mismatch', 'formula-mismatch', 'unstable-form', 'vanishing-pair']);
  const language = model.info.language;

  // 2. read every candidate (at most maxFormulasPerFile, within the file's time budget)
  const reads: Read[] = [];
  let readingStopped = false;
  const stopReading = (): boolean => {
    if (readingStopped) return true;
    if (reads.length >= limits.maxFormulasPerFile) notes.push(`more than ${limits.maxFormulasPerFile} formulas: the rest of the file was not read`);
    else if (Date.now() - started > limits.fileBudgetMs) notes.push(`time budget of ${limits.fileBudgetMs} ms ran out while reading formulas: the rest of the file was not read`);
    else return false;
    readingStopped = true;
    return true;
  };
  // parameters: file constants < defaults < numeric arguments at call sites
  // calls by callee name, in file order (callSiteParams reads only the calls of one function)
  const callsByName = new Map<string, Call[]>();
  for (const call of callsIn(model.lexed.tokens.filter((t) => t.kind !== 'nl'))) {
    const l = callsByName.get(call.name);
    if (l) l.push(call); else callsByName.set(call.name, [call]);
  }
  for (const c of model.codeFormulas) {
    if (stopReading()) break;
    const params = { ...model.constants, ...c.params, ...callSiteParams(c, callsByName.get(c.fn.name) ?? [], model.constants) };
    for (const u of c.upstream) params[u] = 1;
    const f = tryParse(c.text, language, c.variable, params);
    if (!f) continue;
    const r: Read = { formula: f, name: c.qualifiedName, span: headerSpan(text, c.span), line: c.line, origin: 'code', code: c, role: c.role };
    if (c.argument) r.argument = c.argument;
    // Certain: a saved attribute or saved tensor, or an output-named argument of a backward pass that
    // also takes the upstream gradient (backward passes name what they were handed).
    if (c.argument && (/^(self|ctx|this)_/.test(c.variable ?? '') || c.fn.body.some((s) => s.k === 'multi') ||
      (c.argument === 'output' && c.upstream.length > 0))) r.argumentCertain = true;
    reads.push(r);
  }
  for (const c of model.commentFormulas) {
    if (stopReading()) break;
    const lang: Language = c.text.includes('\\') ? 'latex' : 'plain';
    const f = tryParse(c.text, lang, c.variable, {});
    if (!f) continue;
    const r: Read = { formula: f, name: c.name ?? '', span: c.span, line: c.line, origin: 'comment', comment: c, role: c.role };
    if (c.argument) r.argument = c.argument;
    reads.push(r);
  }

  const findings: Finding[] = [];
  const pairs: CheckResult['pairs'] = [];
  const usedAsDerivative = derivativesByUse(model, reads);
  const forwards = reads.filter((r) => r.role !== 'derivative' && r.origin === 'code');
  const findForward = (name: string): Read | undefined => {
    const base = stripKernelSuffix(name);
    return forwards.find((f) => f.code!.fn.name === name || f.name === name) ??
      forwards.find((f) => stripKernelSuffix(f.code!.fn.name) === base || f.code!.fn.name.toLowerCase() === base.toLowerCase()) ??
      forwards.find((f) => [`${base}_forward`, `${base}_fwd`, `${base}Forward`, `${base}_fn`].includes(stripKernelSuffix(f.code!.fn.name)));
  };
  const outOfTime = (): boolean => {
    if (Date.now() - started > limits.fileBudgetMs) {
      notes.push(`time budget of ${limits.fileBudgetMs} ms ran out: the rest of the file was not checked`);
      return true;
    }
    return false;
  };

  // 3–4. derivatives in code
  const vjp = customDerivativeRegistrations(model);
  const checkedComments = new Set<Read>();
  for (const d of reads.filter((r) => r.role === 'derivative' && r.origin === 'code')) {
    if (outOfTime()) break;
    const fn = d.code!.fn;
    let fwd: Read | undefined;
    let how = '';
    if (fn.className) {
      fwd = forwards.find((f) => f.code!.fn.className === fn.className && ['forward', '__call__', 'call', 'apply', 'fprop', 'f'].includes(f.code!.fn.name.toLowerCase()));
      if (fwd) how = 'class';
    }
    if (!fwd && vjp.has(fn.name)) {
      fwd = findForward(vjp.get(fn.name)!);
      if (fwd) how = 'custom-derivative registration';
    }
    if (!fwd) {
      const base = derivativeBase(fn.name);
      if (base) fwd = findForward(base) ?? findForward(base.replace(/_$/, ''));
      if (fwd) how = 'name';
    }
    if (!fwd) {
      fwd = usedAsDerivative.get(d) ?? pairByCallSite(model, d, forwards);
      if (fwd) how = 'call site';
    }
    if (!fwd) {
      const base = derivativeBase(fn.name) ?? fn.name;
      const cat = catalogueForward(base);
      if (cat) { fwd = { formula: cat, name: base, span: d.span, line: d.line, role: 'activation', origin: 'comment' }; how = 'catalogue name'; }
    }
    if (!fwd) { notes.push(`${d.name}: no forward found to compare with`); continue; }
    const verdict = compareDerivative(fwd.formula, d, d.code!.upstream, fwd);
    if (!verdict) { notes.push(`${d.name}: could not be compared with ${fwd.name} (unbound parameters or no comparable points)`); continue; }
    pairs.push({ derivative: d.name, forward: fwd.name, how, argument: verdict.argument, ok: verdict.cmp.ok });
    if (!verdict.cmp.ok && rules.has('derivative-mismatch')) {
      findings.push(mismatchFinding(d, fwd, verdict, text, language));
    } else if (verdict.cmp.ok && verdict.argument === 'output' && rules.has('derivative-mismatch')) {
      findings.push(...callSiteFindings(model, d, fwd, forwards));
    }
  }

  // comment derivatives: d/dx f(x) = …, f'(x) = …, derivative: …
  for (const d of reads.filter((r) => r.role === 'derivative' && r.origin === 'comment')) {
    if (outOfTime()) break;
    const c = d.comment!;
    let fwd: Read | undefined;
    let how = 'comment';
    const below = functionBelow(model, c, reads);
    if (below && below.role === 'derivative') {
      // a comment over a derivative function: the comment must agree with the code
      const verdict = compareSame(below, d);
      checkedComments.add(d);
      if (verdict && !verdict.ok && rules.has('formula-mismatch')) {
        findings.push(formulaMismatch(d, below, verdict));
        continue;
      }
      // and, if the code has a forward, with the forward too (reported once, on the code)
      continue;
    }
    if (c.forwardName) fwd = findForward(c.forwardName);
    if (!fwd && c.forwardName) {
      const cat = catalogueForward(c.forwardName);
      if (cat) { fwd = { formula: cat, name: c.forwardName, span: d.span, line: d.line, role: 'activation', origin: 'comment' }; how = 'catalogue name'; }
    }
    if (!fwd && below && below.role !== 'derivative') fwd = below;
    if (!fwd) {
      // the nearest forward formula above it in the same comment block (else the nearest below)
      const same = reads.filter((r) => r.origin === 'comment' && r.role !== 'derivative' && r.comment!.group === c.group && r.comment!.args.length > 0);
      fwd = same.filter((r) => r.line <= c.line).sort((a, b) => b.line - a.line)[0] ?? same.sort((a, b) => a.line - b.line)[0];
      how = 'same comment';
    }
    if (!fwd) continue;
    // `grad = …`, `derivative: …` declare no variable: read it in the forward's
    if (!c.variable && d.formula.variable !== fwd.formula.variable && hasSymbol(c.text, fwd.formula.variable)) {
      const again = tryParse(c.text, d.formula.language, fwd.formula.variable, {});
      if (again) d.formula = again;
    }
    const verdict = compareDerivative(fwd.formula, d, []);
    if (!verdict) continue;
    pairs.push({ derivative: `comment line ${c.line + 1}`, forward: fwd.name, how, argument: verdict.argument, ok: verdict.cmp.ok });
    if (!verdict.cmp.ok && rules.has('derivative-mismatch')) findings.push(mismatchFinding(d, fwd, verdict, text, language));
  }

  // 6. comment formulas vs the code under them
  if (rules.has('formula-mismatch')) {
    for (const c of reads.filter((r) => r.origin === 'comment' && r.role !== 'derivative')) {
      const cf = c.comment!;
      if (cf.args.length === 0 && OUTPUT_NAMES.has(cf.name ?? '')) continue; // `s = σ(x)`: a definition of a name, not the function
      const below = functionBelow(model, cf, reads);
      if (!below || below.role === 'derivative') continue;
      const v = compareSame(below, c);
      if (v && !v.ok) findings.push(formulaMismatch(c, below, v));
    }
  }

  // 7. unstable forms and vanishing pairs, in code only
  for (const r of reads.filter((x) => x.origin === 'code')) {
    if (outOfTime()) break;
    if (rules.has('unstable-form')) {
      const f = unstable(r, text, language);
      if (f) findings.push(f);
    }
    if (rules.has('vanishing-pair')) {
      const f = vanishing(r);
      if (f) findings.push(f);
    }
  }
  findings.sort((a, b) => a.span.start - b.span.start || a.rule.localeCompare(b.rule));
  return { findings: dedupe(findings), notes, pairs };
}

function dedupe(fs: Finding[]): Finding[] {
  const seen = new Set<string>();
  return fs.filter((f) => {
    const k = `${f.rule}:${f.span.start}`;
    if (seen.has(k)) return false;
    seen.add(k);
    return true;
  });
}

function tryParse(text: string, language: Language, variable: string | undefined, params: Record<string, number>): Formula | undefined {
  const key = keyOf('p', language, variable, paramsKey(params), text);
  const hit = active.parse.get(key);
  if (hit) return hit.f;
  try {
    const f = parseFormula(text, { language, ...(variable ? { variable } : {}), params });
    formulaKeys.set(f, key);
    active.parse.set(key, { f });
    return f;
  } catch (e) {
    // A failure is as deterministic as a success, except one caused by a time budget: not kept.
    if (!/budget|time/i.test(e instanceof Error ? e.message : String(e))) active.parse.set(key, {});
    return undefined;
  }
}

function catalogueForward(name: string): Formula | undefined {
  const n = name.toLowerCase().replace(/^_+|_+$/g, '');
  if (!/^[a-z][a-z0-9_]*$/.test(n)) return undefined;
  const key = keyOf('cat', n);
  const hit = active.parse.get(key);
  if (hit) return hit.f;
  try {
    const f = parseFormula(`${n}(x)`, { variable: 'x' });
    const out = f.recognised || f.node ? f : undefined;
    if (out) formulaKeys.set(out, key);
    active.parse.set(key, out ? { f: out } : {});
    return out;
  } catch {
    active.parse.set(key, {});
    return undefined;
  }
}

/** From the function's start to the end of its first line. */
function headerSpan(text: string, span: Span): Span {
  const nl = text.indexOf('\n', span.start);
  return { start: span.start, end: nl < 0 || nl > span.end ? span.end : nl };
}

/** `f.defvjp(f_fwd, f_bwd)`, `@f.defjvp`, `f.defjvps(...)`: derivative function name → forward name. */
function customDerivativeRegistrations(model: SourceModel): Map<string, string> {
  const out = new Map<string, string>();
  const toks = model.lexed.tokens.filter((t) => t.kind !== 'nl');
  for (let i = 0; i + 3 < toks.length; i++) {
    const t = toks[i]!;
    if (t.kind !== 'id' || toks[i + 1]!.text !== '.') continue;
    const m = toks[i + 2]!.text;
    if (m !== 'defvjp' && m !== 'defjvp' && m !== 'defjvps' && m !== 'defvjps') continue;
    if (toks[i + 3]!.text === '(') {
      const close = matchClose(toks, i + 3);
      const args = splitArgs(toks.slice(i + 4, close)).map((a) => a.filter((x) => x.kind === 'id').pop()?.text).filter((x): x is string => !!x);
      const bwd = m === 'defvjp' ? args[1] : args[0];
      if (bwd) out.set(bwd, t.text);
      // the fwd of a VJP pair is the forward itself with residuals: pair it with the forward too
    } else if (toks[i - 1]?.text === '@') {
      // @f.defjvp on the next def
      const def = toks.slice(i + 3, i + 8).findIndex((x) => x.text === 'def');
      if (def >= 0) {
        const name = toks[i + 3 + def + 1]?.text;
        if (name) out.set(name, t.text);
      }
    }
  }
  return out;
}

/** Pair by call site: `g * f_prime(z)` in a function that also calls `f(z)`. */
function pairByCallSite(model: SourceModel, d: Read, forwards: Read[]): Read | undefined {
  const name = d.code!.fn.name;
  for (const fn of model.code.functions) {
    const { toks, calls } = bodyCalls(fn);
    const dcall = calls.find((c) => c.name === name);
    if (!dcall) continue;
    for (const c of calls) {
      if (c.name === name) continue;
      const f = forwards.find((x) => x.code!.fn.name === c.name);
      if (!f) continue;
      // the same argument, or the derivative is called with the forward's result
      if (c.args[0] === dcall.args[0] || assignedFrom(toks, dcall.args[0] ?? '', c.name)) return f;
    }
  }
  return undefined;
}

/**
 * Functions used as a derivative at a call site: `g * helper(z)` (g an upstream gradient) in a body
 * that also applies a forward to the same `z`. Their role becomes `derivative`, paired with that forward.
 */
function derivativesByUse(model: SourceModel, reads: Read[]): Map<Read, Read> {
  const out = new Map<Read, Read>();
  for (const fn of model.code.functions) {
    const ups = new Set(fn.params.map((p) => p.name).filter((n) => UPSTREAM_NAMES.has(n)));
    if (ups.size === 0) continue;
    const { toks, calls } = bodyCalls(fn);
    for (const c of calls) {
      const r = reads.find((x) => x.origin === 'code' && x.role === 'activation' && x.code!.fn.name === c.name);
      if (!r || out.has(r)) continue;
      const at = toks.findIndex((t) => t.start === c.start);
      const close = toks.findIndex((t) => t.end === c.end);
      const byUpstream = (toks[at - 1]?.text === '*' && ups.has(toks[at - 2]?.text ?? '')) ||
        (toks[close + 1]?.text === '*' && ups.has(toks[close + 2]?.text ?? ''));
      if (!byUpstream) continue;
      const fwdCall = calls.find((o) => o !== c && o.name !== c.name && o.args[0] === c.args[0] &&
        reads.some((x) => x.origin === 'code' && x.role !== 'derivative' && x.code!.fn.name === o.name));
      if (!fwdCall) continue;
      const fwd = reads.find((x) => x.origin === 'code' && x.code!.fn.name === fwdCall.name)!;
      r.role = 'derivative';
      out.set(r, fwd);
    }
  }
  return out;
}

/**
 * Parameter values from the first call site that passes a number (or a file constant) for them:
 * `leaky(z, 0.2)` or `leaky(z, a=0.2)` binds `a` of `def leaky(x, a)`.
 */
function callSiteParams(c: CodeFormula, calls: Call[], constants: Record<string, number>): Record<string, number> {
  const names = c.fn.params.map((p) => p.name).filter((n) => !['self', 'ctx', 'cls', 'this'].includes(n));
  const out: Record<string, number> = {};
  for (const call of calls) {
    if (call.name !== c.fn.name || (call.start >= c.fn.start && call.end <= c.fn.end)) continue;
    call.args.forEach((a, i) => {
      const eq = /^([A-Za-z_]\w*)=([^=].*)$/.exec(a);
      const name = eq ? eq[1]! : names[i];
      const text = eq ? eq[2]! : a;
      if (!name || name === c.variable || name in out || c.upstream.includes(name)) return;
      const v = text in constants ? constants[text] : parseNumber(text);
      if (v !== undefined && Number.isFinite(v)) out[name] = v;
    });
  }
  return out;
}

interface Call { name: string; args: string[]; start: number; end: number; line: number }

type CodeFunction = SourceModel['code']['functions'][number];
const callsByFunction = new WeakMap<CodeFunction, { toks: Token[]; calls: Call[] }>();

/** A function body's tokens (no line breaks) and the calls in it; memoised per detected function object. */
function bodyCalls(fn: CodeFunction): { toks: Token[]; calls: Call[] } {
  let c = callsByFunction.get(fn);
  if (!c) {
    const toks = fn.bodyTokens.filter((t) => t.kind !== 'nl');
    c = { toks, calls: callsIn(toks) };
    callsByFunction.set(fn, c);
  }
  return c;
}

function callsIn(toks: Token[]): Call[] {
  const out: Call[] = [];
  for (let i = 0; i + 1 < toks.length; i++) {
    const t = toks[i]!;
    if (t.kind !== 'id' || toks[i + 1]!.text !== '(') continue;
    if (['def', 'function', 'fn', 'func', 'fun'].includes(toks[i - 1]?.text ?? '')) continue;
    const close = matchClose(toks, i + 1);
    if (close < 0) continue;
    const args = splitArgs(toks.slice(i + 2, close)).map((a) => a.map((x) => x.text).join(''));
    out.push({ name: t.text, args, start: t.start, end: toks[close]!.end, line: t.line });
  }
  return out;
}

/** Is `v` assigned from a call to `fname` in these tokens (`a = sigmoid(z)`)? */
function assignedFrom(toks: Token[], v: string, fname: string): boolean {
  if (!v) return false;
  for (let i = 0; i + 2 < toks.length; i++) {
    if (toks[i]!.text === v && ['=', ':=', '<-'].includes(toks[i + 1]!.text) && (i === 0 || toks[i - 1]!.text !== '.')) {
      // scan the right-hand side on this line for the call
      for (let k = i + 2; k < toks.length && toks[k]!.line === toks[i]!.line; k++) {
        if (toks[k]!.text === fname && toks[k + 1]?.text === '(') return true;
      }
    }
  }
  return false;
}

interface Verdict {
  cmp: Comparison;
  argument: 'input' | 'output';
  /** The form tried first was wrong but the other matched (a swapped argument). */
  swapped?: boolean;
  expected: MathNode;
  /** The forward's variable (the one `expected` is in). */
  variable: string;
  params: Record<string, number>;
}

/** Values for parameters left unbound on both sides (targets of losses, symbolic slopes). */
function sampleAssignments(names: string[]): Record<string, number>[] {
  if (names.length === 0) return [{}];
  const a: Record<string, number> = {};
  const b: Record<string, number> = {};
  for (const n of names) {
    if (TARGET_NAMES.has(n)) { a[n] = 1; b[n] = 0.25; }
    else if (/^(n|N|N_batch|batch|m|count|size|len)$/.test(n)) { a[n] = 4; b[n] = 7; }
    else { a[n] = 0.7; b[n] = 1.3; }
  }
  return [a, b];
}

/**
 * Parameters that both sides take with a default (`beta = 1`) are free: the derivative must be right
 * for every value, so they are also tried away from the default (v · 1.7 + 0.3).
 */
function defaultVariations(fwd: Read | undefined, d: Read): Record<string, number>[] {
  const a = fwd?.code?.params ?? {};
  const b = d.code?.params ?? {};
  const alt: Record<string, number> = {};
  for (const k of Object.keys(a)) if (k in b && a[k] === b[k]) alt[k] = a[k]! * 1.7 + 0.3;
  return Object.keys(alt).length > 0 ? [{}, alt] : [{}];
}

/**
 * Cached by everything the comparison reads: both formulas (by the keys they were parsed under,
 * which cover text, notation, variable and bindings), the argument hint and whether it is certain,
 * the upstream names, and the defaults both sides declare (defaultVariations). Not a single
 * position or name from the file enters the result, so reusing it across edits and files is exact.
 */
function compareDerivative(fwd: Formula, d: Read, upstream: string[], fwdRead?: Read): Verdict | undefined {
  const fk = formulaKeys.get(fwd);
  const dk = formulaKeys.get(d.formula);
  const key = fk !== undefined && dk !== undefined
    ? keyOf('v', fk, dk, d.argument, d.argumentCertain === true, upstream.join(','), paramsKey(fwdRead?.code?.params), paramsKey(d.code?.params))
    : undefined;
  return memo(active.verdict, key, () => ({ v: compareDerivativeUncached(fwd, d, upstream, fwdRead) })).v;
}

function compareDerivativeUncached(fwd: Formula, d: Read, upstream: string[], fwdRead?: Read): Verdict | undefined {
  let best: Verdict | undefined;
  for (const variation of defaultVariations(fwdRead, d)) {
    const v = compareDerivativeOnce(withParams(fwd, variation), { ...d, formula: withParams(d.formula, variation) }, upstream);
    if (!v) return best;
    if (!best || (best.cmp.ok && !v.cmp.ok)) best = v;
    if (!v.cmp.ok) break;
  }
  return best;
}

function withParams(f: Formula, p: Record<string, number>): Formula {
  const keys = Object.keys(p).filter((k) => k in f.parameters);
  if (keys.length === 0) return f;
  const parameters = { ...f.parameters };
  for (const k of keys) parameters[k] = p[k]!;
  return { ...f, parameters };
}

function compareDerivativeOnce(fwd: Formula, d: Read, upstream: string[]): Verdict | undefined {
  const x = fwd.variable;
  let dnode: MathNode;
  try {
    dnode = derivativeOf(fwd.node, x);
  } catch {
    return undefined;
  }
  const shared = [...new Set([...fwd.unbound, ...d.formula.unbound])];
  // Every free symbol must get the same value on both sides; a batch size may sit on one side only
  // (a mean in the forward whose 1/N the backward forgot is exactly the bug to find).
  if (fwd.unbound.some((u) => !d.formula.unbound.includes(u) && u !== d.formula.variable && u !== BATCH_SYMBOL) ||
    d.formula.unbound.some((u) => !fwd.unbound.includes(u) && !upstream.includes(u) && u !== BATCH_SYMBOL)) return undefined;
  let best: Verdict | undefined;
  for (const assign of sampleAssignments(shared)) {
    const fp = { ...fwd.parameters, ...assign };
    const dp = { ...d.formula.parameters, ...assign };
    let F: ScalarFn, Fp: ScalarFn, D: ScalarFn;
    try {
      F = compiled(fwd.node, x, fp);
      Fp = compiled(dnode, x, fp);
      D = compiled(d.formula.node, d.formula.variable, dp);
    } catch {
      return undefined;
    }
    const pts = guardedPoints(fwd.node, x, fp);
    const inputForm = compareFunctions(Fp, D, pts);
    const outputForm = compareFunctions(Fp, (t) => D(F(t)), pts);
    const hinted = d.argument ?? 'input';
    const first = hinted === 'output' ? outputForm : inputForm;
    const second = hinted === 'output' ? inputForm : outputForm;
    const other: 'input' | 'output' = hinted === 'output' ? 'input' : 'output';
    let v: Verdict | undefined;
    if (first && first.ok) v = { cmp: first, argument: hinted, expected: dnode, variable: x, params: fp };
    else if (second && second.ok && !d.argumentCertain) v = { cmp: second, argument: other, expected: dnode, variable: x, params: fp };
    else if (first) v = { cmp: first, argument: hinted, expected: dnode, variable: x, params: fp, ...(second && second.ok ? { swapped: true } : {}) };
    else if (second) v = { cmp: second, argument: other, expected: dnode, variable: x, params: fp };
    if (!v) continue;
    // the upstream gradient must enter linearly: doubling it doubles the result
    if (v.cmp.ok && upstream.length > 0) {
      const dp2 = { ...dp };
      for (const u of upstream) dp2[u] = 2;
      try {
        const D2 = compiled(d.formula.node, d.formula.variable, dp2);
        const lin = compareFunctions((t) => 2 * (v!.argument === 'output' ? D(F(t)) : D(t)), (t) => (v!.argument === 'output' ? D2(F(t)) : D2(t)));
        if (lin && !lin.ok) v = { ...v, cmp: { ...lin, ok: false } };
      } catch { /* compiled once already */ }
    }
    if (!best || (best.cmp.ok && !v.cmp.ok)) best = v;
    if (!v.cmp.ok) break;
  }
  return best;
}

/**
 * Sample points, restricted to [a, b] when the forward clips its own variable there to guard a
 * domain: `log(clip(p, eps, 1 − eps))` is meant for probabilities, and outside [eps, 1 − eps] the
 * clip's zero slope is not something a hand-written derivative is expected to reproduce. A clip is a
 * guard when the formula without it is not finite just outside the interval; a clip that *is* the
 * function (hard tanh) is left alone.
 */
function guardedPoints(node: MathNode, x: string, params: Record<string, number>): number[] {
  const all = samplePoints();
  let found: { lo: number; hi: number; clip: MathNode } | undefined;
  node.traverse((n) => {
    if (found || n.type !== 'FunctionNode') return;
    const outer = n as unknown as { fn: { name: string }; args: MathNode[] };
    const inner = outer.args[0] as unknown as { type: string; fn?: { name: string }; args?: MathNode[] };
    if (!inner || inner.type !== 'FunctionNode' || !inner.args || outer.args.length !== 2 || inner.args.length !== 2) return;
    const pair = `${outer.fn.name}/${inner.fn!.name}`;
    if (pair !== 'min/max' && pair !== 'max/min') return;
    const v = inner.args[0] as unknown as { type: string; name?: string };
    if (v.type !== 'SymbolNode' || v.name !== x) return;
    try {
      const a = compileScalar(inner.args[1]!, x, params)(0);
      const b = compileScalar(outer.args[1]!, x, params)(0);
      const lo = Math.min(a, b);
      const hi = Math.max(a, b);
      if (Number.isFinite(lo) && Number.isFinite(hi) && hi > lo) found = { lo, hi, clip: n };
    } catch { /* not constant bounds */ }
  });
  if (!found) return all;
  const { lo, hi, clip } = found;
  try {
    const unclipped = node.transform((n) => (n === clip ? new math.SymbolNode(x) : n));
    const g = compileScalar(unclipped, x, params);
    const w = hi - lo;
    const guard = [lo - 0.25 * w - 0.01, hi + 0.25 * w + 0.01].some((t) => !Number.isFinite(g(t)));
    if (!guard) return all;
  } catch {
    return all;
  }
  const inside = all.filter((t) => t > lo && t < hi);
  if (inside.length >= 40) return inside;
  return Array.from({ length: 60 }, (_, k) => lo + ((hi - lo) * (k + 0.5)) / 60);
}

/** Compare a comment formula with the code function under it (same role), variable by position. */
function compareSame(code: Read, comment: Read): Comparison | undefined {
  const ck = formulaKeys.get(code.formula);
  const mk = formulaKeys.get(comment.formula);
  const key = ck !== undefined && mk !== undefined ? keyOf('s', ck, mk) : undefined;
  return memo(active.same, key, () => ({ c: compareSameUncached(code, comment) })).c;
}

function compareSameUncached(code: Read, comment: Read): Comparison | undefined {
  const shared = [...new Set([...code.formula.unbound, ...comment.formula.unbound])];
  let worst: Comparison | undefined;
  for (const assign of sampleAssignments(shared)) {
    try {
      const A = compiled(code.formula.node, code.formula.variable, { ...code.formula.parameters, ...assign });
      const B = compiled(comment.formula.node, comment.formula.variable, { ...comment.formula.parameters, ...assign });
      const c = compareFunctions(A, B);
      if (c && (!worst || (!c.ok && worst.ok))) worst = c;
    } catch {
      return undefined;
    }
  }
  return worst;
}

/** The code function a comment documents: the comment sits inside it (docstring) or ends ≤ 2 lines above it. */
function functionBelow(model: SourceModel, c: CommentFormula, reads: Read[]): Read | undefined {
  const g = model.comments.groups[c.group];
  if (!g) return undefined;
  let best: Read | undefined;
  for (const r of reads) {
    if (r.origin !== 'code') continue;
    const fn = r.code!.fn;
    const inside = fn.start <= c.span.start && c.span.end <= fn.end && g.firstLine <= fn.line + 3;
    const above = fn.line > g.lastLine && fn.line - g.lastLine <= 2;
    const trailing = fn.line === c.line && !c.docstring;
    if (inside || above || trailing) {
      if (!best || fn.line < best.code!.fn.line) best = r;
    }
  }
  return best;
}

function fmt(v: number): string {
  if (!Number.isFinite(v)) return String(v);
  return Number(v.toPrecision(6)).toString();
}

const cleaned = new WeakMap<MathNode, MathNode>();
const compiledByTree = new WeakMap<MathNode, Map<string, ScalarFn>>();
const derivedByTree = new WeakMap<MathNode, Map<string, MathNode>>();

/**
 * compileScalar, memoised by tree identity, variable and bindings. A compiled function is a pure
 * numeric function of its argument (generated from the whitelisted tree with the bindings as
 * constants), so sharing it is exact. Failures are not kept (they throw again).
 */
function compiled(node: MathNode, variable: string, params: Record<string, number>): ScalarFn {
  let m = compiledByTree.get(node);
  if (!m) { m = new Map(); compiledByTree.set(node, m); }
  const key = keyOf(variable, paramsKey(params));
  let f = m.get(key);
  if (!f) { f = compileScalar(node, variable, params); m.set(key, f); }
  return f;
}

/** differentiate, memoised by tree identity and variable (trees are immutable; the result is shared). */
function derivativeOf(node: MathNode, variable: string): MathNode {
  let m = derivedByTree.get(node);
  if (!m) { m = new Map(); derivedByTree.set(node, m); }
  let d = m.get(variable);
  if (!d) { d = differentiate(node, variable); m.set(variable, d); }
  return d;
}
/** Fix code per expected tree (few entries each: one per variable name and target language). */
const fixesByTree = new WeakMap<MathNode, Map<string, { code?: string }>>();

/**
 * The expected derivative as shown in a finding and emitted in a fix: the engine's light cleanup
 * (constant folding, ±0/±1 identities, σ/exp forms tidied; linear in the tree) instead of a full
 * simplification. Full simplification cost 10–150 ms per finding and, on the trees differentiate
 * produces, printed the same text as the cleanup in every case measured (softplus′, σ′, tanh′, mish′,
 * polynomials); it is also what simplifyWithinBudget itself falls back to when its budget runs out.
 * Both are equal in value to the tree (the cleanup only applies identities), so the fix is correct.
 * Memoised by tree identity (trees come from the verdict cache and are immutable).
 */
function clean(node: MathNode): MathNode {
  let c = cleaned.get(node);
  if (!c) {
    try {
      c = lightClean(node);
    } catch {
      c = node;
    }
    cleaned.set(node, c);
  }
  return c;
}

/** The cleaned tree's text, memoised by tree identity like `clean` (printing is a tree walk per finding). */
function display(node: MathNode): string {
  let t = displayed.get(node);
  if (t === undefined) { t = clean(node).toString(); displayed.set(node, t); }
  return t;
}
const displayed = new WeakMap<MathNode, string>();

function mismatchFinding(d: Read, fwd: Read, v: Verdict, text: string, language: Language): Finding {
  const expected = display(v.expected);
  const found = d.formula.expression;
  const c = v.cmp;
  let message: string;
  if (v.swapped) {
    message = v.argument === 'input'
      ? MESSAGES.givenInputComputesOutput(d.name || 'this derivative', fwd.name)
      : MESSAGES.givenOutputComputesInput(d.name || 'this derivative', fwd.name);
  } else {
    message = MESSAGES.derivativeMismatch(d.origin, d.name || 'this derivative', fwd.name, v.argument, fmt(c.x), fmt(c.expectedValue), fmt(c.foundValue));
  }
  const f: Finding = {
    rule: 'derivative-mismatch', severity: 'error', span: d.span, message, expected, found,
    evidence: { x: c.x, expectedValue: c.expectedValue, foundValue: c.foundValue, maxError: c.maxError, tolerance: c.tolerance, points: c.points },
    related: { span: fwd.span, message: MESSAGES.forwardHere(fwd.name) },
  };
  const fix = derivativeFix(d, v, text, language);
  if (fix) f.fix = fix;
  return f;
}

/** Replacement text for a derivative whose body is one expression in the input form. */
function derivativeFix(d: Read, v: Verdict, text: string, language: Language): Finding['fix'] | undefined {
  if (d.origin !== 'code' || v.argument !== 'input' || v.swapped) return undefined;
  if (hasSymbol(display(v.expected), BATCH_SYMBOL)) return undefined; // the batch size has no name in the code
  const fn = d.code!.fn;
  const el = emitLanguageFor(language, text);
  if (!el) return undefined;
  const ret = fn.exprBody ?? (fn.body.length === 1 && fn.body[0]!.k === 'return' ? fn.body[0]!.expr : undefined);
  if (!ret || ret.length === 0) return undefined;
  const toks = ret.filter((t) => t.kind !== 'nl' && t.text !== ';');
  const span = { start: toks[0]!.start, end: toks[toks.length - 1]!.end };
  const dv = d.formula.variable;
  // The emitted code depends only on the expected tree (by identity: it comes from the verdict cache),
  // the two variable names and the target language: cached by those.
  let perTree = fixesByTree.get(v.expected);
  if (!perTree) { perTree = new Map(); fixesByTree.set(v.expected, perTree); }
  const emitted = memo(perTree, keyOf(v.variable, dv, el), () => {
    try {
      // the expected derivative in the derivative's own variable name
      let node = clean(v.expected);
      if (dv !== v.variable) node = parseFormula(replaceSymbol(node.toString(), v.variable, dv), { variable: dv }).node;
      return { code: emitCode(node, el, { params: {} }) };
    } catch {
      return {};
    }
  });
  if (emitted.code === undefined) return undefined;
  {
    let code = emitted.code;
    const ups = d.code!.upstream;
    if (ups.length > 0 && hasSymbol(text.slice(span.start, span.end), ups[0]!)) code = `${ups[0]} * (${code})`;
    return { title: MESSAGES.fixTitle(), span, text: code };
  }
}

function formulaMismatch(comment: Read, code: Read, c: Comparison): Finding {
  return {
    rule: 'formula-mismatch', severity: 'error', span: comment.span,
    message: MESSAGES.formulaMismatch(code.name, fmt(c.x), fmt(c.expectedValue), fmt(c.foundValue)),
    expected: code.formula.expression, found: comment.formula.expression,
    evidence: { x: c.x, expectedValue: c.expectedValue, foundValue: c.foundValue, maxError: c.maxError, tolerance: c.tolerance, points: c.points },
    related: { span: code.span, message: MESSAGES.codeHere(code.name) },
  };
}

/**
 * A correct output-form derivative called with the input (or an input-form one called with the
 * output) is a bug at the call site.
 */
function callSiteFindings(model: SourceModel, d: Read, fwd: Read, forwards: Read[]): Finding[] {
  const out: Finding[] = [];
  const dname = d.code!.fn.name;
  const fname = fwd.code?.fn.name ?? fwd.name;
  for (const fn of model.code.functions) {
    if (fn === d.code!.fn) continue;
    const { toks, calls } = bodyCalls(fn);
    for (const call of calls) {
      if (call.name !== dname) continue;
      const arg = call.args[0] ?? '';
      if (arg === '') continue;
      const isOutput = arg.startsWith(`${fname}(`) || assignedFrom(toks, arg, fname) || forwards.some((f) => arg.startsWith(`${f.code?.fn.name}(`) && f === fwd);
      if (isOutput) continue;
      // the argument is something the forward is applied to elsewhere in this function, or a parameter
      const appliedTo = calls.some((c) => c.name === fname && c.args[0] === arg);
      const isParam = fn.params.some((p) => p.name === arg);
      if (!appliedTo && !isParam) continue;
      const f: Finding = {
        rule: 'derivative-mismatch', severity: 'error', span: { start: call.start, end: call.end },
        message: MESSAGES.callSiteInput(dname, arg, fname),
        expected: `${dname}(${fname}(${arg}))`, found: `${dname}(${arg})`,
        related: { span: d.span, message: MESSAGES.derivativeHere(dname) },
      };
      // evidence: what the call computes (the derivative applied to the input) against f′(input)
      try {
        const x = fwd.formula.variable;
        const Fp = compiled(derivativeOf(fwd.formula.node, x), x, fwd.formula.parameters);
        const D = compiled(d.formula.node, d.formula.variable, { ...d.formula.parameters });
        const c = compareFunctions(Fp, D);
        if (c) f.evidence = { x: c.x, expectedValue: c.expectedValue, foundValue: c.foundValue, maxError: c.maxError, tolerance: c.tolerance, points: c.points };
      } catch { /* evidence is optional */ }
      out.push(f);
    }
  }
  return out;
}

/** What the float analysis of one formula found, independent of where the formula is. */
interface UnstableCore {
  title: string;
  expression: string;
  where: string;
  types: string[];
}

/**
 * Does the tree call exp or log? Every stable rewrite pattern (analysis/patterns.ts `match`:
 * softplus, log-sigmoid, sigmoid, log-sum-exp, tanh from exponentials, log1p, expm1) needs an `exp`
 * or a `log` call, so a tree with neither cannot get a suggestion and its breakdown scan is skipped.
 */
export function mayHaveStableRewrite(node: MathNode): boolean {
  let yes = false;
  node.traverse((n) => {
    if (!yes && n.type === 'FunctionNode') {
      const name = (n as unknown as { fn: { name: string } }).fn.name;
      if (name === 'exp' || name === 'log') yes = true;
    }
  });
  return yes;
}

function unstable(r: Read, text: string, language: Language): Finding | undefined {
  if (r.formula.unbound.length > 0) return undefined;
  const fk = formulaKeys.get(r.formula);
  const core = memo(active.unstable, fk, () => ({ u: unstableCore(r.formula) })).u;
  if (!core) return undefined;
  const f: Finding = {
    rule: 'unstable-form', severity: 'warning', span: r.span,
    message: MESSAGES.unstable(r.name, core.title, core.where, core.types.join(', ')),
    expected: core.expression, found: r.formula.expression,
  };
  const el = emitLanguageFor(language, text);
  const fn = r.code?.fn;
  const ret = fn ? (fn.exprBody ?? (fn.body.length === 1 && fn.body[0]!.k === 'return' ? fn.body[0]!.expr : undefined)) : undefined;
  if (el && ret && ret.length > 0) {
    // the emitted rewrite depends only on its text, the variable and the target language
    const emitted = memo(active.emitted, keyOf('stable', core.expression, r.formula.variable, el), () => {
      try {
        return { code: emitCode(parseFormula(core.expression, { variable: r.formula.variable }).node, el, { params: {} }) };
      } catch {
        return {};
      }
    });
    const toks = ret.filter((t) => t.kind !== 'nl' && t.text !== ';');
    if (emitted.code !== undefined && toks.length > 0) {
      f.fix = { title: MESSAGES.stableFixTitle(core.title), span: { start: toks[0]!.start, end: toks[toks.length - 1]!.end }, text: emitted.code };
    }
  }
  return f;
}

function unstableCore(formula: Formula): UnstableCore | undefined {
  if (!mayHaveStableRewrite(formula.node)) return undefined;
  // Only breakdowns that hurt training: ±∞ or NaN in some type, or a wrong value (0 or > 1e-2 relative
  // error) over an interval at least SEVERE_WIDTH long in float32. Tiny subnormal tails are not reported.
  // A lost value matters only where the value itself matters: at least SIGNIFICANT × the function's
  // peak magnitude on [−6, 6] (a gradient of 1e-7 computed to 2 digits does not change training).
  let exact: ScalarFn;
  try {
    exact = compiled(formula.node, formula.variable, formula.parameters);
  } catch {
    return undefined;
  }
  let peak = 0;
  for (let x = -6; x <= 6; x += 0.05) { const v = Math.abs(exact(x)); if (Number.isFinite(v)) peak = Math.max(peak, v); }
  const severe = (b: { from: number | null; to: number | null; kind: string }, t: string): boolean => {
    if (b.kind === 'overflow' || b.kind === 'nan') return true;
    if (t !== 'float32') return false;
    const from = Math.max(b.from ?? -PRACTICAL_RANGE, -PRACTICAL_RANGE);
    const to = Math.min(b.to ?? PRACTICAL_RANGE, PRACTICAL_RANGE);
    if (to - from < SEVERE_WIDTH) return false;
    const mid = Math.abs(exact((from + to) / 2));
    return Number.isFinite(mid) && mid >= SIGNIFICANT * peak;
  };
  const hurts = (before: Partial<Record<string, readonly { from: number | null; to: number | null; kind: string }[]>>): boolean =>
    FLOAT_TYPES.some((t) => (before[t] ?? []).some((b) => severe(b, t)));
  // Every suggestion for f shares f's breakdowns (`before`): the finding is the first suggestion when
  // they hurt, else none — so rewrites are scanned only when they hurt, and only until one helps.
  let suggestions;
  try {
    suggestions = stableRewrites(formula.node, null, formula.variable, formula.parameters, FLOAT_TYPES, [-100, 100], {}, Infinity, { accept: hurts, limit: 1 });
  } catch {
    return undefined;
  }
  const s = suggestions[0];
  if (!s) return undefined;
  const types = FLOAT_TYPES.filter((t) => (s.before[t] ?? []).some((b) => severe(b, t)));
  const first = types.map((t) => ({ t, b: s.before[t]!.find((b) => severe(b, t))! }))[0];
  const where = first ? MESSAGES.breakdownAt(first.t, first.b.kind, first.b.from, first.b.to) : '';
  return { title: s.title, expression: s.expression, where, types };
}

/** What the pairing analysis of one formula found, independent of where the formula is. */
interface VanishingCore { act: string; loss: string; message: string | undefined }

/** Squared (or absolute) error applied to a saturating activation: `(σ(z) − y)²`. */
function vanishing(r: Read): Finding | undefined {
  const core = memo(active.vanishing, formulaKeys.get(r.formula), () => ({ w: vanishingCore(r.formula) })).w;
  if (!core) return undefined;
  return {
    rule: 'vanishing-pair', severity: 'warning', span: r.span,
    message: MESSAGES.vanishing(r.name, core.act, core.loss, core.message),
    found: r.formula.expression,
  };
}

function vanishingCore(formula: Formula): VanishingCore | undefined {
  const node = formula.node;
  const v = formula.variable;
  let hit: { act: MathNode; loss: string } | undefined;
  node.traverse((n) => {
    if (hit) return;
    const on = n as unknown as { type: string; fn?: string; args?: MathNode[] };
    if (on.type !== 'OperatorNode' && on.type !== 'FunctionNode') return;
    let base: MathNode | undefined;
    let loss = '';
    if (on.type === 'OperatorNode' && on.fn === 'pow' && on.args?.[1]?.toString() === '2') { base = on.args[0]; loss = 'squared-error'; }
    if (on.type === 'FunctionNode' && (n as unknown as { fn: { name: string } }).fn.name === 'abs') { base = on.args?.[0]; loss = 'absolute-error'; }
    if (!base) return;
    while (base.type === 'ParenthesisNode') base = (base as unknown as { content: MathNode }).content;
    const b = base as unknown as { type: string; fn?: string; args?: MathNode[] };
    if (b.type !== 'OperatorNode' || b.fn !== 'subtract' || !b.args) return;
    const [p, y] = b.args as [MathNode, MathNode];
    const dependsP = symbolsOf(p).has(v);
    const dependsY = symbolsOf(y).has(v);
    if (dependsP && !dependsY && isSaturating(p)) hit = { act: p, loss };
    else if (dependsY && !dependsP && isSaturating(y)) hit = { act: y, loss };
  });
  if (!hit) return undefined;
  try {
    const act = parseFormula(hit.act.toString(), { variable: v, params: formula.parameters });
    const pa = analyzePairing(act, hit.loss);
    if (!pa.starves) return undefined;
    return { act: act.recognised ?? act.expression, loss: hit.loss, message: pa.message };
  } catch {
    return undefined;
  }
}

function symbolsOf(n: MathNode): Set<string> {
  const s = new Set<string>();
  n.traverse((c) => { if (c.type === 'SymbolNode') s.add((c as unknown as { name: string }).name); });
  return s;
}

/** An exp-based sigmoid or a tanh somewhere in the sub-expression. */
function isSaturating(n: MathNode): boolean {
  let yes = false;
  n.traverse((c) => {
    if (c.type === 'FunctionNode') {
      const name = (c as unknown as { fn: { name: string } }).fn.name;
      if (name === 'tanh' || name === 'erf') yes = true;
      if (name === 'exp') yes = true;
    }
  });
  return yes;
}
