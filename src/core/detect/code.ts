/**
 * Functions in source code and the expression each one computes.
 *
 * Three heuristic readers over the lexer's tokens, one per block style:
 * - indentation (Python): `def`, `class`, `lambda`, `if/elif/else`, `for`, decorators;
 * - braces (C, C++, CUDA, Rust, Go, Java, Kotlin, JavaScript/TypeScript, R, C#, Swift…):
 *   function headers found by looking back from each `{` to a `name(…)`, plus arrow functions,
 *   lambdas, Kotlin `= expr` bodies, R `function(x) expr`;
 * - keywords ending in `end` (Julia, Lua, MATLAB/Octave, Fortran), line by line.
 * They are not full parsers: they only need to recognise function boundaries, parameters, and the
 * statements `reduce` understands; anything else in a body is skipped.
 */
import type { Token } from './lexer';
import type { LanguageInfo } from './languages';
import { matchClose, splitArgs, type Stmt } from './stmt';

export interface Param {
  name: string;
  /** Default value as written (`0.01`), when there is one. */
  default?: Token[];
}

export interface FunctionDef {
  name: string;
  className?: string;
  params: Param[];
  body: Stmt[];
  /** Tokens of the whole body (for call sites and saved-tensor lookups). */
  bodyTokens: Token[];
  /** 0-based offsets of the header start and the body end. */
  start: number;
  end: number;
  line: number;
  endLine: number;
  /** Variable holding the result when the language returns through an output variable. */
  resultVar?: string;
  /** A single-expression body (lambda, arrow, `f(x) = …`). */
  exprBody?: Token[];
  /** Decorators / annotations (Python `@jax.custom_vjp`). */
  decorators: string[];
  /** The function is a GPU kernel or returns through an array parameter. */
  elementwise: boolean;
}

export interface Constant {
  name: string;
  value: number;
  line: number;
}

export interface CodeModel {
  functions: FunctionDef[];
  constants: Constant[];
  /** Top-level statements (for module-level calls such as `f.defvjp(f_fwd, f_bwd)`). */
  topTokens: Token[];
}

const NOT_NAMES = new Set([
  'if', 'for', 'while', 'switch', 'catch', 'return', 'sizeof', 'match', 'elif', 'when', 'else', 'do', 'foreach',
  'using', 'lock', 'fixed', 'unless', 'until', 'with', 'assert', 'print', 'new', 'typeof', 'decltype', 'alignof',
  'static_assert', 'defined', 'loop',
]);

export function readCode(tokens: Token[], info: LanguageInfo): CodeModel {
  switch (info.family) {
    case 'python':
      return readPython(tokens);
    case 'julia':
    case 'lua':
    case 'matlab':
    case 'fortran':
      return readKeywordBlocks(tokens, info);
    case 'c':
    case 'r':
      return readBraces(tokens, info);
    default:
      return { functions: [], constants: [], topTokens: [] };
  }
}

// ---------------------------------------------------------------------------------------------
// Shared helpers

interface LLine {
  toks: Token[];
  indent: number;
  line: number;
}

/** Split tokens into logical lines: newlines inside brackets and after a `\` continue the line. */
function logicalLines(tokens: Token[], splitSemicolons: boolean, continuation?: string): LLine[] {
  const out: LLine[] = [];
  let cur: Token[] = [];
  let depth = 0;
  const flush = (): void => {
    if (cur.length > 0) out.push({ toks: cur, indent: cur[0]!.col, line: cur[0]!.line });
    cur = [];
  };
  for (let i = 0; i < tokens.length; i++) {
    const t = tokens[i]!;
    if (t.kind === 'nl') {
      const last = cur[cur.length - 1];
      if (depth > 0) continue;
      if (last && (last.text === '\\' || (continuation && last.text === continuation))) {
        cur.pop();
        continue;
      }
      if (continuation === '&') {
        // Fortran: a line starting with & continues the previous one
        const nx = tokens[i + 1];
        if (nx && nx.text === '&') { i++; continue; }
      }
      flush();
      continue;
    }
    if (t.text === '(' || t.text === '[' || t.text === '{') depth++;
    else if (t.text === ')' || t.text === ']' || t.text === '}') depth = Math.max(0, depth - 1);
    if (splitSemicolons && depth === 0 && t.text === ';') {
      flush();
      continue;
    }
    cur.push(t);
  }
  flush();
  return out;
}

function parseParams(toks: Token[], style: 'python' | 'c' | 'go' | 'typed' | 'plain'): Param[] {
  const out: Param[] = [];
  for (const a of splitArgs(toks)) {
    if (a.length === 0) continue;
    let eq = a.findIndex((t) => t.text === '=');
    const semi = a.findIndex((t) => t.text === ';');
    if (semi >= 0 && (eq < 0 || semi < eq)) {
      // Julia keyword args after `;` — treat the part after as another param
      const before = a.slice(0, semi);
      const after = a.slice(semi + 1);
      out.push(...parseParams(before, style));
      out.push(...parseParams(after, style));
      continue;
    }
    const head = eq >= 0 ? a.slice(0, eq) : a;
    const def = eq >= 0 ? a.slice(eq + 1) : undefined;
    let name: string | undefined;
    const colon = head.findIndex((t) => t.text === ':' || t.text === '::');
    if (colon >= 0) name = head.slice(0, colon).filter((t) => t.kind === 'id').pop()?.text;
    else if (style === 'go') name = head.find((t) => t.kind === 'id')?.text;
    else {
      const all = head.filter((t) => t.kind === 'id');
      const ids = all.length > 1 ? all.filter((t) => !['const', 'mut', 'ref', 'in', 'out', 'inout', 'let', 'var', 'val', 'restrict', '__restrict__'].includes(t.text)) : all;
      name = ids[ids.length - 1]?.text;
    }
    if (name === undefined) continue;
    if (name.startsWith('*')) name = name.slice(1);
    eq = 0;
    const p: Param = { name };
    if (def && def.length > 0) p.default = def;
    out.push(p);
  }
  return out;
}

function numberValue(toks: Token[]): number | undefined {
  let sign = 1;
  let k = 0;
  while (toks[k]?.text === '-' || toks[k]?.text === '+') {
    if (toks[k]!.text === '-') sign = -sign;
    k++;
  }
  if (k !== toks.length - 1) {
    // `T(0.01)`, `float(0.1)`, `0.1f0`
    if (toks.length - k === 4 && toks[k]!.kind === 'id' && toks[k + 1]!.text === '(' && toks[k + 3]!.text === ')') {
      const v = parseNumber(toks[k + 2]!.text);
      return v === undefined ? undefined : sign * v;
    }
    return undefined;
  }
  const t = toks[k]!;
  if (t.kind !== 'num') return undefined;
  const v = parseNumber(t.text);
  return v === undefined ? undefined : sign * v;
}

/** Numeric literal of any supported dialect → number (1.0f, 1e-3f, 1.0d0, 1.0_dp, 2.0f32, 10L, 1_000). */
export function parseNumber(text: string): number | undefined {
  let s = text.replace(/_(dp|sp|wp|real64|real32|[a-z0-9]+)$/i, '').replace(/_/g, '');
  s = s.replace(/(f32|f64|f16|i32|i64|u32|usize)$/, '');
  s = s.replace(/[dD]([-+]?\d+)$/, 'e$1');
  s = s.replace(/f0$/, '');
  if (/^\d*\.?\d*(e[-+]?\d+)?[fFlLuU]*$/i.test(s)) s = s.replace(/[fFlLuU]+$/, '');
  const v = Number(s);
  return Number.isFinite(v) && s.length > 0 ? v : undefined;
}

