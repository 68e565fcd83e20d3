/**
 * The fuzzed stages: for each, how an input is generated from (seed, index), how it runs, what shape
 * its result must have, and its time budget. Shared by the fuzz runner (fuzz/run.ts, in workers) and
 * the corpus replay test (test/unit/reliability/corpus.test.ts).
 *
 * Verdicts:
 * - `crash`: an exception that is not a SlopewiseError, a SlopewiseError without a message or with a
 *   position outside the input, or a result of the wrong shape (including an analysis part skipped
 *   with a JavaScript engine error as its reason, which would otherwise hide a bug);
 * - `hang`: the stage took longer than its budget (confirmed by a second run);
 * - `mismatch` (reported, not counted as a crash): an oracle disagreed — the same formula written in
 *   another dialect means something else than our own evaluator says, or f′ disagrees with central
 *   finite differences of f.
 */
import * as fs from 'node:fs';
import * as path from 'node:path';
import { SlopewiseError } from '../src/core/errors';
import { LIMITS } from '../src/core/limits';
import { math } from '../src/core/math';
import { FLOAT_TYPES, LANGUAGES, RULES, type Formula, type Language } from '../src/core/types';
import { derive, parseFormula, toCanonicalText } from '../src/core/expr';
import { compileScalar } from '../src/core/expr/compile';
import { inspect, type InspectResult } from '../src/core/inspect';
import { findFormulas } from '../src/core/detect';
import { checkText } from '../src/core/check';
import { EMIT_LANGUAGES, emitCode } from '../src/core/emit';
import { buildHoverCard, type HoverInput } from '../src/core/hover';
import { DIALECTS, PARAM_NAMES, evalTree, genTree, languageOf, render, withHead, type Dialect, type Tree } from './grammar';
import { mutate, mutateSource } from './mutate';
import { Rng } from './rng';
import { SOURCE_LANGUAGES, genSource } from './sources';

export interface FuzzInput {
  text: string;
  /** Options passed to the stage (serialised into corpus files). */
  opts: Record<string, unknown>;
  /** Only for generated (unmutated) inputs: what the text must mean. */
  oracle?: { tree: Tree; variable: string; params: Record<string, number> };
}

export type Verdict =
  | { kind: 'ok'; mismatch?: string }
  | { kind: 'crash'; message: string };

export interface Stage {
  name: string;
  /** A run longer than this is a hang (ms). */
  budgetMs: number;
  /** Share of the total input count. */
  weight: number;
  generate(seed: number, index: number): FuzzInput;
  /** Runs the input; returns the verdict (never throws). */
  run(input: FuzzInput): Verdict;
}

// ─── shape checks ───────────────────────────────────────────────────────────────────────────────

class Shape extends Error {}

function need(ok: unknown, what: string): void {
  if (!ok) throw new Shape(what);
}

const isStr = (v: unknown): v is string => typeof v === 'string';
const isNum = (v: unknown): v is number => typeof v === 'number';
const isNumOrNull = (v: unknown): boolean => v === null || (isNum(v) && !Number.isNaN(v));
const LANGUAGE_SET = new Set<string>(LANGUAGES);

/** Stock mathjs must read the canonical text (the contract of the inspect JSON). */
function stockReadable(text: string, what: string): void {
  try {
    math.parse(text);
  } catch (e) {
    throw new Shape(`${what} is not stock mathjs syntax (${(e as Error).message}): ${text.slice(0, 200)}`);
  }
}

function checkError(e: unknown, input: FuzzInput): Verdict {
  if (e instanceof Shape) return { kind: 'crash', message: `wrong shape: ${e.message}` };
  if (e instanceof SlopewiseError) {
    if (!isStr(e.message) || e.message.trim() === '') return { kind: 'crash', message: `SlopewiseError without a message (${e.code})` };
    if (/^(TypeError|RangeError|ReferenceError)|Cannot read propert|is not a function|undefined/.test(e.message)) {
      return { kind: 'crash', message: `SlopewiseError carrying an internal error: ${e.message}` };
    }
    if (e.position !== undefined && (!Number.isInteger(e.position) || e.position < 0 || e.position > input.text.length)) {
      return { kind: 'crash', message: `SlopewiseError position ${e.position} outside the input (length ${input.text.length}): ${e.message}` };
    }
    return { kind: 'ok' };
  }
  const err = e as Error;
  return { kind: 'crash', message: `${err?.name ?? 'throw'}: ${err?.message ?? String(e)}`.slice(0, 500) };
}

