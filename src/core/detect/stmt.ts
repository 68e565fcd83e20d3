/**
 * A tiny statement language every supported source language is read into, and its reduction to one
 * expression: straight-line assignments are substituted into the result, `if`/`else` (including
 * early returns) becomes `c ? a : b`, masked assignments (`y[x < 0] = 0`, MATLAB `y(x<0) = …`)
 * become conditionals, and a loop over elements is read as its scalar body.
 */
import type { Token } from './lexer';

export type Stmt =
  | { k: 'assign'; target: string; op: string; expr: Token[]; index?: Token[]; line: number }
  | { k: 'multi'; targets: string[]; expr: Token[]; line: number }
  | { k: 'return'; expr: Token[]; line: number }
  | { k: 'if'; branches: { cond: Token[] | null; body: Stmt[] }[]; line: number }
  | { k: 'loop'; vars: string[]; body: Stmt[]; line: number }
  | { k: 'expr'; expr: Token[]; line: number }
  | { k: 'other'; line: number };

export interface Dialect {
  /** `&&`→and etc. per language. */
  family: string;
  /** The last expression of a body is its value (Julia, R, Rust). */
  lastExpressionValue: boolean;
}

export interface RenderContext {
  /** Names whose `[index]` is dropped (arrays read element-wise in a loop or kernel). */
  elementwise: boolean;
  indexNames: Set<string>;
  dialect: Dialect;
  /** Calls to inline: name → (args → text). */
  inline?: (name: string, args: string[]) => string | undefined;
}

const LOGIC: Record<string, string> = {
  '&&': ' and ', '||': ' or ', '.and.': ' and ', '.or.': ' or ', '.not.': ' not ', '.gt.': ' > ', '.lt.': ' < ',
  '.ge.': ' >= ', '.le.': ' <= ', '.eq.': ' == ', '.ne.': ' != ', '~=': ' != ', '/=': ' != ', '.true.': ' true ',
  '.false.': ' false ',
};

/** The symbol a batch mean divides by (bound to sample sizes when comparing). */
export const BATCH_SYMBOL = 'N_batch';
const BATCH_METHODS: Record<string, 'mean' | 'sum' | 'N'> = { mean: 'mean', sum: 'sum', numel: 'N', nelement: 'N', size: 'N', shape: 'N' };
const BATCH_CALLS: Record<string, 'mean' | 'sum' | 'N'> = { mean: 'mean', sum: 'sum', len: 'N', numel: 'N', length: 'N', nrow: 'N', size: 'N' };

/** Remove the last operand (identifier, number or bracketed group) from rendered text. */
function dropLastOperand(out: string): string {
  let k = out.length;
  while (k > 0 && out[k - 1] === ' ') k--;
  if (out[k - 1] === ')') {
    let depth = 0;
    for (let q = k - 1; q >= 0; q--) {
      if (out[q] === ')') depth++;
      else if (out[q] === '(') { depth--; if (depth === 0) return out.slice(0, q); }
    }
    return out;
  }
  let q = k;
  while (q > 0 && /[A-Za-z0-9_.\u0370-\u03ff]/.test(out[q - 1]!)) q--;
  return out.slice(0, q);
}

const FILLS: Record<string, string> = { ones: '1', zeros: '0', ones_like: '1', zeros_like: '0', onesLike: '1', zerosLike: '0' };
const DROP_METHODS = new Set(['clone', 'copy', 'detach', 'contiguous', 'float', 'double', 'item', 'to', 'type', 'astype', 'cpu', 'cuda', 'numpy', 'unwrap', 'into', 'as_', 'type_as']);
const CASTS = new Set(['float', 'double', 'float64', 'float32', 'f32', 'f64', 'real', 'dble', 'Float64', 'Float32', 'as.numeric', 'Number', 'static_cast', 'half', '__float2half', '__half2float', 'T']);
const TYPE_WORDS = new Set(['float', 'double', 'int', 'half', 'f32', 'f64', 'Float64', 'Float32', 'scalar_t', 'T', 'long', 'unsigned', 'const', 'real', 'f16', 'bf16', '__half', 'usize', 'i32', 'i64']);