function assignOpIndex(toks: Token[]): number {
  let depth = 0;
  for (let k = 0; k < toks.length; k++) {
    const t = toks[k]!;
    if (t.text === '(' || t.text === '[' || t.text === '{') depth++;
    else if (t.text === ')' || t.text === ']' || t.text === '}') depth--;
    else if (depth === 0 && t.kind === 'op' && ['=', '+=', '-=', '*=', '/=', ':=', '<-', '**='].includes(t.text)) return k;
  }
  return -1;
}

/** An assignment statement from `target op expr` tokens (declarations included). */
function assignment(toks: Token[], line: number, family: string): Stmt | undefined {
  const at = assignOpIndex(toks);
  if (at <= 0) return undefined;
  const op = toks[at]!.text;
  if (op === '/=' && family === 'fortran') return undefined;
  let lhs = toks.slice(0, at);
  const expr = toks.slice(at + 1);
  // strip declaration words and types: let mut t: f32 = …, const float t = …, var t T = …, auto t = …
  const colon = lhs.findIndex((t) => t.text === ':' || t.text === '::');
  if (colon > 0 && family !== 'python') lhs = lhs.slice(0, colon);
  if (colon > 0 && family === 'python') lhs = lhs.slice(0, colon);
  // tuple targets
  const parts = splitArgs(lhs.filter((t) => t.text !== '(' || lhs[0]!.text !== '('));
  if (parts.length > 1 || (lhs.length > 1 && lhs[lhs.length - 1]!.text === ',')) {
    const targets = parts.map((p) => p.filter((t) => t.kind === 'id').pop()?.text).filter((x): x is string => !!x);
    return { k: 'multi', targets, expr, line };
  }
  // indexed target: y[i] = …, y(mask) = … (MATLAB), *out = …
  let index: Token[] | undefined;
  const last = lhs[lhs.length - 1]!;
  if (last.text === ']' || (last.text === ')' && (family === 'matlab' || family === 'fortran'))) {
    let depth = 0;
    let open = -1;
    for (let k = lhs.length - 1; k >= 0; k--) {
      const x = lhs[k]!.text;
      if (x === ']' || x === ')') depth++;
      else if (x === '[' || x === '(') {
        depth--;
        if (depth === 0) { open = k; break; }
      }
    }
    if (open <= 0) return undefined;
    index = lhs.slice(open + 1, lhs.length - 1);
    lhs = lhs.slice(0, open);
  }
  // self.out = …
  if (lhs.length >= 3 && lhs[lhs.length - 2]!.text === '.' && ['self', 'ctx', 'this'].includes(lhs[lhs.length - 3]!.text)) {
    return { k: 'assign', target: `${lhs[lhs.length - 3]!.text}.${lhs[lhs.length - 1]!.text}`, op, expr, line, ...(index ? { index } : {}) };
  }
  const id = lhs.filter((t) => t.kind === 'id').pop();
  if (!id) return undefined;
  // attribute targets other than self/ctx (obj.field = …) are not locals
  if (lhs.length >= 2 && lhs[lhs.length - 2]!.text === '.' && lhs[lhs.length - 1] === id) return { k: 'other', line };
  return { k: 'assign', target: id.text, op, expr, line, ...(index ? { index } : {}) };
}

// ---------------------------------------------------------------------------------------------
// Python