function checkFormula(f: Formula, input: FuzzInput): void {
  need(f && typeof f === 'object', 'formula is not an object');
  need(f.input === input.text, 'formula.input is not the text given');
  need(isStr(f.expression) && f.expression.length > 0, 'formula.expression is empty');
  stockReadable(f.expression, 'expression');
  need(f.node && isStr(f.node.type), 'formula.node is not a tree');
  need(isStr(f.variable) && /^[\p{L}_$][\p{L}\p{N}_$]*$/u.test(f.variable), `formula.variable is not a name: ${String(f.variable)}`);
  need(LANGUAGE_SET.has(f.language), `formula.language unknown: ${String(f.language)}`);
  need(Array.isArray(f.unbound) && f.unbound.every(isStr), 'formula.unbound is not a list of names');
  need(!f.unbound.includes(f.variable), 'the variable is listed as unbound');
  need(!(f.variable in f.parameters), 'the variable is listed as a parameter');
  for (const [k, v] of Object.entries(f.parameters)) need(isNum(v), `parameter ${k} is not a number`);
  need(Array.isArray(f.notes) && f.notes.every(isStr), 'formula.notes is not a list of strings');
}

/** Points for numeric oracles: away from 0, ±1 and other round numbers where conditionals switch. */
const ORACLE_POINTS = [-7.31, -3.77, -2.13, -1.37, -0.61, -0.23, 0.17, 0.43, 0.89, 1.61, 2.47, 4.19, 6.83];

function close(a: number, b: number, rel: number, abs: number): boolean {
  if (Number.isNaN(a) && Number.isNaN(b)) return true;
  if (!Number.isFinite(a) || !Number.isFinite(b)) return a === b;
  return Math.abs(a - b) <= abs + rel * Math.max(Math.abs(a), Math.abs(b));
}

/** Our evaluator of the generated tree vs the engine's reading of its rendering. */
function translationOracle(f: Formula, input: FuzzInput): string | undefined {
  const o = input.oracle;
  if (!o || f.variable !== o.variable || f.unbound.length > 0) return undefined;
  let fn: (x: number) => number;
  try {
    fn = compileScalar(f.node, f.variable, f.parameters);
  } catch (e) {
    return `parsed formula does not compile: ${(e as Error).message}`;
  }
  for (const x of ORACLE_POINTS) {
    const want = evalTree(o.tree, x, o.params);
    if (!Number.isFinite(want) || Math.abs(want) > 1e12) continue;
    // Skip points within 1e-6 of a switch of our own tree (conditionals, max/min, abs).
    const near = evalTree(o.tree, x + 1e-6, o.params);
    const nearL = evalTree(o.tree, x - 1e-6, o.params);
    if (!close(near, nearL, 1e-3, 1e-9)) continue;
    const got = fn(x);
    if (!close(got, want, 1e-9, 1e-12)) return `at ${o.variable} = ${x}: engine ${got}, meant ${want} (read as ${f.expression})`;
  }
  return undefined;
}

/** Central differences of g at x, or undefined where g is not smooth enough to tell. */
function centralDifference(g: (x: number) => number, x: number): number | undefined {
  const h = 1e-4 * Math.max(1, Math.abs(x));
  const d1 = (g(x + h) - g(x - h)) / (2 * h);
  const d2 = (g(x + h / 2) - g(x - h / 2)) / h;
  if (!Number.isFinite(d1) || !Number.isFinite(d2) || Math.abs(d1) > 1e8) return undefined;
  // Richardson: the two estimates agree to O(h²) on smooth functions; a kink or jump breaks that.
  if (!close(d1, d2, 1e-4, 1e-7)) return undefined;
  return (4 * d2 - d1) / 3;
}

function derivativeOracle(f: (x: number) => number, df: (x: number) => number, what: string): string | undefined {
  for (const x of ORACLE_POINTS) {
    const fd = centralDifference(f, x);
    if (fd === undefined) continue;
    const got = df(x);
    if (!Number.isFinite(got)) {
      if (Number.isFinite(f(x))) return `${what} is ${got} at ${x} where finite differences give ${fd}`;
      continue;
    }
    if (!close(got, fd, 1e-5, 1e-6)) return `${what} at ${x}: ${got}, finite differences ${fd}`;
  }
  return undefined;
}

// ─── generators ────────────────────────────────────────────────────────────────────────────────

const VARIABLES = ['x', 'x', 'x', 'z', 'u', 't'];