export function render(toks: Token[], env: Map<string, string>, ctx: RenderContext): string {
  let out = '';
  let prev: Token | undefined;
  const n = toks.length;
  for (let i = 0; i < n; i++) {
    const t = toks[i]!;
    if (t.kind === 'nl') continue;
    let piece = t.text;
    const next = toks[i + 1];
    const sep = prev && (t.start > prev.end) ? ' ' : '';
    if (t.kind === 'op' && LOGIC[t.text.toLowerCase()] !== undefined && !(t.text === '/=' && ctx.dialect.family !== 'fortran')) {
      piece = LOGIC[t.text.toLowerCase()]!;
    } else if (t.kind === 'op' && t.text === '!' && next?.text !== '=') {
      piece = ' not ';
    } else if (t.kind === 'op' && t.text === '~' && ctx.dialect.family === 'matlab') {
      piece = ' not ';
    } else if (t.kind === 'op' && (t.text === '&' || t.text === '|') && (ctx.dialect.family === 'matlab' || ctx.dialect.family === 'r' || ctx.dialect.family === 'python')) {
      piece = t.text === '&' ? ' and ' : ' or ';
    } else if (t.kind === 'id' && (t.text === 'self' || t.text === 'ctx' || t.text === 'this') && next?.text === '.' && toks[i + 2]?.kind === 'id') {
      // self.out → self_out (a plain symbol), unless it is a method call
      const member = toks[i + 2]!;
      const after = toks[i + 3];
      const key = `${t.text}.${member.text}`;
      if (after?.text === '(') {
        // self.method(args) → method(args)
        i += 1;
        prev = t;
        continue;
      }
      const v = env.get(key);
      piece = v !== undefined ? `(${v})` : `${t.text}_${member.text}`;
      i += 2;
      out += sep + piece;
      prev = member;
      continue;
    } else if (t.kind === 'op' && t.text === '.' && next?.kind === 'id' && BATCH_METHODS[next.text] !== undefined && (toks[i + 2]?.text === '(' || BATCH_METHODS[next.text] === 'N')) {
      // batch reductions: x.mean() → / N_batch, x.sum() → x, x.numel() / x.size → N_batch
      const hasCall = toks[i + 2]?.text === '(';
      const close = hasCall ? matchClose(toks, i + 2) : i + 1;
      if (close > 0) {
        const kind = BATCH_METHODS[next.text]!;
        if (kind === 'N') {
          // x.numel(): the whole `x.numel()` is the batch size; drop the receiver already written
          out = dropLastOperand(out);
          out += (out === '' || out.endsWith(' ') || out.endsWith('(') ? '' : ' ') + BATCH_SYMBOL;
        } else if (kind === 'mean') out += ` / ${BATCH_SYMBOL}`;
        prev = toks[close];
        i = close;
        // x.shape[0] / x.size(0)
        if (toks[i + 1]?.text === '[') { const c2 = matchClose(toks, i + 1); if (c2 > 0) { prev = toks[c2]; i = c2; } }
        continue;
      }
    } else if (t.kind === 'id' && BATCH_CALLS[t.text] !== undefined && next?.text === '(' && (prev === undefined || prev.text !== '.' || /^(np|numpy|torch|jnp|tf|math)$/.test(toks[i - 2]?.text ?? ''))) {
      // np.mean(e) → (e) / N_batch, np.sum(e) → (e), len(x) → N_batch
      const close = matchClose(toks, i + 1);
      if (close > 0) {
        out = out.replace(/(np|numpy|torch|jnp|tf|math)\s?\.\s?$/, '');
        const inner = splitArgs(toks.slice(i + 2, close))[0] ?? [];
        const kind = BATCH_CALLS[t.text]!;
        const sp = out === '' || out.endsWith(' ') || out.endsWith('(') ? '' : ' ';
        if (kind === 'N') out += sp + BATCH_SYMBOL;
        else out += sp + `(${render(inner, env, ctx)})` + (kind === 'mean' ? ` / ${BATCH_SYMBOL}` : '');
        prev = toks[close];
        i = close;
        continue;
      }
    } else if (t.kind === 'op' && t.text === '.' && next?.kind === 'id' && DROP_METHODS.has(next.text) && toks[i + 2]?.text === '(' ) {
      // x.clone(), x.float(), y.astype(np.float32): drop the call
      const close = matchClose(toks, i + 2);
      if (close > 0) { i = close; continue; }
    } else if (t.kind === 'id' && t.text === 'if' && (ctx.dialect.family === 'c' || ctx.dialect.family === 'rust')) {
      // Kotlin `if (c) a else b`, Rust `if c { a } else { b }` used as expressions
      const r = ifExpression(toks, i, env, ctx);
      if (r) {
        out += sep + r.text;
        prev = toks[r.end];
        i = r.end;
        continue;
      }
    } else if (t.kind === 'id' && FILLS[t.text] !== undefined && next?.text === '(' && prev?.text !== 'def') {
      // ones(size(x)), np.ones_like(x), torch.zeros_like(x): the constant, element-wise
      const close = matchClose(toks, i + 1);
      if (close > 0) {
        out = out.replace(/(np|numpy|torch|jnp|tf|math)\s?\.\s?$/, '');
        out += (out.endsWith(' ') || out === '' ? '' : sep) + FILLS[t.text];
        prev = toks[close];
        i = close;
        continue;
      }
    } else if (t.kind === 'id' && (t.text === 'one' || t.text === 'zero' || t.text === 'oneunit') && next?.text === '(' && ctx.dialect.family === 'julia') {
      // Julia one(x) / zero(x): the constants 1 and 0 of x's type
      const close = matchClose(toks, i + 1);
      if (close > 0) {
        out += sep + (t.text === 'zero' ? '0' : '1');
        prev = toks[close];
        i = close;
        continue;
      }
    } else if (t.kind === 'id' && t.text === 'as' && next?.kind === 'id' && TYPE_WORDS.has(next.text)) {
      i += 1; // Rust `x as f32`
      continue;
    } else if (t.kind === 'op' && t.text === '(' && next?.kind === 'id' && TYPE_WORDS.has(next.text) && isCastParen(toks, i)) {
      // C cast (float)x
      const close = matchClose(toks, i);
      if (close > 0) { i = close; continue; }
    } else if (t.kind === 'id' && CASTS.has(t.text) && (next?.text === '(' || (next?.text === '<' && t.text === 'static_cast'))) {
      if (t.text === 'static_cast') {
        // static_cast<float>(x) → (x)
        let k = i + 1;
        while (k < n && toks[k]!.text !== '>') k++;
        i = k;
        continue;
      }
      if (ctx.dialect.family !== 'python' || t.text !== 'float' || true) {
        // float(x) → (x)
        prev = t;
        continue;
      }
    } else if (t.kind === 'id' && (prev === undefined || prev.text !== '.') && next?.text !== '=' ) {
      const v = env.get(t.text);
      if (v !== undefined && next?.text !== '(') piece = `(${v})`;
      // Probe with no arguments first (whether a call inlines depends only on the name): rendering the
      // arguments of every call and then the call again cost 2^depth (16 nested calls ≈ 0.5 s).
      else if (ctx.inline && next?.text === '(' && !(prev && prev.text === '.' ) && ctx.inline(t.text, []) !== undefined) {
        const close = matchClose(toks, i + 1);
        if (close > 0) {
          const args = splitArgs(toks.slice(i + 2, close)).map((a) => render(a, env, ctx));
          const inl = ctx.inline(t.text, args);
          if (inl !== undefined) {
            out += sep + `(${inl})`;
            prev = toks[close];
            i = close;
            continue;
          }
        }
      }
      // masked reads: x[x > 0], x(x <= 0) → x (the element under the mask)
      if ((next?.text === '[' || (next?.text === '(' && env.has(`@array:${t.text}`))) ) {
        const close = matchClose(toks, i + 1);
        if (close > 0 && isMask(toks.slice(i + 2, close))) {
          out += sep + piece;
          prev = toks[close];
          i = close;
          continue;
        }
      }
      // drop element indices: x[i] → x inside loops and kernels
      if (ctx.elementwise && next?.text === '[') {
        const close = matchClose(toks, i + 1);
        if (close > 0 && isSimpleIndex(toks.slice(i + 2, close), ctx.indexNames)) {
          out += sep + piece;
          prev = toks[close];
          i = close;
          continue;
        }
      }
      if (ctx.elementwise && next?.text === '(' && ctx.dialect.family === 'matlab' || (ctx.elementwise && next?.text === '(' && ctx.dialect.family === 'fortran')) {
        const close = matchClose(toks, i + 1);
        if (close > 0 && isSimpleIndex(toks.slice(i + 2, close), ctx.indexNames) && env.has(`@array:${t.text}`)) {
          out += sep + piece;
          prev = toks[close];
          i = close;
          continue;
        }
      }
      if (ctx.elementwise && prev?.text === '*' && prev.start === t.start - 1 && false) {
        // pointer deref handled by parser
      }
    } else if (t.kind === 'op' && t.text === ';') {
      break;
    }
    out += sep + piece;
    prev = t;
  }
  return out.replace(/\s+/g, ' ').trim();
}

