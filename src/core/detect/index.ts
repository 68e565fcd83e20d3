/**
 * Detection: text of a source file → the formulas in it (comments, docstrings and code).
 *
 * Pipeline: 1. language family (languages.ts) → 2. one linear lexer pass (lexer.ts) → 3. comment
 * formulas (comments.ts) → 4. functions and their computing expressions (code.ts + stmt.ts) →
 * 5. each candidate is read by the engine (`parseFormula`); what the engine cannot read is dropped.
 * Limits (file size, line length, formulas per file, time per file) are checked on the way and what
 * was skipped is reported in `skipped`.
 */
import { LIMITS, type Limits } from '../limits';
import type { FormulaRole, FoundFormula, Language, Span } from '../types';
import { parseFormula } from '../expr/parse';
import { languageInfo, type LanguageInfo } from './languages';
import { lex, relex, type Lexed, type Token } from './lexer';
import { scanComments, type CommentFormula, type CommentScan } from './comments';
import { parseNumber, readCode, type CodeModel, type FunctionDef } from './code';
import { reduce, type RenderContext } from './stmt';
import { keyOf, Lru, paramsKey } from '../cache';
import { LOSS_WORDS, OUTPUT_NAMES, UPSTREAM_NAMES } from './words';

export { languageInfo } from './languages';

export interface DetectOptions {
  languageId?: string;
  fileName?: string;
  limits?: Partial<Limits>;
  /** What earlier scans (of this document, usually) found, to reuse for unchanged functions and comments. */
  memo?: DetectMemo;
}

/** A code formula without where it sits: what a function's content alone determines. */
type PlacelessFormula = Omit<CodeFormula, 'fn' | 'span' | 'line' | 'endLine'>;

/**
 * Detection results of one function or one comment block, keyed by everything they are computed
 * from with positions made relative to the function or block (so an edit elsewhere in the file,
 * which shifts offsets and lines, still hits), and rebased onto the current positions on a hit.
 * Bounded (LRU); a miss only costs the time of reading the function or block again.
 */
export class DetectMemo {
  readonly functions = new Lru<{ f?: PlacelessFormula }>(1000);
  readonly comments = new Lru<CommentScan>(1000);
  /** Whether the engine reads a candidate (`readable`), by text, notation, variable and bindings. */
  readonly readable = new Lru<boolean>(1000);
  /** The last text lexed, and how: the next scan lexes only what changed (lexer.ts `relex`). */
  last?: { text: string; family: LanguageInfo['family']; language: LanguageInfo['language']; fixedForm: LanguageInfo['fixedForm']; maxLineLength: number; lexed: Lexed };
  clear(): void {
    this.functions.clear();
    this.comments.clear();
    this.readable.clear();
    delete this.last;
  }
}

export interface CodeFormula {
  fn: FunctionDef;
  /** `Class.method` or the function name. */
  qualifiedName: string;
  text: string;
  span: Span;
  role: FormulaRole;
  variable?: string;
  argument?: 'input' | 'output';
  /** Parameter values from defaults and file constants. */
  params: Record<string, number>;
  /** Parameters treated as an upstream gradient (bound to 1 when comparing). */
  upstream: string[];
  /** Other elements of a returned tuple (`return y, cache`). */
  tuple?: string[];
  line: number;
  endLine: number;
}

export interface SourceModel {
  info: LanguageInfo;
  lexed: Lexed;
  comments: CommentScan;
  code: CodeModel;
  codeFormulas: CodeFormula[];
  commentFormulas: CommentFormula[];
  constants: Record<string, number>;
  /** Things not looked at, with the reason. */
  skipped: string[];
}

const DERIV_SUFFIXES = ['_grad', '_prime', '_backward', '_deriv', '_derivative', '_bwd', '_vjp', '_jvp', '_diff', 'Grad', 'Prime', 'Backward', 'Deriv', 'Derivative', '_gradient', 'Gradient', '_der', '_d', 'prime', 'grad', 'deriv'];
const DERIV_PREFIXES = ['d_', 'grad_', 'deriv_', 'derivative_', 'dd', 'd', 'grad', 'Grad', 'D'];
const KERNEL_SUFFIXES = ['_kernel', 'Kernel', '_kern', '_impl', '_fn', '_f', '_scalar', '_elem', '_op'];