function grammarInput(r: Rng, maxDepth: number): FuzzInput {
  const dialect: Dialect = r.pick(DIALECTS);
  const variable = r.pick(VARIABLES);
  const tree = genTree(r, { maxDepth, params: r.bool(0.2), cond: r.bool(0.4) });
  const params: Record<string, number> = {};
  for (const p of PARAM_NAMES) params[p] = Math.round((r.next() * 2 + 0.1) * 100) / 100;
  const text = withHead(render(tree, dialect, variable, r), dialect, variable, r);
  const opts: Record<string, unknown> = { params };
  if (r.bool(0.7)) opts.language = languageOf(dialect);
  if (r.bool(0.5) || variable !== 'x') opts.variable = variable;
  return { text, opts, oracle: { tree, variable, params } };
}

/** Short hostile or odd formula texts, mutated further. */
const HOSTILE = [
  'f(x)=x^2; f(3)', '{a:1}["a"]', 'import({}, {override: true})', 'createUnit("foo")', 'evaluate("1+1")', 'x.constructor',
  '[1,2,3]', 'x = 3', 'a ? b : c ? d : e', 'x!', '3 cm', 'x\'', '"x"', 'sin', 'x y', '1 +', '', ' ', '()', ')(', 'x^^2',
  'matrix([1])', 'x[1]', 'x.y.z', 'e^x', 'e^{-x}', '\\frac{1}{1+e^{-x}}', 'σ(x)(1−σ(x))', '1/(1+exp(-x))', 'x if x > 0 else 0.01*x',
  'np.where(x > 0, x, np.expm1(x))', 'fmaxf(x, 0.0f)', 'x.max(0.0)', 'math.Exp(-x)', 'max.(x, 0)', 'pmax(x, 0)', 'x.^2 ./ 2;',
  '1.0d0/(1.0d0+exp(-x))', 'Math.tanh(x)', 'kotlin.math.exp(x)', 'math.exp(x)', 'relu(x, 3, 4)', 'leaky_relu(x, slope=0.2)',
  'gelu(x, approximate="tanh")', 'softplus(x, beta=2)', 'x ** -2', '0/0', '1e999*x', 'log(0)', 'sqrt(-x)', 'x^x^x^x^x^x',
  'erf(erf(erf(x)))', 'abs(abs(abs(x)))', 'tanh(x)/tanh(x)', 'y = m*x + b', 'lambda: 3', 'lambda x, y: x*y',
];

function mutatedFormula(r: Rng): FuzzInput {
  const base = r.bool(0.35) ? r.pick(HOSTILE) : grammarInput(r, 3).text;
  const text = mutate(base, r, 5);
  const opts: Record<string, unknown> = {};
  if (r.bool(0.5)) opts.language = r.pick(LANGUAGES);
  return { text, opts };
}

let seedFiles: { text: string; languageId: string; fileName: string }[] | null = null;

const ROOT = path.resolve(__dirname, '..');

/** Seed sources: every file under test/fixtures and demo (read once). */
export function loadSeedFiles(): { text: string; languageId: string; fileName: string }[] {
  if (seedFiles) return seedFiles;
  const out: { text: string; languageId: string; fileName: string }[] = [];
  const byExt = new Map(SOURCE_LANGUAGES.map((l) => [l.ext.toLowerCase(), l.languageId]));
  const walk = (dir: string): void => {
    let entries: fs.Dirent[];
    try {
      entries = fs.readdirSync(dir, { withFileTypes: true });
    } catch {
      return;
    }
    for (const e of entries) {
      const p = path.join(dir, e.name);
      if (e.isDirectory()) { if (e.name !== 'node_modules' && !e.name.startsWith('.')) walk(p); continue; }
      const ext = path.extname(e.name).slice(1).toLowerCase();
      let text: string;
      try {
        const st = fs.statSync(p);
        if (st.size > 300_000) continue;
        text = fs.readFileSync(p, 'utf8');
      } catch {
        continue;
      }
      out.push({ text, languageId: byExt.get(ext) ?? 'plaintext', fileName: path.relative(ROOT, p) });
    }
  };
  walk(path.join(ROOT, 'test', 'fixtures'));
  walk(path.join(ROOT, 'demo'));
  out.sort((a, b) => a.fileName.localeCompare(b.fileName));
  seedFiles = out;
  return out;
}