function readPython(tokens: Token[]): CodeModel {
  const lines = logicalLines(tokens, true);
  const functions: FunctionDef[] = [];
  const constants: Constant[] = [];
  const top: Token[] = [];
  let i = 0;
  const readBlock = (from: number, minIndent: number): { stmts: Stmt[]; next: number } => {
    const stmts: Stmt[] = [];
    let k = from;
    if (k >= lines.length) return { stmts, next: k };
    const indent = lines[k]!.indent;
    if (indent < minIndent) return { stmts, next: k };
    while (k < lines.length && lines[k]!.indent >= indent) {
      if (lines[k]!.indent > indent) { k++; continue; }
      const r = pyStatement(k, indent);
      if (r.stmt) stmts.push(r.stmt);
      k = r.next;
    }
    return { stmts, next: k };
  };
  // a compound header `if c:` with its body on the same line or the following indented lines
  const bodyOf = (k: number, colonAt: number, indent: number): { stmts: Stmt[]; next: number } => {
    const l = lines[k]!;
    const rest = l.toks.slice(colonAt + 1);
    if (rest.length > 0) {
      const s = pySimple(rest, l.line);
      return { stmts: s ? [s] : [], next: k + 1 };
    }
    return readBlock(k + 1, indent + 1);
  };
  const headerColon = (toks: Token[]): number => {
    let depth = 0;
    for (let q = 0; q < toks.length; q++) {
      const x = toks[q]!.text;
      if (x === '(' || x === '[' || x === '{') depth++;
      else if (x === ')' || x === ']' || x === '}') depth--;
      else if (depth === 0 && x === ':' && toks[q]!.kind === 'op') {
        // `lambda x: …` inside the header is not the block colon
        if (toks.slice(0, q).some((t) => t.text === 'lambda')) continue;
        return q;
      }
    }
    return -1;
  };
  const pyStatement = (k: number, indent: number): { stmt?: Stmt; next: number } => {
    const l = lines[k]!;
    const t0 = l.toks[0]!;
    const word = t0.kind === 'id' ? t0.text : '';
    if (word === 'if') {
      const branches: { cond: Token[] | null; body: Stmt[] }[] = [];
      let q = k;
      let kw = 'if';
      while (q < lines.length && lines[q]!.indent === indent && (kw === 'if' ? q === k : (lines[q]!.toks[0]!.text === 'elif' || lines[q]!.toks[0]!.text === 'else'))) {
        const lt = lines[q]!.toks;
        const c = headerColon(lt);
        if (c < 0) return { next: q + 1 };
        const cond = lt[0]!.text === 'else' ? null : lt.slice(1, c);
        const b = bodyOf(q, c, indent);
        branches.push({ cond, body: b.stmts });
        q = b.next;
        kw = lt[0]!.text;
        if (kw === 'else') break;
        kw = 'elif';
      }
      return { stmt: { k: 'if', branches, line: l.line }, next: q };
    }
    if (word === 'for' || word === 'while') {
      const c = headerColon(l.toks);
      const vars = word === 'for' ? l.toks.slice(1, l.toks.findIndex((t) => t.text === 'in')).filter((t) => t.kind === 'id').map((t) => t.text) : [];
      const b = bodyOf(k, c, indent);
      return { stmt: { k: 'loop', vars, body: b.stmts, line: l.line }, next: b.next };
    }
    if (word === 'with' || word === 'try' || word === 'else' || word === 'except' || word === 'finally') {
      const c = headerColon(l.toks);
      const b = bodyOf(k, c, indent);
      if (word === 'except' || word === 'finally') return { next: b.next };
      // flatten: the body's statements run in place
      return { stmt: { k: 'if', branches: [{ cond: null, body: b.stmts }], line: l.line }, next: b.next };
    }
    if (word === 'def' || word === 'class' || (t0.text === '@')) {
      const r = pyDef(k, indent, undefined);
      return { next: r };
    }
    return { stmt: pySimple(l.toks, l.line), next: k + 1 };
  };
  const pySimple = (toks: Token[], line: number): Stmt | undefined => {
    const w = toks[0]!;
    if (w.text === 'return') return { k: 'return', expr: toks.slice(1), line };
    if (w.text === 'pass' || w.text === 'raise' || w.text === 'assert' || w.text === 'print' || w.text === 'del' ||
      w.text === 'global' || w.text === 'nonlocal' || w.text === 'import' || w.text === 'from' || w.text === 'yield') return { k: 'other', line };
    const a = assignment(toks, line, 'python');
    if (a) return a;
    return { k: 'expr', expr: toks, line };
  };
  const pyDef = (k: number, indent: number, className: string | undefined): number => {
    const decorators: string[] = [];
    let q = k;
    while (q < lines.length && lines[q]!.toks[0]!.text === '@') {
      decorators.push(lines[q]!.toks.slice(1).map((t) => t.text).join(''));
      q++;
    }
    if (q >= lines.length) return q;
    const l = lines[q]!;
    const kw = l.toks[0]!.text === 'async' ? l.toks[1]?.text : l.toks[0]!.text;
    const off = l.toks[0]!.text === 'async' ? 1 : 0;
    if (kw === 'class') {
      const name = l.toks[off + 1]?.text ?? '';
      const c = headerColon(l.toks);
      // class body: methods
      let r = q + 1;
      const bodyIndent = r < lines.length ? lines[r]!.indent : indent + 1;
      if (bodyIndent <= indent) return r;
      while (r < lines.length && lines[r]!.indent >= bodyIndent) {
        if (lines[r]!.indent > bodyIndent) { r++; continue; }
        const t = lines[r]!.toks[0]!.text;
        if (t === 'def' || t === '@' || t === 'async' || t === 'class') r = pyDef(r, bodyIndent, name);
        else {
          pyLambda(lines[r]!, name);
          r++;
        }
      }
      void c;
      return r;
    }
    if (kw !== 'def') return q + 1;
    const name = l.toks[off + 1]?.text ?? '';
    const open = off + 2;
    const close = matchClose(l.toks, open);
    if (close < 0) return q + 1;
    const params = parseParams(l.toks.slice(open + 1, close), 'python');
    const c = headerColon(l.toks);
    const b = c >= 0 ? bodyOf(q, c, indent) : { stmts: [], next: q + 1 };
    // nested defs inside the body were skipped by readBlock; read them too
    const endLine = lines[b.next - 1]?.line ?? l.line;
    const last = lines[b.next - 1]!;
    const lastTok = last.toks[last.toks.length - 1]!;
    const bodyTokens = sliceByOffsets(tokens, l.toks[0]!.start, lastTok.end);
    functions.push({
      name, params, body: b.stmts, bodyTokens, start: (lines[k]!.toks[0]!).start, end: lastTok.end, line: lines[k]!.line,
      endLine, decorators, elementwise: false, ...(className ? { className } : {}),
    });
    // nested function definitions
    for (let r = q + 1; r < b.next; r++) {
      const t = lines[r]!.toks[0]!.text;
      if ((t === 'def' || t === '@') && lines[r]!.indent > indent) r = pyDef(r, lines[r]!.indent, undefined) - 1;
    }
    return b.next;
  };
  const pyLambda = (l: LLine, className: string | undefined): boolean => {
    const at = assignOpIndex(l.toks);
    if (at <= 0 || l.toks[at]!.text !== '=' || l.toks[at + 1]?.text !== 'lambda') return false;
    const name = l.toks.slice(0, at).filter((t) => t.kind === 'id').pop()?.text;
    if (!name) return false;
    let colon = -1;
    let depth = 0;
    for (let q = at + 2; q < l.toks.length; q++) {
      const x = l.toks[q]!.text;
      if (x === '(' || x === '[') depth++;
      else if (x === ')' || x === ']') depth--;
      else if (x === ':' && depth === 0) { colon = q; break; }
    }
    if (colon < 0) return false;
    const params = parseParams(l.toks.slice(at + 2, colon), 'python');
    const expr = l.toks.slice(colon + 1);
    const last = l.toks[l.toks.length - 1]!;
    functions.push({
      name, params, body: [{ k: 'return', expr, line: l.line }], bodyTokens: l.toks, start: l.toks[0]!.start, end: last.end,
      line: l.line, endLine: last.line, exprBody: expr, decorators: [], elementwise: false, ...(className ? { className } : {}),
    });
    return true;
  };
  while (i < lines.length) {
    const l = lines[i]!;
    const t0 = l.toks[0]!;
    if (t0.text === 'def' || t0.text === 'class' || t0.text === '@' || (t0.text === 'async' && l.toks[1]?.text === 'def')) {
      i = pyDef(i, l.indent, undefined);
      continue;
    }
    if (l.indent === 0) {
      if (!pyLambda(l, undefined)) {
        const a = assignOpIndex(l.toks);
        if (a > 0 && l.toks[a]!.text === '=') {
          const lhs = l.toks.slice(0, a);
          const name = lhs[0]!.kind === 'id' && (lhs.length === 1 || lhs[1]!.text === ':') ? lhs[0]!.text : undefined;
          const v = numberValue(l.toks.slice(a + 1));
          if (name && v !== undefined) constants.push({ name, value: v, line: l.line });
        }
      }
      top.push(...l.toks);
    } else {
      top.push(...l.toks);
    }
    i++;
  }
  return { functions, constants, topTokens: top };
}

// ---------------------------------------------------------------------------------------------
// Brace languages (C family, Rust, Go, JS/TS, Java, Kotlin, R)