function isCastParen(toks: Token[], i: number): boolean {
  const close = matchClose(toks, i);
  if (close < 0 || close - i > 4) return false;
  for (let k = i + 1; k < close; k++) {
    const t = toks[k]!;
    if (!(t.kind === 'id' && TYPE_WORDS.has(t.text)) && t.text !== '*') return false;
  }
  const after = toks[close + 1];
  return after !== undefined && (after.kind === 'id' || after.kind === 'num' || after.text === '(');
}

export function matchClose(toks: Token[], openAt: number): number {
  const open = toks[openAt]?.text;
  const close = open === '(' ? ')' : open === '[' ? ']' : open === '{' ? '}' : undefined;
  if (!close) return -1;
  let depth = 0;
  for (let k = openAt; k < toks.length; k++) {
    const x = toks[k]!.text;
    if (x === '(' || x === '[' || x === '{') depth++;
    else if (x === ')' || x === ']' || x === '}') {
      depth--;
      if (depth === 0) return x === close ? k : -1;
    }
  }
  return -1;
}

export function splitArgs(toks: Token[]): Token[][] {
  const out: Token[][] = [];
  let cur: Token[] = [];
  let depth = 0;
  for (const t of toks) {
    if (t.kind === 'nl') continue;
    if (t.text === '(' || t.text === '[' || t.text === '{') depth++;
    else if (t.text === ')' || t.text === ']' || t.text === '}') depth--;
    if (depth === 0 && t.text === ',') {
      out.push(cur);
      cur = [];
      continue;
    }
    cur.push(t);
  }
  if (cur.length > 0 || out.length > 0) out.push(cur);
  return out;
}