function sourceInput(r: Rng): FuzzInput {
  const seeds = loadSeedFiles();
  const donors = seeds.map((s) => s.text);
  const lang = r.pick(SOURCE_LANGUAGES);
  let text: string;
  let languageId = lang.languageId;
  let fileName = `fuzz.${lang.ext}`;
  const mode = r.weighted<string>([[3, 'generated'], [seeds.length > 0 ? 4 : 0, 'seed'], [2, 'generated-mutated']]);
  if (mode === 'seed') {
    const s = r.pick(seeds);
    text = mutateSource(s.text, r, donors.length > 0 ? donors : [s.text]);
    languageId = r.bool(0.85) ? s.languageId : r.pick(SOURCE_LANGUAGES).languageId;
    fileName = s.fileName;
  } else {
    text = genSource(r, lang, r.int(1, 6));
    if (mode === 'generated-mutated') text = mutateSource(text, r, donors.length > 0 ? donors : [text]);
  }
  const opts: Record<string, unknown> = { fileName };
  if (r.bool(0.9)) opts.languageId = languageId;
  return { text, opts };
}

// ─── runners ───────────────────────────────────────────────────────────────────────────────────

function guard(input: FuzzInput, body: () => string | undefined): Verdict {
  try {
    const mismatch = body();
    return mismatch === undefined ? { kind: 'ok' } : { kind: 'ok', mismatch };
  } catch (e) {
    return checkError(e, input);
  }
}

function parseOpts(input: FuzzInput): { variable?: string; language?: Language; params?: Record<string, number> } {
  const o: { variable?: string; language?: Language; params?: Record<string, number> } = {};
  if (isStr(input.opts.variable)) o.variable = input.opts.variable;
  if (isStr(input.opts.language)) o.language = input.opts.language as Language;
  if (input.opts.params && typeof input.opts.params === 'object') o.params = input.opts.params as Record<string, number>;
  return o;
}

function checkSpan(span: { start: number; end: number } | undefined, len: number, what: string): void {
  need(span && Number.isInteger(span.start) && Number.isInteger(span.end), `${what}: span missing`);
  need(span!.start >= 0 && span!.start <= span!.end && span!.end <= len, `${what}: span ${span!.start}–${span!.end} outside the text (length ${len})`);
}

const INTERNAL = /TypeError|ReferenceError|Cannot read propert|is not a function|is not iterable|Maximum call stack|undefined is|of undefined|of null/;

function checkInspect(res: InspectResult, input: FuzzInput): string | undefined {
  need(isStr(res.expression) && isStr(res.derivative) && isStr(res.secondDerivative), 'inspect: expression or derivatives missing');
  stockReadable(res.derivative, 'derivative');
  stockReadable(res.secondDerivative, 'secondDerivative');
  need(isStr(res.derivativeDisplay), 'inspect: derivativeDisplay missing');
  const json = JSON.stringify(res);
  need(isStr(json), 'inspect result is not JSON-serialisable');
  for (const s of res.skipped ?? []) need(!INTERNAL.test(s.reason), `analysis part ${s.part} hid an internal error: ${s.reason}`);
  for (const s of res.saturation ?? []) {
    need(isNumOrNull(s.from) && isNumOrNull(s.to), 'saturation interval ends are not numbers or null');
    need(s.from === null || s.to === null || s.from <= s.to, `saturation interval reversed: ${s.from}..${s.to}`);
    need(s.kind === 'saturating' || s.kind === 'dead', `saturation kind unknown: ${String(s.kind)}`);
  }
  for (const k of res.kinks ?? []) need(isNum(k) && Number.isFinite(k), 'kink is not a finite number');
  if (res.floatLimits) {
    for (const [t, fl] of Object.entries(res.floatLimits)) {
      need((FLOAT_TYPES as readonly string[]).includes(t), `floatLimits has unknown type ${t}`);
      for (const b of fl?.breakdown ?? []) {
        need(isNumOrNull(b.from) && isNumOrNull(b.to), 'breakdown ends are not numbers or null');
        need(b.from === null || b.to === null || b.from <= b.to, `breakdown interval reversed: ${b.from}..${b.to}`);
        need(['overflow', 'nan', 'zero', 'inaccurate'].includes(b.kind), `breakdown kind unknown: ${String(b.kind)}`);
      }
    }
  }
  if (res.lipschitz !== undefined) need(res.lipschitz === null || (isNum(res.lipschitz) && res.lipschitz >= 0), 'lipschitz is negative or not a number');
  // The hover card the editor shows for this result: text for people, never a leaked JS value.
  const card = buildHoverCard(res as unknown as HoverInput, { floatTypes: FLOAT_TYPES });
  need(isStr(card) && card.length > 0, 'hover card is empty');
  need(!/\bundefined\b|\[object Object\]/.test(card), `hover card shows a JavaScript value: ${card.match(/.{0,40}(\bundefined\b|\[object Object\]).{0,40}/)?.[0] ?? ''}`);
  // Oracle: f′ in terms of the output agrees with f′ at y = f(x).
  if (typeof res.derivativeInOutput === 'string' && res.unbound.length === 0) {
    const params = { ...res.parameters };
    const f = compileScalar(math.parse(res.expression), res.variable, params);
    const df = compileScalar(math.parse(res.derivative), res.variable, params);
    const dy = compileScalar(math.parse(res.derivativeInOutput), 'y', params);
    for (const x of ORACLE_POINTS) {
      const y = f(x);
      const want = df(x);
      if (!Number.isFinite(y) || !Number.isFinite(want)) continue;
      const l = df(x - 1e-6);
      const rr = df(x + 1e-6);
      if (!close(l, rr, 1e-3, 1e-9)) continue;
      const got = dy(y);
      if (!close(got, want, 1e-6, 1e-9)) return `derivativeInOutput ${res.derivativeInOutput} at x = ${x} (y = ${y}): ${got}, f′ = ${want}`;
    }
  }
  void input;
  return undefined;
}