function readBraces(tokens: Token[], info: LanguageInfo): CodeModel {
  const toks = tokens.filter((t) => t.kind !== 'nl' || true);
  const sig = toks.filter((t) => t.kind !== 'nl');
  const functions: FunctionDef[] = [];
  const constants: Constant[] = [];
  const lang = info.language;
  const family = info.family === 'r' ? 'r' : 'c';
  // bracket partners over significant tokens
  const partner = new Int32Array(sig.length).fill(-1);
  const stack: number[] = [];
  for (let k = 0; k < sig.length; k++) {
    const x = sig[k]!.text;
    if (x === '(' || x === '[' || x === '{') stack.push(k);
    else if (x === ')' || x === ']' || x === '}') {
      const o = stack.pop();
      if (o !== undefined) { partner[o] = k; partner[k] = o; }
    }
  }
  // class / struct / impl names by brace range
  const classes: { name: string; open: number; close: number }[] = [];
  for (let k = 0; k < sig.length; k++) {
    const x = sig[k]!.text;
    if ((x === 'class' || x === 'struct' || x === 'impl' || x === 'object' || x === 'interface') && sig[k + 1]?.kind === 'id') {
      let q = k + 1;
      // impl<T> Trait for Name
      let name = sig[q]!.text;
      while (q < sig.length && sig[q]!.text !== '{' && sig[q]!.text !== ';' && q - k < 30) {
        if (sig[q]!.text === 'for' && sig[q + 1]?.kind === 'id') name = sig[q + 1]!.text;
        q++;
      }
      if (sig[q]?.text === '{' && partner[q]! > 0) classes.push({ name, open: q, close: partner[q]! });
    }
  }
  const constantCandidates: { name: string; value: number; line: number; at: number }[] = [];
  const classAt = (pos: number): string | undefined => {
    let best: { name: string; open: number; close: number } | undefined;
    for (const c of classes) if (c.open < pos && pos < c.close && (!best || c.open > best.open)) best = c;
    return best?.name;
  };
  const bodyRange = (open: number): Token[] => {
    const close = partner[open]!;
    return sliceByOffsets(toks, sig[open]!.end, sig[close]!.start);
  };
  const pushFn = (name: string, headerStart: number, paramsOpen: number, bodyOpen: number | undefined, exprToks?: Token[], endTok?: Token): void => {
    const pclose = partner[paramsOpen]!;
    const style = lang === 'go' ? 'go' : (lang === 'rust' || lang === 'typescript' || lang === 'kotlin' || info.label === 'swift' || info.label === 'scala') ? 'typed' : 'c';
    let params = parseParams(sig.slice(paramsOpen + 1, pclose), style);
    if (lang === 'go') {
      // Go: `x, a float64` — names first, a type after the last of a group
      params = splitArgs(sig.slice(paramsOpen + 1, pclose)).map((a) => ({ name: a[0]?.text ?? '' })).filter((p) => p.name !== '');
    }
    const startTok = sig[headerStart]!;
    const { body, bodyTokens, end } = readBody(startTok, bodyOpen, exprToks, endTok);
    let className = classAt(headerStart);
    // Go methods: func (l *Leaky) Backward(…) — the receiver's type is the class
    if (lang === 'go' && sig[headerStart]?.text === 'func' && sig[headerStart + 1]?.text === '(') {
      const rc = partner[headerStart + 1]!;
      const typeTok = rc > 0 ? sig.slice(headerStart + 2, rc).filter((t) => t.kind === 'id').pop() : undefined;
      if (typeTok) className = typeTok.text;
    }
    const elementwise = bodyTokens.some((t) => t.text === 'threadIdx' || t.text === 'blockIdx' || t.text === 'get_global_id' || t.text === '__global__')
      || sig.slice(Math.max(0, headerStart - 3), headerStart + 1).some((t) => t.text === '__global__' || t.text === 'kernel');
    // void functions writing to an output array / pointer parameter
    let resultVar: string | undefined;
    const indexed = new Set<string>();
    collectIndexedTargets(body, indexed);
    const outParam = params.find((p) => indexed.has(p.name) && /^(out|y|output|res|result|dst|dx|grad_in|grad_input|dout|o|z|grad_x|dinput)$/i.test(p.name)) ??
      [...params].reverse().find((p) => indexed.has(p.name));
    if (outParam) resultVar = outParam.name;
    functions.push({
      name, params, body, bodyTokens, start: startTok.start, end: end.end, line: startTok.line, endLine: end.line,
      decorators: [], elementwise: elementwise || resultVar !== undefined || body.some((s) => s.k === 'loop'),
      ...(className ? { className } : {}), ...(resultVar ? { resultVar } : {}), ...(exprToks ? { exprBody: exprToks } : {}),
    });
  };

  for (let k = 0; k < sig.length; k++) {
    const t = sig[k]!;
    // constants: const float ALPHA = 0.01f; #define ALPHA 0.01; const ALPHA = 0.01; val ALPHA = 0.01; ALPHA <- 0.01
    if (t.text === 'define' && sig[k - 1]?.text === '#' && sig[k + 1]?.kind === 'id') {
      const nameTok = sig[k + 1]!;
      const valToks: Token[] = [];
      let q = k + 2;
      while (q < sig.length && sig[q]!.line === nameTok.line) valToks.push(sig[q++]!);
      const inner = valToks[0]?.text === '(' && valToks[valToks.length - 1]?.text === ')' && sig[k + 2]!.start > nameTok.end ? valToks.slice(1, -1) : valToks;
      const v = numberValue(inner);
      if (v !== undefined) constants.push({ name: nameTok.text, value: v, line: nameTok.line });
      else if (sig[k + 2]?.text === '(' && sig[k + 2]!.start === nameTok.end) {
        // function-like macro: #define NAME(x) (expr)
        const open = k + 2;
        const pc = partner[open]!;
        if (pc > 0) {
          const expr = sig.slice(pc + 1, q).filter((x) => x.line === nameTok.line);
          if (expr.length > 0) pushFn(nameTok.text, k - 1, open, undefined, expr, expr[expr.length - 1]);
        }
      }
      continue;
    }
    if ((t.text === '=' || t.text === '<-' || t.text === ':=') && sig[k - 1]?.kind === 'id') {
      // `const NAME: f32 = …` (Rust, TS, Kotlin): the name is before the `:`
      const typed = sig[k - 2]?.text === ':' && sig[k - 3]?.kind === 'id';
      const name = typed ? sig[k - 3]!.text : sig[k - 1]!.text;
      // value up to ; or end of line
      const valToks: Token[] = [];
      let q = k + 1;
      while (q < sig.length && sig[q]!.text !== ';' && sig[q]!.line === t.line && sig[q]!.text !== ',') valToks.push(sig[q++]!);
      const v = numberValue(valToks);
      if (v !== undefined) constantCandidates.push({ name, value: v, line: t.line, at: t.start });
      // arrow functions / lambdas / R functions: name = (x) => …, name = x => …, name <- function(x) …
      const first = sig[k + 1];
      if (first?.text === 'function' && sig[k + 2]?.text === '(') {
        const open = k + 2;
        const pc = partner[open]!;
        if (pc > 0) {
          let b = pc + 1;
          while (b < sig.length && sig[b]!.text !== '{' && b - pc < 8 && sig[b]!.line === sig[pc]!.line && sig[b]!.text !== ';') b++;
          if (sig[b]?.text === '{' && partner[b]! > 0) { pushFn(name, k - 1, open, b); k = b; continue; }
          // R single-expression function
          const expr = statementTail(sig, pc + 1);
          if (expr.length > 0) pushFn(name, k - 1, open, undefined, expr, expr[expr.length - 1]);
        }
        continue;
      }
      let open = -1;
      let arrowAt = -1;
      if (first?.text === '(' && partner[k + 1]! > 0) {
        const pc = partner[k + 1]!;
        if (sig[pc + 1]?.text === '=>' || sig[pc + 1]?.text === '->') { open = k + 1; arrowAt = pc + 1; }
        else if (sig[pc + 1]?.text === ':' ) {
          // (x: number): number => …
          let q2 = pc + 2;
          while (q2 < sig.length && q2 - pc < 6 && sig[q2]!.text !== '=>') q2++;
          if (sig[q2]?.text === '=>') { open = k + 1; arrowAt = q2; }
        }
      } else if (first?.kind === 'id' && (sig[k + 2]?.text === '=>' || sig[k + 2]?.text === '->')) {
        arrowAt = k + 2;
      } else if (first?.text === '[' && partner[k + 1]! > 0 && sig[partner[k + 1]! + 1]?.text === '(') {
        // C++ lambda [](float x) -> float { … }
        const po = partner[k + 1]! + 1;
        const pc = partner[po]!;
        let b = pc + 1;
        while (b < sig.length && sig[b]!.text !== '{' && b - pc < 8) b++;
        if (sig[b]?.text === '{' && partner[b]! > 0) { pushFn(name, k - 1, po, b); k = b; }
        continue;
      }
      if (arrowAt > 0) {
        if (sig[arrowAt + 1]?.text === '{' && partner[arrowAt + 1]! > 0) {
          if (open >= 0) pushFn(name, k - 1, open, arrowAt + 1);
          else pushSingleParamFn(name, k - 1, sig[k + 1]!, arrowAt + 1, undefined);
          k = arrowAt + 1;
        } else {
          const expr = statementTail(sig, arrowAt + 1);
          if (expr.length > 0) {
            if (open >= 0) pushFn(name, k - 1, open, undefined, expr, expr[expr.length - 1]);
            else pushSingleParamFn(name, k - 1, sig[k + 1]!, undefined, expr);
          }
        }
      }
      continue;
    }
    if (t.text !== '{' || partner[k]! < 0) continue;
    // function header: look back from `{` to `)`
    let j = k - 1;
    let steps = 0;
    while (j >= 0 && steps < 30) {
      const x = sig[j]!.text;
      if (x === ')') break;
      if (x === ';' || x === '{' || x === '}' || x === '=' || x === 'else') { j = -1; break; }
      j--;
      steps++;
    }
    if (j < 0 || sig[j]!.text !== ')') continue;
    const open = partner[j]!;
    if (open < 1) continue;
    // Kotlin/Java `) : T {` fine; skip control flow
    let nameTok = sig[open - 1]!;
    if (nameTok.text === 'function' && sig[open - 2]?.text !== '=') {
      // anonymous function expression — named by `name = function`
      continue;
    }
    if (nameTok.kind !== 'id' || NOT_NAMES.has(nameTok.text)) continue;
    // Go receivers: func (r T) Name(x) {
    if (sig[open - 2]?.text === ')' && lang === 'go') { /* name is right */ }
    // skip calls with trailing lambdas (Kotlin `list.map { … }`): those have no ) directly before {
    let headerStart = open - 1;
    while (headerStart > 0 && headerStart > open - 8) {
      const p = sig[headerStart - 1]!;
      if (p.text === ';' || p.text === '{' || p.text === '}' || p.text === ')' || p.text === '#' || p.line !== nameTok.line) break;
      headerStart--;
    }
    if (lang === 'go' && sig[headerStart - 1]?.text === ')' && partner[headerStart - 1]! > 0 && sig[partner[headerStart - 1]! - 1]?.text === 'func') {
      headerStart = partner[headerStart - 1]! - 1;
    }
    if (nameTok.text === 'function' && sig[open - 2]?.text === '=') nameTok = sig[open - 3]!;
    pushFn(nameTok.text, headerStart, open, k);
  }
  // Kotlin `fun name(x: Double): Double = expr` and Scala/Swift-like `= expr` bodies
  for (let k = 0; k < sig.length; k++) {
    if (sig[k]!.text !== 'fun' && sig[k]!.text !== 'def') continue;
    const nameTok = sig[k + 1];
    const open = k + 2;
    if (!nameTok || sig[open]?.text !== '(') continue;
    const pc = partner[open]!;
    if (pc < 0) continue;
    let q = pc + 1;
    while (q < sig.length && q - pc < 8 && sig[q]!.text !== '=' && sig[q]!.text !== '{') q++;
    if (sig[q]?.text !== '=') continue;
    const expr = statementTail(sig, q + 1);
    if (expr.length > 0) pushFn(nameTok.text, k, open, undefined, expr, expr[expr.length - 1]);
  }
  functions.sort((a, b) => a.start - b.start);
  // constants are the assignments outside every function (one sweep over both sorted lists)
  let fi = 0;
  let maxEnd = -1;
  for (const c of constantCandidates) {
    while (fi < functions.length && functions[fi]!.start <= c.at) { maxEnd = Math.max(maxEnd, functions[fi]!.end); fi++; }
    if (maxEnd < c.at) constants.push({ name: c.name, value: c.value, line: c.line });
  }
  /** A function's body: the statements of its braced block, or its single expression as one return. */
  function readBody(startTok: Token, bodyOpen: number | undefined, expr?: Token[], endTok?: Token): { body: Stmt[]; bodyTokens: Token[]; end: Token } {
    if (bodyOpen !== undefined) {
      const bodyTokens = bodyRange(bodyOpen);
      return { body: braceStatements(bodyTokens, family, lang), bodyTokens, end: sig[partner[bodyOpen]!]! };
    }
    const bodyTokens = expr ?? [];
    // an expression body may run over several lines inside brackets: the newlines are not part of it
    const body: Stmt[] = [{ k: 'return', expr: bodyTokens.filter((t) => t.kind !== 'nl'), line: startTok.line }];
    return { body, bodyTokens, end: endTok ?? bodyTokens[bodyTokens.length - 1] ?? startTok };
  }
  function pushSingleParamFn(name: string, headerStart: number, param: Token, bodyOpen: number | undefined, expr?: Token[]): void {
    const startTok = sig[headerStart]!;
    const { body, bodyTokens, end } = readBody(startTok, bodyOpen, expr);
    const className = classAt(headerStart);
    functions.push({
      name, params: [{ name: param.text }], body, bodyTokens, start: startTok.start, end: end.end, line: startTok.line,
      endLine: end.line, decorators: [], elementwise: false, ...(className ? { className } : {}), ...(expr ? { exprBody: expr } : {}),
    });
  }
  return { functions, constants, topTokens: sig };
}