function isSimpleIndex(toks: Token[], indexNames: Set<string>): boolean {
  if (toks.length === 0 || toks.length > 9) return false;
  let sawIndex = false;
  for (const t of toks) {
    if (t.kind === 'id') {
      if (indexNames.has(t.text)) sawIndex = true;
      else return false;
    } else if (t.kind === 'num') continue;
    else if (t.kind === 'op' && (t.text === '+' || t.text === '-' || t.text === '*' || t.text === ':' || t.text === ',')) continue;
    else return false;
  }
  return sawIndex;
}

export interface Reduction {
  value?: string;
  /** Extra returned values (tuples): `return y, cache`. */
  tuple?: string[];
  /** Why it could not be reduced. */
  reason?: string;
}

export interface ReduceOptions {
  ctx: RenderContext;
  /** Variable holding the result when there is no return (MATLAB/Fortran output, void kernels' output array). */
  resultVar?: string;
  /** Budget of explored paths. */
  maxPaths?: number;
}

/**
 * Reduce a statement list to the expression it returns. Each `if` forks the remaining statements into
 * its branches (so early returns work), with at most `maxPaths` paths.
 */
export function reduce(stmts: Stmt[], env: Map<string, string>, opts: ReduceOptions): Reduction {
  const budget = { paths: opts.maxPaths ?? 64 };
  const r = execList(stmts, 0, new Map(env), opts, budget, undefined);
  return r;
}