/** Inputs of a stage: a grammar formula (depth 1…maxDepth) with probability pGrammar, else a mutated one. */
function grammarOrMutated(stage: string, pGrammar: number, maxDepth: number): (seed: number, i: number) => FuzzInput {
  return (seed, i) => {
    const r = Rng.for(seed, stage, i);
    return r.bool(pGrammar) ? grammarInput(r, r.int(1, maxDepth)) : mutatedFormula(r);
  };
}

export const STAGES: readonly Stage[] = [
  {
    name: 'notation',
    budgetMs: 250,
    weight: 0.42,
    generate: grammarOrMutated('notation', 0.7, 5),
    run: (input) => guard(input, () => {
      const o = parseOpts(input);
      const res = toCanonicalText(input.text, o.language);
      need(isStr(res.text), 'notation: text is not a string');
      need(Array.isArray(res.map) && res.map.length >= res.text.length, `notation: map has ${res.map?.length} entries for ${res.text.length} characters`);
      for (const m of res.map) need(Number.isInteger(m) && m >= 0 && m <= input.text.length, `notation: map entry ${m} outside the input`);
      need(LANGUAGE_SET.has(res.language), `notation: language unknown ${String(res.language)}`);
      need(Array.isArray(res.names) && Array.isArray(res.notes) && Array.isArray(res.prefixes), 'notation: lists missing');
      for (const n of res.names) need(isStr(n.name) && Number.isInteger(n.at) && n.at >= 0 && n.at <= input.text.length, `notation: name position ${n.at} outside the input`);
      return undefined;
    }),
  },
  {
    name: 'parse',
    budgetMs: 500,
    weight: 0.3,
    generate: (seed, i) => grammarInput(Rng.for(seed, 'parse', i), Rng.for(seed, 'parse-depth', i).int(1, 6)),
    run: (input) => guard(input, () => {
      const f = parseFormula(input.text, parseOpts(input));
      checkFormula(f, input);
      return translationOracle(f, input);
    }),
  },
  {
    name: 'parse-mutated',
    budgetMs: 500,
    weight: 0.2,
    generate: (seed, i) => mutatedFormula(Rng.for(seed, 'parse-mutated', i)),
    run: (input) => guard(input, () => {
      checkFormula(parseFormula(input.text, parseOpts(input)), input);
      return undefined;
    }),
  },
  {
    name: 'derive',
    // Two budgeted simplifications plus differentiation, compilation and code emission.
    budgetMs: LIMITS.formulaBudgetMs,
    weight: 0.01,
    generate: grammarOrMutated('derive', 0.8, 5),
    run: (input) => guard(input, () => {
      const f = parseFormula(input.text, parseOpts(input));
      const d = derive(f);
      need(isStr(d.first) && isStr(d.second) && d.firstNode && d.secondNode, 'derive: fields missing');
      stockReadable(d.first, 'f′');
      stockReadable(d.second, 'f″');
      need(isStr(d.firstDisplay) && d.firstDisplay.length > 0 && isStr(d.secondDisplay), 'derive: display forms missing');
      for (const lang of EMIT_LANGUAGES) {
        try {
          need(isStr(emitCode(d.firstNode, lang, { params: f.parameters })), `emit ${lang}: not a string`);
        } catch (e) {
          if (!(e instanceof SlopewiseError)) throw e;
        }
      }
      if (f.unbound.length > 0) return undefined;
      const fx = compileScalar(f.node, f.variable, f.parameters);
      const d1 = compileScalar(d.firstNode, f.variable, f.parameters);
      const d2 = compileScalar(d.secondNode, f.variable, f.parameters);
      return derivativeOracle(fx, d1, 'f′') ?? derivativeOracle(d1, d2, 'f″');
    }),
  },
  {
    name: 'inspect',
    budgetMs: LIMITS.formulaBudgetMs,
    weight: 0.002,
    generate: grammarOrMutated('inspect', 0.85, 4),
    run: (input) => guard(input, () => {
      const o = parseOpts(input);
      const opts: Parameters<typeof inspect>[1] = {};
      if (o.variable !== undefined) opts.variable = o.variable;
      if (o.language !== undefined) opts.language = o.language;
      if (o.params !== undefined) opts.params = o.params;
      return checkInspect(inspect(input.text, opts), input);
    }),
  },
  {
    name: 'detect',
    budgetMs: 5_000,
    weight: 0.012,
    generate: (seed, i) => sourceInput(Rng.for(seed, 'detect', i)),
    run: (input) => guard(input, () => {
      const opts: { languageId?: string; fileName?: string } = {};
      if (isStr(input.opts.languageId)) opts.languageId = input.opts.languageId;
      if (isStr(input.opts.fileName)) opts.fileName = input.opts.fileName;
      const found = findFormulas(input.text, opts);
      need(Array.isArray(found), 'detect: not a list');
      need(found.length <= LIMITS.maxFormulasPerFile, `detect: ${found.length} formulas, over the per-file limit`);
      for (const f of found) {
        checkSpan(f.span, input.text.length, 'detect');
        need(isStr(f.text) && f.text.trim().length > 0, 'detect: empty formula text');
        need(['activation', 'loss', 'derivative'].includes(f.role), `detect: role ${String(f.role)}`);
        need(f.origin === 'comment' || f.origin === 'code', `detect: origin ${String(f.origin)}`);
        need(LANGUAGE_SET.has(f.language), `detect: language ${String(f.language)}`);
      }
      return undefined;
    }),
  },
  {
    name: 'check',
    budgetMs: LIMITS.fileBudgetMs,
    weight: 0.004,
    generate: (seed, i) => sourceInput(Rng.for(seed, 'check', i)),
    run: (input) => guard(input, () => {
      const opts: { languageId?: string; fileName?: string } = {};
      if (isStr(input.opts.languageId)) opts.languageId = input.opts.languageId;
      if (isStr(input.opts.fileName)) opts.fileName = input.opts.fileName;
      const findings = checkText(input.text, opts);
      need(Array.isArray(findings), 'check: not a list');
      for (const f of findings) {
        need((RULES as readonly string[]).includes(f.rule), `check: rule ${String(f.rule)}`);
        need(['error', 'warning', 'info'].includes(f.severity), `check: severity ${String(f.severity)}`);
        need(isStr(f.message) && f.message.length > 0, 'check: empty message');
        checkSpan(f.span, input.text.length, 'check finding');
        if (f.related) checkSpan(f.related.span, input.text.length, 'check related');
        if (f.fix) {
          checkSpan(f.fix.span, input.text.length, 'check fix');
          need(isStr(f.fix.text), 'check fix text');
        }
        if (f.expected !== undefined) need(isStr(f.expected), 'check expected');
      }
      return undefined;
    }),
  },
];

export function stageByName(name: string): Stage | undefined {
  return STAGES.find((s) => s.name === name);
}

/** Corpus files: first line the options as JSON, the rest the input verbatim. */
export function encodeCorpus(input: FuzzInput): string {
  return `${JSON.stringify(input.opts)}\n${input.text}`;
}

export function decodeCorpus(content: string): FuzzInput {
  const nl = content.indexOf('\n');
  const head = nl < 0 ? content : content.slice(0, nl);
  return { opts: JSON.parse(head) as Record<string, unknown>, text: nl < 0 ? '' : content.slice(nl + 1) };
}

export const CORPUS_DIR = path.join(ROOT, 'fuzz', 'corpus');