/** Tokens of an expression statement starting at k: up to `;`, a `,`/`)`/`}` closing an enclosing bracket, or the end of the line. */
function statementTail(sig: Token[], k: number): Token[] {
  const out: Token[] = [];
  let depth = 0;
  for (let q = k; q < sig.length; q++) {
    const t = sig[q]!;
    if (t.text === '(' || t.text === '[' || t.text === '{') depth++;
    else if (t.text === ')' || t.text === ']' || t.text === '}') {
      if (depth === 0) break;
      depth--;
    }
    if (depth === 0 && (t.text === ';' || t.text === ',')) break;
    if (depth === 0 && out.length > 0 && t.line !== out[out.length - 1]!.line && !isContinuationOp(out[out.length - 1]!) && !isContinuationOp(t)) break;
    out.push(t);
  }
  return out;
}

function isContinuationOp(t: Token): boolean {
  return t.kind === 'op' && !['(', ')', '[', ']', '{', '}', ';', "'"].includes(t.text);
}

const DECL_WORDS = new Set(['let', 'mut', 'const', 'var', 'val', 'auto', 'float', 'double', 'int', 'half', 'f32', 'f64', 'register', 'static', 'final', 'scalar_t', 'T', 'long', 'unsigned', 'float32', 'float64', 'number', 'Double', 'Float', 'real']);

/** Statements of a brace body: `;` or a line break ends a statement; `if`/`else`/loops nest. */
export function braceStatements(body: Token[], family: string, lang: string): Stmt[] {
  const sig = body;
  let k = 0;
  const out: Stmt[] = [];
  const n = sig.length;
  const skipNl = (): void => { while (k < n && sig[k]!.kind === 'nl') k++; };
  const block = (): Stmt[] => {
    // at `{` or a single statement
    skipNl();
    if (sig[k]?.text === '{') {
      const close = matchCloseNl(sig, k);
      const inner = sig.slice(k + 1, close < 0 ? n : close);
      k = close < 0 ? n : close + 1;
      return braceStatements(inner, family, lang);
    }
    const s = simple();
    return s ? [s] : [];
  };
  const condition = (): Token[] => {
    skipNl();
    if (sig[k]?.text === '(' && (lang !== 'go' && lang !== 'rust')) {
      const close = matchCloseNl(sig, k);
      const c = sig.slice(k + 1, close);
      k = close + 1;
      return c;
    }
    // Go / Rust: cond up to `{`
    const start = k;
    let depth = 0;
    while (k < n) {
      const x = sig[k]!.text;
      if (x === '(' || x === '[') depth++;
      else if (x === ')' || x === ']') depth--;
      else if (x === '{' && depth === 0) break;
      k++;
    }
    return sig.slice(start, k).filter((t) => t.kind !== 'nl');
  };
  const simple = (): Stmt | undefined => {
    skipNl();
    const start = k;
    let depth = 0;
    while (k < n) {
      const t = sig[k]!;
      if (t.text === '(' || t.text === '[' || t.text === '{') depth++;
      else if (t.text === ')' || t.text === ']' || t.text === '}') depth--;
      if (depth === 0 && t.text === ';') { k++; break; }
      if (depth === 0 && t.kind === 'nl') {
        const prev = prevSig(sig, k);
        const next = nextSig(sig, k);
        if (!(prev && isContinuationOp(prev)) && !(next && isContinuationOp(next) && next.text !== '!' && next.text !== '-' && next.text !== '*') && next?.text !== 'else') { k++; break; }
      }
      if (depth < 0) break;
      k++;
    }
    const toks = sig.slice(start, k).filter((t) => t.kind !== 'nl' && t.text !== ';');
    if (toks.length === 0) return undefined;
    return simpleStmt(toks, family, lang);
  };
  while (k < n) {
    skipNl();
    if (k >= n) break;
    const t = sig[k]!;
    if (t.text === 'if') {
      k++;
      const branches: { cond: Token[] | null; body: Stmt[] }[] = [];
      branches.push({ cond: condition(), body: block() });
      for (;;) {
        const save = k;
        skipNl();
        if (sig[k]?.text !== 'else') { k = save; break; }
        k++;
        skipNl();
        if (sig[k]?.text === 'if') {
          k++;
          branches.push({ cond: condition(), body: block() });
          continue;
        }
        branches.push({ cond: null, body: block() });
        break;
      }
      out.push({ k: 'if', branches, line: t.line });
      continue;
    }
    if (t.text === 'for' || t.text === 'while' || t.text === 'loop') {
      k++;
      const header = t.text === 'loop' ? [] : condition();
      const vars = loopVars(header);
      out.push({ k: 'loop', vars, body: block(), line: t.line });
      continue;
    }
    if (t.text === '{') {
      out.push(...block());
      continue;
    }
    if (t.text === '}' ) { k++; continue; }
    const s = simple();
    if (s) out.push(s);
  }
  return out;
}