function execList(
  stmts: Stmt[], from: number, env: Map<string, string>, opts: ReduceOptions, budget: { paths: number },
  rest: { stmts: Stmt[]; from: number }[] | undefined,
): Reduction {
  for (let i = from; i < stmts.length; i++) {
    const s = stmts[i]!;
    switch (s.k) {
      case 'assign': {
        if (s.target === '') break;
        let value = render(s.expr, env, opts.ctx);
        if (value === '') break;
        if (s.index && s.index.length > 0 && isMask(s.index)) {
          // y[x < 0] = v  →  y = (x < 0) ? v : y
          const cond = render(s.index, env, opts.ctx);
          const prevV = env.get(s.target) ?? s.target;
          env.set(s.target, `(${cond}) ? (${value}) : (${prevV})`);
          break;
        }
        if (s.op !== '=' && s.op !== ':=' && s.op !== '<-') {
          const prevV = env.get(s.target);
          if (prevV === undefined) return { reason: `accumulates into ${s.target}` };
          const bin = s.op.slice(0, -1);
          value = `(${prevV}) ${bin} (${value})`;
        }
        env.set(s.target, value);
        break;
      }
      case 'multi': {
        // (x,) = ctx.saved_tensors and the like: the names stay symbols.
        for (const t of s.targets) env.delete(t);
        break;
      }
      case 'return': {
        const parts = splitArgs(stripTupleParens(s.expr));
        if (parts.length > 1) {
          const vals = parts.map((p) => render(p, env, opts.ctx));
          return { value: vals[0], tuple: vals };
        }
        const v = render(s.expr, env, opts.ctx);
        if (v === '' && opts.resultVar) return { value: env.get(opts.resultVar) ?? undefined };
        return { value: v };
      }
      case 'if': {
        // A bounds guard (`if (i < n)` in a kernel) is not a piece of the formula: run its body.
        if (s.branches.length === 1 && s.branches[0]!.cond && isGuard(s.branches[0]!.cond, opts.ctx.indexNames)) {
          const r = execList([...s.branches[0]!.body, ...stmts.slice(i + 1)], 0, env, opts, budget, rest);
          return r;
        }
        budget.paths -= s.branches.length;
        if (budget.paths < 0) return { reason: 'too many branches' };
        const results: { cond: string | null; r: Reduction }[] = [];
        let hasElse = false;
        for (const b of s.branches) {
          if (b.cond === null) hasElse = true;
          const cond = b.cond ? render(b.cond, env, opts.ctx) : null;
          const r = execList([...b.body, ...stmts.slice(i + 1)], 0, new Map(env), opts, budget, rest);
          results.push({ cond, r });
        }
        if (!hasElse) {
          const r = execList(stmts, i + 1, new Map(env), opts, budget, rest);
          results.push({ cond: null, r });
        }
        let acc: string | undefined;
        for (let k = results.length - 1; k >= 0; k--) {
          const { cond, r } = results[k]!;
          if (r.value === undefined) return { reason: r.reason ?? 'a branch returns nothing' };
          acc = acc === undefined || cond === null ? r.value : `(${cond}) ? (${r.value}) : (${acc})`;
        }
        return { value: acc };
      }
      case 'loop': {
        // Element-wise loops are read as their scalar body.
        const r = execList(s.body, 0, env, opts, budget, undefined);
        if (r.value !== undefined) return r;
        if (r.reason) return r;
        break;
      }
      case 'expr': {
        if (opts.ctx.dialect.lastExpressionValue && i === stmts.length - 1) {
          return { value: render(s.expr, env, opts.ctx) };
        }
        break;
      }
      case 'other':
        break;
    }
  }
  if (opts.resultVar) {
    const v = env.get(opts.resultVar);
    if (v !== undefined) return { value: v };
  }
  return {};
}