/** Strip a derivative marker from a name: `sigmoid_prime` → `sigmoid`, `dtanh` → `tanh`. */
export function derivativeBase(name: string): string | undefined {
  let n = name;
  for (const s of KERNEL_SUFFIXES) if (n.endsWith(s) && n.length > s.length + 1) { n = n.slice(0, -s.length); break; }
  for (const s of DERIV_SUFFIXES) {
    if (n.endsWith(s) && n.length > s.length + 1) return trimSep(n.slice(0, -s.length));
  }
  for (const infix of ['_grad_', '_prime_', '_deriv_', '_backward_', '_derivative_']) {
    const at = n.indexOf(infix);
    if (at > 0) return trimSep(n.slice(0, at));
  }
  for (const p of DERIV_PREFIXES) {
    if (n.startsWith(p) && n.length > p.length + 2) {
      const rest = n.slice(p.length);
      if (p === 'd' || p === 'dd' || p === 'D' || p === 'grad' || p === 'Grad') {
        // dsigmoid, dTanh, gradRelu — the rest must look like a name of its own
        if (!/^[a-zA-Z_]/.test(rest)) continue;
        if (p === 'd' && /^(e|i|o|u|r|a)/.test(rest) && !/^(elu|relu|erf)/i.test(rest)) continue; // "delta", "dist", "dot"…
      }
      return trimSep(rest.charAt(0).toLowerCase() === rest.charAt(0) ? rest : rest.charAt(0).toLowerCase() + rest.slice(1));
    }
  }
  return undefined;
}

function trimSep(s: string): string {
  return s.replace(/^_+|_+$/g, '');
}

export function stripKernelSuffix(name: string): string {
  for (const s of KERNEL_SUFFIXES) if (name.endsWith(s) && name.length > s.length + 1) return name.slice(0, -s.length);
  return name;
}

export function isLossName(name: string): boolean {
  const l = name.toLowerCase();
  return LOSS_WORDS.some((w) => l === w || l.startsWith(w + '_') || l.endsWith('_' + w) || l.includes(w + '_loss') || (w.length >= 3 && l.includes(w)));
}

const SKIP_PARAMS = new Set(['self', 'ctx', 'cls', 'this', '_']);
const INDEX_VARS = ['i', 'j', 'k', 'idx', 'index', 'tid', 'gid', 'n', 'ii', 'jj', 'ix', 'iy', 'pos', 'e', 'el'];