function loopVars(header: Token[]): string[] {
  const out: string[] = [];
  for (let q = 0; q < header.length; q++) {
    const t = header[q]!;
    const nx = header[q + 1];
    if (t.kind === 'id' && (nx?.text === '=' || nx?.text === ':=' || nx?.text === 'in' || nx?.text === ':' || (nx?.text === ',' && header.some((x) => x.text === 'range'))) && !DECL_WORDS.has(t.text)) out.push(t.text);
  }
  return out;
}

function matchCloseNl(toks: Token[], openAt: number): number {
  let depth = 0;
  for (let q = openAt; q < toks.length; q++) {
    const x = toks[q]!.text;
    if (x === '(' || x === '[' || x === '{') depth++;
    else if (x === ')' || x === ']' || x === '}') {
      depth--;
      if (depth === 0) return q;
    }
  }
  return -1;
}

function prevSig(toks: Token[], k: number): Token | undefined {
  for (let q = k - 1; q >= 0; q--) if (toks[q]!.kind !== 'nl') return toks[q];
  return undefined;
}
function nextSig(toks: Token[], k: number): Token | undefined {
  for (let q = k + 1; q < toks.length; q++) if (toks[q]!.kind !== 'nl') return toks[q];
  return undefined;
}

function simpleStmt(toks: Token[], family: string, lang: string): Stmt {
  const line = toks[0]!.line;
  const w = toks[0]!.text;
  if (w === 'return') return { k: 'return', expr: stripReturnCall(toks.slice(1), family), line };
  if (family === 'r' && w === 'return' ) return { k: 'return', expr: toks.slice(1), line };
  if (family === 'r' && w === 'return(') return { k: 'return', expr: toks.slice(1), line };
  const a = assignment(toks, line, lang === 'go' ? 'go' : family);
  if (a) return a;
  // R: return(expr)
  if (w === 'return' || (family === 'r' && w === 'return')) return { k: 'return', expr: toks.slice(1), line };
  if (lang === 'rust' && w === 'if') return { k: 'expr', expr: toks, line };
  return { k: 'expr', expr: toks, line };
}

function stripReturnCall(toks: Token[], family: string): Token[] {
  // R `return(expr)`
  if (family === 'r' && toks[0]?.text === '(' && matchClose(toks, 0) === toks.length - 1) return toks.slice(1, -1);
  return toks;
}

// ---------------------------------------------------------------------------------------------
// `end`-terminated languages: Julia, Lua, MATLAB/Octave, Fortran

const OPENERS: Record<string, Set<string>> = {
  julia: new Set(['function', 'if', 'for', 'while', 'let', 'begin', 'do', 'try', 'struct', 'module', 'macro', 'quote', 'mutable', 'baremodule']),
  lua: new Set(['function', 'if', 'for', 'while', 'do', 'repeat']),
  matlab: new Set(['function', 'if', 'for', 'while', 'switch', 'try', 'parfor', 'classdef', 'methods', 'properties']),
  fortran: new Set(['function', 'subroutine', 'if', 'do', 'select', 'module', 'program', 'interface', 'type', 'block', 'where']),
};