function stripTupleParens(toks: Token[]): Token[] {
  if (toks[0]?.text === '(' && matchClose(toks, 0) === toks.length - 1) {
    const inner = toks.slice(1, -1);
    if (splitArgs(inner).length > 1 || inner[inner.length - 1]?.text === ',') return inner;
  }
  // `(expr,)` one-element tuple
  if (toks[toks.length - 1]?.text === ',') return toks.slice(0, -1);
  return toks;
}

function isMask(toks: Token[]): boolean {
  for (const t of toks) {
    if (t.kind === 'op' && ['<', '>', '<=', '>=', '==', '!=', '~=', '.gt.', '.lt.', '.ge.', '.le.'].includes(t.text)) return true;
  }
  return false;
}

const SIZE_NAMES = new Set(['n', 'N', 'size', 'len', 'length', 'numel', 'count', 'total', 'num', 'n_elements', 'nelem', 'numel_']);

/** A condition made only of index and size names, integers and comparisons (`i < n`, `idx >= size`). */
function isGuard(toks: Token[], indexNames: Set<string>): boolean {
  let sawCmp = false;
  for (const t of toks) {
    if (t.kind === 'id') {
      if (!indexNames.has(t.text) && !SIZE_NAMES.has(t.text)) return false;
    } else if (t.kind === 'num') continue;
    else if (t.kind === 'op' && ['<', '>', '<=', '>=', '&&', '||', '(', ')', '!=', '==', '.', '+', '-', '*'].includes(t.text)) {
      if (['<', '>', '<=', '>='].includes(t.text)) sawCmp = true;
    } else return false;
  }
  return sawCmp;
}

/** `if (c) a else b` / `if c { a } else { b }` starting at `at` → `((c) ? (a) : (b))` and the last token used. */
function ifExpression(toks: Token[], at: number, env: Map<string, string>, ctx: RenderContext): { text: string; end: number } | undefined {
  let k = at + 1;
  let cond: Token[];
  if (toks[k]?.text === '(') {
    const close = matchClose(toks, k);
    if (close < 0) return undefined;
    cond = toks.slice(k + 1, close);
    k = close + 1;
  } else {
    const start = k;
    while (k < toks.length && toks[k]!.text !== '{') k++;
    cond = toks.slice(start, k);
  }
  const part = (from: number): { toks: Token[]; end: number } | undefined => {
    if (toks[from]?.text === '{') {
      const close = matchClose(toks, from);
      if (close < 0) return undefined;
      return { toks: toks.slice(from + 1, close), end: close };
    }
    let depth = 0;
    let q = from;
    for (; q < toks.length; q++) {
      const x = toks[q]!.text;
      if (x === '(' || x === '[' || x === '{') depth++;
      else if (x === ')' || x === ']' || x === '}') { if (depth === 0) break; depth--; }
      else if (depth === 0 && (x === 'else' || x === ';')) break;
    }
    return { toks: toks.slice(from, q), end: q - 1 };
  };
  const a = part(k);
  if (!a || toks[a.end + 1]?.text !== 'else') return undefined;
  const elseAt = a.end + 1;
  if (toks[elseAt + 1]?.text === 'if') {
    const nested = ifExpression(toks, elseAt + 1, env, ctx);
    if (!nested) return undefined;
    return { text: `((${render(cond, env, ctx)}) ? (${render(a.toks, env, ctx)}) : ${nested.text})`, end: nested.end };
  }
  const b = part(elseAt + 1);
  if (!b || a.toks.length === 0 || b.toks.length === 0) return undefined;
  return { text: `((${render(cond, env, ctx)}) ? (${render(a.toks, env, ctx)}) : (${render(b.toks, env, ctx)}))`, end: b.end };
}