export function analyzeSource(text: string, opts: DetectOptions = {}): SourceModel {
  const limits = { ...LIMITS, ...opts.limits };
  const info = languageInfo(opts.languageId, opts.fileName);
  const skipped: string[] = [];
  const started = Date.now();
  if (text.length > limits.maxFileBytes) {
    skipped.push(`file is larger than ${limits.maxFileBytes} characters: not scanned`);
    const empty: Lexed = { tokens: [], comments: [], lineStarts: [0], longLines: [], clean: new Uint8Array([1]) };
    return { info, lexed: empty, comments: { formulas: [], rejected: [], groups: [] }, code: { functions: [], constants: [], topTokens: [] }, codeFormulas: [], commentFormulas: [], constants: {}, skipped };
  }
  // with a memo, the last file lexed in the same language and limit is the starting point (relex)
  const last = opts.memo?.last;
  const lexed = last && last.family === info.family && last.language === info.language && last.fixedForm === info.fixedForm && last.maxLineLength === limits.maxLineLength
    ? relex(last.text, last.lexed, text, info, limits.maxLineLength)
    : lex(text, info, limits.maxLineLength);
  if (opts.memo) opts.memo.last = { text, family: info.family, language: info.language, fixedForm: info.fixedForm, maxLineLength: limits.maxLineLength, lexed };
  if (lexed.longLines.length > 0) skipped.push(`${lexed.longLines.length} line(s) longer than ${limits.maxLineLength} characters skipped (first: line ${lexed.longLines[0]! + 1})`);
  const comments = scanComments(lexed.comments, opts.memo?.comments);
  const code = readCode(lexed.tokens, info);
  const constants: Record<string, number> = {};
  for (const c of code.constants) if (!(c.name in constants)) constants[c.name] = c.value;

  const byName = new Map<string, FunctionDef>();
  for (const f of code.functions) if (!byName.has(f.name)) byName.set(f.name, f);
  const plain = new Map<string, { text: string; params: string[] }>();
  const codeFormulas: CodeFormula[] = [];
  // Two passes: first without inlining (to know each function's own expression), then inlining
  // calls to same-file functions (depth ≤ 2 through the first pass's texts).
  // A function that names no other function of the file (no id token between its start and end
  // equal to another function's name: `inlinable`) cannot inline anything: the second pass's inliner would return
  // nothing for every call (stmt.ts only inlines when ctx.inline gives a text), so its first-pass
  // result is its second-pass result and is reused instead of read again.
  const firstPass = new Map<FunctionDef, CodeFormula | undefined>();
  /** The other functions of the file that `fn` names (those the second pass may inline). */
  const inlinable = (fn: FunctionDef): string[] => {
    const toks = lexed.tokens;
    let lo = 0;
    let hi = toks.length;
    while (lo < hi) { const mid = (lo + hi) >> 1; if (toks[mid]!.start < fn.start) lo = mid + 1; else hi = mid; }
    const names = new Set<string>();
    for (let i = lo; i < toks.length && toks[i]!.start < fn.end; i++) {
      const t = toks[i]!;
      if (t.kind === 'id' && t.text !== fn.name && plain.has(t.text)) names.add(t.text);
    }
    return [...names];
  };
  for (const pass of [0, 1]) {
    for (const fn of code.functions) {
      if (Date.now() - started > limits.fileBudgetMs) {
        skipped.push(`time budget of ${limits.fileBudgetMs} ms per file ran out: later functions not read`);
        break;
      }
      const names = pass === 1 ? inlinable(fn) : [];
      if (pass === 1 && firstPass.has(fn) && names.length === 0) {
        const again = firstPass.get(fn);
        if (again) codeFormulas.push(again);
        continue;
      }
      const cf = opts.memo ? memoFunctionFormula(opts.memo, fn, info, pass === 1 ? plain : undefined, names, constants, text) : functionFormula(fn, info, pass === 1 ? plain : undefined, constants);
      if (pass === 0) {
        firstPass.set(fn, cf);
        if (cf) plain.set(fn.name, { text: cf.text, params: fn.params.filter((p) => !SKIP_PARAMS.has(p.name)).map((p) => p.name) });
        continue;
      }
      if (cf) codeFormulas.push(cf);
    }
  }
  linkSavedValues(codeFormulas);
  return { info, lexed, comments, code, codeFormulas, commentFormulas: comments.formulas, constants, skipped };
}

/**
 * `functionFormula` through the memo. The key is the function's source text from its header to its
 * end (every token of its definition lies there: offsets, lines and columns relative to the header
 * follow from it), the header's column, the fields readCode fills from outside that text (class,
 * decorators, flags), the language, the file constants its defaults name and, when inlining, the
 * first-pass texts of the other functions it names (`inlinable`: its id tokens that name one; the
 * inliner looks up no other name).
 */