function readKeywordBlocks(tokens: Token[], info: LanguageInfo): CodeModel {
  const fam = info.family;
  const lower = fam === 'fortran';
  const lines = logicalLines(tokens, fam !== 'fortran', fam === 'fortran' ? '&' : undefined);
  const functions: FunctionDef[] = [];
  const constants: Constant[] = [];
  const word = (t: Token | undefined): string => (t ? (lower ? t.text.toLowerCase() : t.text) : '');

  const isEnd = (l: LLine): boolean => {
    const w = word(l.toks[0]);
    if (fam === 'lua' && w === 'until') return true;
    if (w === 'end' || (fam === 'fortran' && /^end(if|do|function|subroutine|select|module|program|where|block)$/.test(w))) return true;
    return false;
  };
  const isOpener = (l: LLine): boolean => {
    const ts = l.toks;
    const w = word(ts[0]);
    if (fam === 'fortran') {
      if (w === 'if') return word(ts[ts.length - 1]) === 'then';
      if (w === 'else') return false;
      if (w === 'do' || w === 'select' || w === 'module' || w === 'program' || w === 'interface' || w === 'block' || w === 'subroutine' || w === 'function') return true;
      if (w === 'where') return ts.every((t, i) => i === 0 || t.line === ts[0]!.line) && matchClose(ts, 1) === ts.length - 1;
      if (w === 'type' && ts[1]?.text !== '(') return true;
      return ts.some((t) => word(t) === 'function' || word(t) === 'subroutine') && !ts.some((t) => word(t) === 'end');
    }
    if (fam === 'lua') {
      // a line may open several blocks (`if … then … end` on one line closes itself)
      return blockDelta(ts) > 0;
    }
    if (fam === 'julia' && w === 'function' && ts[ts.length - 1]?.text === 'end') return false;
    if (w === 'mutable') return true;
    if (OPENERS[fam]!.has(w)) {
      // one-line forms: `if c; …; end` were split by `;` already
      return true;
    }
    if (fam === 'julia' && ts.some((t) => t.text === 'do')) return true;
    return false;
  };
  function blockDelta(ts: Token[]): number {
    let d = 0;
    for (let q = 0; q < ts.length; q++) {
      const w = ts[q]!.text;
      if (w === 'function' || w === 'if' || w === 'repeat') d++;
      else if ((w === 'do') && !ts.slice(0, q).some((t) => t.text === 'for' || t.text === 'while')) d++;
      else if (w === 'for' || w === 'while') d++;
      else if (w === 'end' || w === 'until') d--;
    }
    return d;
  }

  /** Read statements from line i until an end at this level; returns index after the end. */
  const readStmts = (from: number, stopAt: (l: LLine) => boolean): { stmts: Stmt[]; next: number } => {
    const stmts: Stmt[] = [];
    let i = from;
    while (i < lines.length) {
      const l = lines[i]!;
      if (stopAt(l)) return { stmts, next: i };
      const w = word(l.toks[0]);
      if (w === 'if' && (fam !== 'fortran' || word(l.toks[l.toks.length - 1]) === 'then' || fam !== 'fortran')) {
        if (fam === 'fortran' && word(l.toks[l.toks.length - 1]) !== 'then') {
          // one-line `if (c) stmt`
          const close = matchClose(l.toks, 1);
          const cond = l.toks.slice(2, close);
          const s = keywordSimple(l.toks.slice(close + 1), l.line);
          stmts.push({ k: 'if', branches: [{ cond, body: s ? [s] : [] }], line: l.line });
          i++;
          continue;
        }
        if (fam === 'lua' && blockDelta(l.toks) === 0) {
          // if c then return a else return b end  — on one line
          const r = luaInlineIf(l);
          if (r) stmts.push(r);
          i++;
          continue;
        }
        const branches: { cond: Token[] | null; body: Stmt[] }[] = [];
        let cond: Token[] | null = ifCond(l.toks);
        let q = i + 1;
        // Lua/Julia: statements may follow `then` on the same line
        const inlineRest = afterThen(l.toks);
        for (;;) {
          const isBranch = (x: LLine): boolean => {
            const xw = word(x.toks[0]);
            return xw === 'elseif' || xw === 'else' || isEnd(x);
          };
          const r = readStmts(q, isBranch);
          const pre = inlineRest.length > 0 && branches.length === 0 ? [keywordSimple(inlineRest, l.line)].filter((s): s is Stmt => !!s) : [];
          branches.push({ cond, body: [...pre, ...r.stmts] });
          q = r.next;
          if (q >= lines.length) break;
          const bl = lines[q]!;
          const bw = word(bl.toks[0]);
          if (bw === 'elseif' || (bw === 'else' && word(bl.toks[1]) === 'if')) {
            cond = ifCond(bw === 'else' ? bl.toks.slice(1) : bl.toks);
            q++;
            continue;
          }
          if (bw === 'else') {
            cond = null;
            q++;
            const rest = bl.toks.slice(1);
            const r2 = readStmts(q, isEnd);
            const pre2 = rest.length > 0 ? [keywordSimple(rest, bl.line)].filter((s): s is Stmt => !!s) : [];
            branches.push({ cond: null, body: [...pre2, ...r2.stmts] });
            q = r2.next;
          }
          break;
        }
        stmts.push({ k: 'if', branches, line: l.line });
        i = q + 1;
        continue;
      }
      if (w === 'for' || w === 'while' || w === 'do' || w === 'parfor') {
        if (fam === 'fortran' && w === 'do' && word(l.toks[1]) === 'concurrent') { /* fine */ }
        const vars = l.toks.slice(1, 3).filter((t) => t.kind === 'id' && t.text !== 'concurrent').map((t) => t.text).slice(0, 1);
        const r = readStmts(i + 1, isEnd);
        stmts.push({ k: 'loop', vars, body: r.stmts, line: l.line });
        i = r.next + 1;
        continue;
      }
      if (isOpener(l)) {
        // nested function or unknown block: skip to its end
        i = skipBlock(i);
        continue;
      }
      const s = keywordSimple(l.toks, l.line);
      if (s) stmts.push(s);
      i++;
    }
    return { stmts, next: i };
  };
  const skipBlock = (i: number): number => {
    let depth = 0;
    for (let q = i; q < lines.length; q++) {
      const l = lines[q]!;
      if (fam === 'lua') depth += blockDelta(l.toks);
      else if (isOpener(l)) depth++;
      else if (isEnd(l)) depth--;
      if (depth <= 0) return q + 1;
    }
    return lines.length;
  };
  const ifCond = (ts: Token[]): Token[] => {
    let c = ts.slice(1);
    const thenAt = c.findIndex((t) => word(t) === 'then');
    if (thenAt >= 0) c = c.slice(0, thenAt);
    if (fam === 'fortran' && c[0]?.text === '(' && matchClose(c, 0) === c.length - 1) c = c.slice(1, -1);
    return c;
  };
  const afterThen = (ts: Token[]): Token[] => {
    if (fam !== 'lua') return [];
    const thenAt = ts.findIndex((t) => t.text === 'then');
    return thenAt >= 0 ? ts.slice(thenAt + 1) : [];
  };
  const luaInlineIf = (l: LLine): Stmt | undefined => {
    // if c then A [elseif c2 then B] [else C] end
    const ts = l.toks;
    const branches: { cond: Token[] | null; body: Stmt[] }[] = [];
    let q = 1;
    let cond: Token[] | null = null;
    let cur: Token[] = [];
    let mode: 'cond' | 'body' = 'cond';
    for (; q < ts.length; q++) {
      const w = ts[q]!.text;
      if (mode === 'cond') {
        if (w === 'then') { mode = 'body'; continue; }
        cur.push(ts[q]!);
        cond = cur;
        continue;
      }
      if (w === 'elseif' || w === 'else' || w === 'end') {
        const s = keywordSimple(cur === cond ? [] : cur, l.line);
        branches.push({ cond: branches.length === 0 || cond ? cond : null, body: s ? [s] : [] });
        cur = [];
        if (w === 'elseif') { mode = 'cond'; cond = []; cur = []; continue; }
        if (w === 'else') { cond = null; continue; }
        break;
      }
      if (cur === cond) cur = [];
      cur.push(ts[q]!);
    }
    return branches.length > 0 ? { k: 'if', branches, line: l.line } : undefined;
  };
  const keywordSimple = (ts: Token[], line: number): Stmt | undefined => {
    if (ts.length === 0) return undefined;
    const w = word(ts[0]);
    if (w === 'return') {
      if (ts.length === 1) return { k: 'return', expr: [], line };
      return { k: 'return', expr: ts.slice(1), line };
    }
    if (w === 'local' && ts[1]?.text !== 'function') return keywordSimple(ts.slice(1), line);
    if (fam === 'fortran') {
      // declarations: real(dp), intent(in) :: x ;  real, parameter :: a = 0.01
      const dc = ts.findIndex((t) => t.text === '::');
      if (dc >= 0) return { k: 'other', line };
      if (['implicit', 'use', 'integer', 'real', 'double', 'logical', 'contains', 'intrinsic', 'external', 'call', 'print', 'write'].includes(w)) return { k: 'other', line };
    }
    if (fam === 'julia' && (w === 'local' || w === 'const' || w === 'global')) return keywordSimple(ts.slice(1), line);
    const a = assignment(ts, line, fam);
    if (a) return a;
    return { k: 'expr', expr: ts, line };
  };

  // top level: find functions
  const matlabEnds = fam === 'matlab' && hasEndedFunctions(lines, 0);
  let i = 0;
  const top: Token[] = [];
  while (i < lines.length) {
    const l = lines[i]!;
    const ts = l.toks;
    const fnAt = ts.findIndex((t) => word(t) === 'function');
    const w0 = word(ts[0]);
    // constants
    if (fam === 'fortran') {
      const dc = ts.findIndex((t) => t.text === '::');
      if (dc >= 0 && ts.slice(0, dc).some((t) => word(t) === 'parameter')) {
        for (const part of splitArgs(ts.slice(dc + 1))) {
          const eq = part.findIndex((t) => t.text === '=');
          if (eq === 1 && part[0]!.kind === 'id') {
            const v = numberValue(part.slice(2));
            if (v !== undefined) constants.push({ name: part[0]!.text, value: v, line: l.line });
          }
        }
      }
    } else if (fnAt < 0) {
      const a = assignOpIndex(ts);
      if (a > 0 && ts[a]!.text === '=') {
        const lhs = ts.slice(0, a).filter((t) => !['const', 'local', 'global'].includes(t.text));
        if (lhs.length === 1 && lhs[0]!.kind === 'id') {
          const v = numberValue(ts.slice(a + 1));
          if (v !== undefined) constants.push({ name: lhs[0]!.text, value: v, line: l.line });
        }
      }
    }
    if (fam === 'matlab' && fnAt < 0) {
      // name = @(x) expr
      const a = assignOpIndex(ts);
      if (a > 0 && ts[a + 1]?.text === '@' && ts[a + 2]?.text === '(') {
        const close = matchClose(ts, a + 2);
        const name = ts[a - 1]!.text;
        const expr = ts.slice(close + 1).filter((t) => t.text !== ';');
        if (close > 0 && expr.length > 0) {
          functions.push({
            name, params: parseParams(ts.slice(a + 3, close), 'plain'), body: [{ k: 'return', expr, line: l.line }],
            bodyTokens: expr, start: ts[0]!.start, end: ts[ts.length - 1]!.end, line: l.line, endLine: ts[ts.length - 1]!.line,
            exprBody: expr, decorators: [], elementwise: true,
          });
        }
        i++;
        continue;
      }
    }
    if (fam === 'julia' && fnAt < 0 && ts[0]?.kind === 'id' && ts[1]?.text === '(') {
      // f(x) = expr   (also f(x::T) where T = expr)
      const close = matchClose(ts, 1);
      let q = close + 1;
      while (q < ts.length && ts[q]!.text !== '=' && q - close < 6) q++;
      if (close > 0 && ts[q]?.text === '=' && ts[q + 1]?.text !== '=') {
        const expr = ts.slice(q + 1);
        functions.push({
          name: ts[0]!.text, params: parseParams(ts.slice(2, close), 'typed'), body: [{ k: 'return', expr, line: l.line }],
          bodyTokens: ts, start: ts[0]!.start, end: ts[ts.length - 1]!.end, line: l.line, endLine: ts[ts.length - 1]!.line,
          exprBody: expr, decorators: [], elementwise: false,
        });
        i++;
        continue;
      }
    }
    if (fnAt >= 0 && !(fam === 'fortran' && w0 === 'end')) {
      const header = parseFunctionHeader(ts, fnAt, fam, word);
      const isSub = fam === 'fortran' && ts.some((t) => word(t) === 'subroutine');
      if (header || isSub) {
        const h = header ?? { name: '', params: [] as Param[], resultVar: undefined as string | undefined };
        // body until the matching end (MATLAB: a function may end at the next `function` or EOF)
        let depth = 0;
        let q = i;
        for (; q < lines.length; q++) {
          const lq = lines[q]!;
          if (q > i && fam === 'matlab' && word(lq.toks[0]) === 'function' && depth <= 1 && !matlabEnds) { break; }
          if (fam === 'lua') depth += blockDelta(lq.toks);
          else if (isOpener(lq) || q === i) depth++;
          else if (isEnd(lq)) depth--;
          if (depth <= 0) break;
        }
        const endIdx = Math.min(q, lines.length - 1);
        const bodyLines = lines.slice(i + 1, q);
        const bodyIndexStart = i + 1;
        const stopStart = q < lines.length ? lines[q]!.toks[0]!.start : Infinity;
        const r = readStmts(bodyIndexStart, (x) => x.toks[0]!.start >= stopStart);
        const lastLine = lines[endIdx]!;
        const lastTok = lastLine.toks[lastLine.toks.length - 1]!;
        const bodyTokens = bodyLines.flatMap((b) => b.toks);
        // Lua: `function M.name(x)` → name; `local sig = function(x)`
        functions.push({
          name: h.name, params: h.params, body: r.stmts, bodyTokens, start: ts[0]!.start, end: lastTok.end, line: l.line,
          endLine: lastLine.line, decorators: [], elementwise: fam === 'matlab' || fam === 'fortran' || r.stmts.some((s) => s.k === 'loop'),
          ...(h.resultVar ? { resultVar: h.resultVar } : {}),
        });
        i = q + 1;
        continue;
      }
    }
    top.push(...ts);
    i++;
  }
  return { functions, constants, topTokens: top };
}