function memoFunctionFormula(
  memo: DetectMemo, fn: FunctionDef, info: LanguageInfo, inlineTable: Map<string, { text: string; params: string[] }> | undefined,
  inlinable: readonly string[], constants: Record<string, number>, text: string,
): CodeFormula | undefined {
  const body = text.slice(fn.start, fn.end);
  const col = fn.start - (text.lastIndexOf('\n', fn.start - 1) + 1);
  const parts: (string | number | boolean | undefined)[] = [info.family, info.language, info.fixedForm, fn.name, fn.className, fn.elementwise, fn.resultVar, fn.decorators.join('\n'), col, body];
  for (const p of fn.params) {
    const only = p.default?.length === 1 ? p.default[0]! : undefined;
    if (only?.kind === 'id' && only.text in constants) parts.push(p.name, constants[only.text]);
  }
  if (inlineTable) {
    for (const name of inlinable) {
      const callee = inlineTable.get(name)!;
      parts.push(name, callee.text, callee.params.join(','));
    }
  }
  const key = keyOf(inlineTable ? 'inline' : 'plain', ...parts);
  let hit = memo.functions.get(key);
  if (!hit) {
    const cf = functionFormula(fn, info, inlineTable, constants);
    if (cf) {
      const { fn: _fn, span: _span, line: _line, endLine: _endLine, ...rest } = cf;
      hit = { f: rest };
    } else hit = {};
    memo.functions.set(key, hit);
  }
  if (!hit.f) return undefined;
  // a fresh object: linkSavedValues sets role, variable and argument on the file's formulas
  const f = hit.f;
  const out: CodeFormula = { ...f, params: { ...f.params }, upstream: [...f.upstream], fn, span: { start: fn.start, end: fn.end }, line: fn.line, endLine: fn.endLine };
  if (f.tuple) out.tuple = [...f.tuple];
  return out;
}

function functionFormula(
  fn: FunctionDef, info: LanguageInfo, inlineTable: Map<string, { text: string; params: string[] }> | undefined,
  _constants: Record<string, number>,
): CodeFormula | undefined {
  const params = fn.params.filter((p) => !SKIP_PARAMS.has(p.name));
  const indexNames = new Set(INDEX_VARS);
  collectLoopVars(fn.body, indexNames);
  const env = new Map<string, string>();
  const ctx: RenderContext = {
    elementwise: fn.elementwise || fn.body.some((s) => s.k === 'loop'),
    indexNames,
    dialect: { family: info.family === 'c' ? (info.language === 'rust' ? 'rust' : 'c') : info.family, lastExpressionValue: ['julia', 'r'].includes(info.family) || info.language === 'rust' || info.language === 'kotlin' },
  };
  if (info.family === 'matlab' || info.family === 'fortran') for (const p of params) env.set(`@array:${p.name}`, '');
  // index variables computed from thread ids (CUDA): int i = blockIdx.x * blockDim.x + threadIdx.x
  for (const s of fn.body) {
    if (s.k === 'assign' && s.expr.some((t) => t.text === 'threadIdx' || t.text === 'blockIdx' || t.text === 'get_global_id')) indexNames.add(s.target);
  }
  if (inlineTable) {
    let depth = 0;
    ctx.inline = (name, args) => {
      if (name === fn.name || depth > 2) return undefined;
      const callee = inlineTable.get(name);
      if (!callee) return undefined;
      depth++;
      let t = callee.text;
      callee.params.forEach((p, i) => {
        if (args[i] !== undefined && args[i] !== '') t = replaceSymbol(t, p, `(${args[i]})`);
      });
      depth--;
      return t;
    };
  }
  const body = fn.body.filter((s) => !(s.k === 'expr' && s.expr.length > 0 && s.expr[0]!.kind === 'str'));
  const r = reduce(body, env, { ctx, ...(fn.resultVar ? { resultVar: fn.resultVar } : {}) });
  if (r.value === undefined || r.value.length === 0) return undefined;
  let text = r.value;
  if (text.length > 2000) return undefined;
  // a tuple return: (value, residual) in JAX fwd, (grad,) in bwd
  const qualifiedName = fn.className ? `${fn.className}.${fn.name}` : fn.name;
  const lowerName = fn.name.toLowerCase();
  const upstream = params.filter((p) => UPSTREAM_NAMES.has(p.name) || UPSTREAM_NAMES.has(p.name.toLowerCase())).map((p) => p.name);
  let role: FormulaRole = 'activation';
  const isBackwardMethod = ['backward', 'bprop', 'backprop', 'grad', 'gradient', 'derivative', 'deriv', 'vjp', 'jvp', 'backward_pass', 'df', 'prime'].includes(lowerName);
  if (isBackwardMethod || derivativeBase(fn.name) !== undefined && !isForwardish(fn.name)) role = 'derivative';
  else if (isLossName(fn.name) || (fn.className !== undefined && isLossName(fn.className) && ['forward', '__call__', 'call', 'apply', 'eval', 'value', 'f'].includes(lowerName))) role = 'loss';
  if (role === 'derivative' && upstream.length === 0 && params.length >= 2 && (isBackwardMethod || /backward|bwd|vjp/i.test(fn.name))) {
    // backward(grad, x): the first parameter is the upstream gradient
    const g = params[0]!;
    if (!UPSTREAM_NAMES.has(g.name)) upstream.push(g.name);
  }
  // the variable: first parameter that is not an upstream gradient and appears in the text
  let variable = params.find((p) => !upstream.includes(p.name) && hasSymbol(text, p.name))?.name;
  let argument: 'input' | 'output' | undefined;
  if (role === 'derivative') {
    if (variable === undefined) {
      // backward methods that read a saved self.out / ctx value
      const m = /\b(self|ctx|this)_([A-Za-z_]\w*)/.exec(text);
      if (m) variable = m[0];
    }
    if (variable && OUTPUT_NAMES.has(variable)) argument = 'output';
    if (/(from|of|wrt|in)_?(the_)?(output|out|activation|y)$/i.test(fn.name) || /FromOutput$/.test(fn.name)) argument = 'output';
  }
  if (variable === undefined) {
    // ctx.saved_tensors targets become plain symbols
    const multi = fn.body.find((s) => s.k === 'multi' || (s.k === 'assign' && s.expr.some((t) => t.text === 'saved_tensors')));
    if (multi && multi.k === 'multi') variable = multi.targets.find((t) => hasSymbol(text, t));
    else if (multi && multi.k === 'assign') variable = multi.target;
  }
  if (variable === undefined) return undefined;
  // parameter defaults
  const bound: Record<string, number> = {};
  for (const p of params) {
    if (p.name === variable || !p.default) continue;
    const only = p.default.length === 1 ? p.default[0]! : undefined;
    // a default that names a file constant (`slope=NEG_SLOPE`) takes the constant's value
    const v = only && only.kind === 'id' && only.text in _constants ? _constants[only.text]
      : only ? parseNumber(only.text) : p.default.length === 2 && p.default[0]!.text === '-' ? -(parseNumber(p.default[1]!.text) ?? NaN) : undefined;
    if (v !== undefined && Number.isFinite(v)) bound[p.name] = v;
  }
  // numeric literal defaults with casts (T(0.01)) are handled by the renderer; ignore others
  text = text.replace(/\s+/g, ' ').trim();
  const out: CodeFormula = {
    fn, qualifiedName, text, span: { start: fn.start, end: fn.end }, role, variable, params: bound, upstream,
    line: fn.line, endLine: fn.endLine,
  };
  if (argument) out.argument = argument;
  if (r.tuple) out.tuple = r.tuple;
  return out;
}

function isForwardish(name: string): boolean {
  return /(^|_)(fwd|forward)$/i.test(name) || /Forward$/.test(name);
}

function collectLoopVars(stmts: FunctionDef['body'], into: Set<string>): void {
  for (const s of stmts) {
    if (s.k === 'loop') {
      for (const v of s.vars) into.add(v);
      collectLoopVars(s.body, into);
    } else if (s.k === 'if') for (const b of s.branches) collectLoopVars(b.body, into);
  }
}