function hasEndedFunctions(lines: LLine[], _i: number): boolean {
  // MATLAB files either end every function with `end` or none; count `end`s vs openers roughly
  let openers = 0;
  let ends = 0;
  for (const l of lines) {
    const w = l.toks[0]?.text;
    if (w === 'function' || w === 'if' || w === 'for' || w === 'while' || w === 'switch' || w === 'try' || w === 'parfor') openers++;
    if (w === 'end') ends++;
  }
  return ends >= openers;
}

function parseFunctionHeader(ts: Token[], fnAt: number, fam: string, word: (t: Token | undefined) => string): { name: string; params: Param[]; resultVar?: string } | undefined {
  let q = fnAt + 1;
  let resultVar: string | undefined;
  if (fam === 'matlab') {
    // function y = name(x, a)   |   function [y, dy] = name(x)   |   function name(x)
    const eq = ts.findIndex((t) => t.text === '=');
    if (eq > fnAt) {
      const outs = ts.slice(fnAt + 1, eq).filter((t) => t.kind === 'id');
      resultVar = outs[0]?.text;
      q = eq + 1;
    }
  }
  // Lua: function M.name(x) / function M:name(x); local sig = function(x)
  let nameTok = ts[q];
  if (fam === 'lua' && ts[fnAt + 1]?.text === '(') {
    const eq = ts.findIndex((t) => t.text === '=');
    if (eq > 0 && eq < fnAt) nameTok = ts[eq - 1];
    q = fnAt;
  } else {
    while (ts[q + 1]?.text === '.' || ts[q + 1]?.text === ':') {
      q += 2;
      nameTok = ts[q];
    }
  }
  if (!nameTok || nameTok.kind !== 'id') return undefined;
  const open = q + 1;
  if (ts[open]?.text !== '(') {
    if (fam === 'matlab') return { name: nameTok.text, params: [], ...(resultVar ? { resultVar } : {}) };
    return undefined;
  }
  const close = matchClose(ts, open);
  if (close < 0) return undefined;
  const params = parseParams(ts.slice(open + 1, close), fam === 'julia' ? 'typed' : 'plain');
  if (fam === 'fortran') {
    const res = ts.findIndex((t, k) => k > close && word(t) === 'result');
    resultVar = res > 0 ? ts[res + 2]?.text : nameTok.text;
  }
  return { name: nameTok.text, params, ...(resultVar ? { resultVar } : {}) };
}

function collectIndexedTargets(stmts: Stmt[], into: Set<string>): void {
  for (const s of stmts) {
    if (s.k === 'assign' && s.index) into.add(s.target);
    else if (s.k === 'loop') collectIndexedTargets(s.body, into);
    else if (s.k === 'if') for (const b of s.branches) collectIndexedTargets(b.body, into);
  }
}

/** Tokens with start ≥ a and end ≤ b (tokens are sorted by offset): two binary searches. */
export function sliceByOffsets(tokens: Token[], a: number, b: number): Token[] {
  let lo = 0;
  let hi = tokens.length;
  while (lo < hi) { const m = (lo + hi) >> 1; if (tokens[m]!.start < a) lo = m + 1; else hi = m; }
  const from = lo;
  hi = tokens.length;
  while (lo < hi) { const m = (lo + hi) >> 1; if (tokens[m]!.end <= b) lo = m + 1; else hi = m; }
  return tokens.slice(from, lo);
}