/** Replace a whole-word symbol (not an attribute, not a call) in rendered text. Linear scan. */
export function replaceSymbol(text: string, name: string, by: string): string {
  let out = '';
  let k = 0;
  while (k < text.length) {
    const c = text[k]!;
    if (/[A-Za-z_\u0370-\u03ff]/.test(c)) {
      let e = k + 1;
      while (e < text.length && /[A-Za-z0-9_\u0370-\u03ff]/.test(text[e]!)) e++;
      const w = text.slice(k, e);
      if (w === name && text[k - 1] !== '.') out += by;
      else out += w;
      k = e;
      continue;
    }
    out += c;
    k++;
  }
  return out;
}

export function hasSymbol(text: string, name: string): boolean {
  return replaceSymbol(text, name, '\u0000') !== text;
}

/**
 * Which value a backward reads: `self.out = …` / `ctx.save_for_backward(out)` saved in the forward
 * make the backward's variable the output; saving the input makes it the input.
 */
function linkSavedValues(formulas: CodeFormula[]): void {
  const byClass = new Map<string, CodeFormula[]>();
  for (const f of formulas) {
    if (!f.fn.className) continue;
    const list = byClass.get(f.fn.className) ?? [];
    list.push(f);
    byClass.set(f.fn.className, list);
  }
  for (const [, list] of byClass) {
    const fwd = list.find((f) => ['forward', '__call__', 'call', 'apply', 'fprop', 'f'].includes(f.fn.name.toLowerCase()));
    const bwd = list.find((f) => f.role === 'derivative');
    if (!fwd || !bwd) continue;
    if (fwd.role === 'derivative') fwd.role = 'activation';
    // Of the attributes the backward reads (self.x, self.beta…), its variable is the one the forward
    // stored from its input or output; the others are parameters set elsewhere (__init__).
    const prefix = /^(self|ctx|this)_/.exec(bwd.variable ?? '')?.[1];
    if (prefix) {
      const attrs = [...bwd.text.matchAll(/\b(?:self|ctx|this)_([A-Za-z_]\w*)/g)].map((m) => m[1]!);
      const saved = attrs.find((a) => storedValue(fwd.fn.bodyTokens, a) !== undefined);
      if (saved) bwd.variable = `${prefix}_${saved}`;
    }
    const v = bwd.variable ?? '';
    const savedAttr = /^(self|ctx|this)_(.+)$/.exec(v)?.[2];
    const fwdParams = fwd.fn.params.filter((p) => !SKIP_PARAMS.has(p.name)).map((p) => p.name);
    const toks = fwd.fn.bodyTokens;
    if (savedAttr) {
      // what did the forward store there?
      const stored = storedValue(toks, savedAttr);
      if (stored !== undefined) bwd.argument = fwdParams.includes(stored) ? 'input' : 'output';
      continue;
    }
    // ctx.save_for_backward(a, b): position of the backward's variable among saved_tensors targets
    const saveAt = toks.findIndex((t, i) => t.text === 'save_for_backward' && toks[i + 1]?.text === '(');
    if (saveAt >= 0) {
      const saved: string[] = [];
      for (let i = saveAt + 2; i < toks.length && toks[i]!.text !== ')'; i++) if (toks[i]!.kind === 'id') saved.push(toks[i]!.text);
      const multi = bwd.fn.body.find((s) => s.k === 'multi');
      const targets = multi && multi.k === 'multi' ? multi.targets : bwd.variable ? [bwd.variable] : [];
      const pos = targets.indexOf(bwd.variable ?? '');
      const savedName = saved[pos >= 0 ? pos : 0];
      if (savedName) bwd.argument = fwdParams.includes(savedName) ? 'input' : 'output';
    }
  }
}

function storedValue(toks: Token[], attr: string): string | undefined {
  for (let i = 0; i + 4 < toks.length; i++) {
    if ((toks[i]!.text === 'self' || toks[i]!.text === 'ctx' || toks[i]!.text === 'this') && toks[i + 1]!.text === '.' && toks[i + 2]!.text === attr && toks[i + 3]!.text === '=') {
      const v = toks[i + 4]!;
      const after = toks[i + 5];
      if (v.kind === 'id' && (!after || after.kind === 'nl' || after.line !== v.line || after.text === ';')) return v.text;
      return '<expr>';
    }
  }
  return undefined;
}

/**
 * Engine check of a candidate: does it read as a formula in `variable`? With a memo the answer is
 * kept, except a refusal caused by a time budget (not a property of the text).
 */
export function readable(text: string, language: Language, variable: string | undefined, params: Record<string, number>, memo?: DetectMemo): boolean {
  const key = memo ? keyOf(text, language, variable, paramsKey(params)) : undefined;
  const hit = key !== undefined ? memo!.readable.get(key) : undefined;
  if (hit !== undefined) return hit;
  let ok: boolean;
  try {
    ok = parseFormula(text, { language, ...(variable ? { variable } : {}), params }).node !== undefined;
  } catch (e) {
    if (key !== undefined && /budget|time/i.test(e instanceof Error ? e.message : String(e))) return false;
    ok = false;
  }
  if (key !== undefined) memo!.readable.set(key, ok);
  return ok;
}

/** Formulas in a source file, in order of position. */
export function findFormulas(text: string, opts: DetectOptions = {}): FoundFormula[] {
  return scanText(text, opts).formulas;
}

/** `findFormulas` plus what was skipped (limits, budgets), for adapters that report it. */
export function scanText(text: string, opts: DetectOptions = {}): { formulas: FoundFormula[]; skipped: string[] } {
  const limits = { ...LIMITS, ...opts.limits };
  const m = analyzeSource(text, opts);
  const skipped = [...m.skipped];
  const out: FoundFormula[] = [];
  // Each list is in position order, so reading at most maxFormulasPerFile of each keeps the same first
  // maxFormulasPerFile overall; the time budget bounds the engine reads (one parse per candidate).
  const started = Date.now();
  const enough = (read: number): boolean => read >= limits.maxFormulasPerFile || Date.now() - started > limits.fileBudgetMs;
  for (const c of m.commentFormulas) {
    if (enough(out.length)) break;
    const language: Language = c.text.includes('\\') ? 'latex' : 'plain';
    if (!readable(c.text, language, c.variable, {}, opts.memo)) continue;
    const f: FoundFormula = { span: c.span, text: c.text, language, origin: 'comment', role: c.role };
    if (c.name) f.name = c.name;
    if (c.variable) f.variable = c.variable;
    if (c.argument) f.argument = c.argument;
    if (c.forwardName) f.forwardName = c.forwardName;
    out.push(f);
  }
  const commentCount = out.length;
  for (const c of m.codeFormulas) {
    if (enough(out.length - commentCount)) break;
    const params = { ...m.constants, ...c.params };
    for (const u of c.upstream) params[u] = 1;
    if (!readable(c.text, m.info.language, c.variable, params, opts.memo)) continue;
    const f: FoundFormula = { span: c.span, text: c.text, language: m.info.language, origin: 'code', role: c.role, name: c.qualifiedName };
    if (c.variable) f.variable = c.variable;
    if (c.argument) f.argument = c.argument;
    const p = usedParams(c.text, params);
    if (Object.keys(p).length > 0) f.params = p;
    out.push(f);
  }
  if (Date.now() - started > limits.fileBudgetMs) skipped.push(`time budget of ${limits.fileBudgetMs} ms per file ran out: later candidates not read`);
  out.sort((a, b) => a.span.start - b.span.start);
  if (out.length > limits.maxFormulasPerFile) {
    skipped.push(`more than ${limits.maxFormulasPerFile} formulas: the rest are not reported`);
  }
  return { formulas: out.slice(0, limits.maxFormulasPerFile), skipped };
}

export function usedParams(text: string, params: Record<string, number>): Record<string, number> {
  const out: Record<string, number> = {};
  for (const [k, v] of Object.entries(params)) if (hasSymbol(text, k)) out[k] = v;
  return out;
}
