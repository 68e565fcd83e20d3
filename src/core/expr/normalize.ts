/**
 * Parsed (whitelisted) tree → canonical tree: dialect function names resolved, catalogue functions
 * expanded to their definitions, pow/where/ifelse/merge/clamp/clip/square/log10… rewritten into stock
 * mathjs, parentheses dropped, e^u written exp(u). The result contains only stock functions.
 */
import type { MathNode } from 'mathjs';
import { SlopewiseError } from '../errors';
import { math } from '../math';
import { SPECIAL_FUNCTIONS, STOCK_FUNCTIONS, allKnownFunctionNames, resolveAlias, suggest } from './aliases';
import type { CatalogueEntry } from './catalogue';
import { catalogueNames, lookupFunction } from './catalogue';
import { args, children, cond, div, fn, fnName, isSym, mul, num, op, pow, rebuild, substitute, sym, symName, tidy } from './nodes';
import type { Locator } from './whitelist';

export const OMITTED = '__omitted';

/** Greek parameter names: `alpha(…)` is a product, never a call. */
const IMPLICIT_PRODUCT_NAMES = new Set([
  'alpha', 'beta', 'gamma', 'delta', 'epsilon', 'zeta', 'eta', 'theta', 'kappa', 'lambda', 'mu', 'nu', 'xi',
  'rho', 'tau', 'chi', 'psi', 'omega',
]);

export interface NormalizeContext {
  locate: Locator;
  notes: Set<string>;
  /** Symbols passed in a catalogue parameter slot → that slot's default. */
  paramDefaults: Map<string, { value: number; source: string }>;
  /** Catalogue entries used. */
  used: Set<string>;
  /** Namespace prefixes seen before calls ("jax.nn.gelu"), for library-specific defaults. */
  prefixes: readonly string[];
}

const definitionCache = new Map<string, MathNode>();

function definition(entry: CatalogueEntry): MathNode {
  let d = definitionCache.get(entry.name);
  if (!d) {
    d = tidy(math.parse(entry.definition));
    definitionCache.set(entry.name, d);
  }
  return d;
}

function arityError(name: string, min: number, max: number, got: number, ctx: NormalizeContext): never {
  const want = min === max ? `${min}` : max >= 16 ? `at least ${min}` : `${min} to ${max}`;
  throw new SlopewiseError('bad-argument', `${name}() takes ${want} argument${min === 1 && max === 1 ? '' : 's'}, got ${got}`, ctx.locate(name, true));
}

function omitted(n: MathNode): boolean {
  return isSym(n, OMITTED);
}

function libraryDefault(entry: CatalogueEntry, param: string, ctx: NormalizeContext): { value: number; source: string } | undefined {
  const p = entry.params.find((q) => q.name === param);
  if (p?.default === undefined) return undefined;
  // tf.nn.leaky_relu defaults to alpha = 0.2 (TensorFlow API, from memory).
  if (entry.name === 'leaky_relu' && ctx.prefixes.some((q) => q.startsWith('tf.') && q.endsWith('leaky_relu'))) {
    return { value: 0.2, source: 'tf.nn.leaky_relu default alpha = 0.2' };
  }
  return { value: p.default, source: p.source ?? 'default' };
}

function expandCatalogue(entry: CatalogueEntry, name: string, callArgs: MathNode[], ctx: NormalizeContext): MathNode {
  const nVars = entry.args.length;
  const max = nVars + entry.params.length;
  if (callArgs.length < nVars || callArgs.length > max) arityError(name, nVars, max, callArgs.length, ctx);
  const map = new Map<string, MathNode>();
  entry.args.forEach((a, k) => {
    const v = callArgs[k] as MathNode;
    if (omitted(v)) throw new SlopewiseError('bad-argument', `${name}() needs its argument ${a}`, ctx.locate(name, true));
    map.set(a, v);
  });
  entry.params.forEach((p, k) => {
    const given = callArgs[nVars + k];
    if (given !== undefined && !omitted(given)) {
      map.set(p.name, given);
      // A symbol in a parameter slot inherits the slot's default unless bound by the user.
      if (given.type === 'SymbolNode') {
        const d = libraryDefault(entry, p.name, ctx);
        if (d) ctx.paramDefaults.set(symName(given), { value: d.value, source: `${entry.name} ${p.name}: ${d.source}` });
      }
      return;
    }
    const d = libraryDefault(entry, p.name, ctx);
    if (d === undefined) throw new SlopewiseError('bad-argument', `${name}() needs its parameter ${p.name}`, ctx.locate(name, true));
    map.set(p.name, num(d.value));
    ctx.notes.add(`${entry.name}: ${p.name} = ${d.value} (${d.source})`);
  });
  if (entry.variant) ctx.notes.add(`${entry.name}: ${entry.variant}`);
  ctx.used.add(entry.name);
  return tidy(substitute(definition(entry), map));
}

/** Rewrites of SPECIAL_FUNCTIONS into stock mathjs. */
function special(name: string, a: MathNode[], ctx: NormalizeContext, written: string): MathNode {
  const need = (min: number, max: number): void => {
    if (a.length < min || a.length > max) arityError(written, min, max, a.length, ctx);
  };
  const [a0, a1, a2] = a as [MathNode, MathNode, MathNode];
  switch (name) {
    case 'pow': need(2, 2); return pow(a0, a1);
    case 'square': need(1, 1); return pow(a0, num(2));
    case 'cube': need(1, 1); return pow(a0, num(3));
    case 'rsqrt': need(1, 1); return div(num(1), fn('sqrt', [a0]));
    case 'reciprocal': need(1, 1); return div(num(1), a0);
    case 'log10': need(1, 1); return div(fn('log', [a0]), fn('log', [num(10)]));
    case 'log2': need(1, 1); return div(fn('log', [a0]), fn('log', [num(2)]));
    case 'exp2': need(1, 1); return pow(num(2), a0);
    case 'erfc': need(1, 1); return op('subtract', [num(1), fn('erf', [a0])]);
    case 'neg': need(1, 1); return op('unaryMinus', [a0]);
    case 'plus': need(2, 2); return op('add', [a0, a1]);
    case 'minus': need(2, 2); return op('subtract', [a0, a1]);
    case 'times': need(2, 2); return op('multiply', [a0, a1]);
    case 'over': need(2, 2); return op('divide', [a0, a1]);
    // fma(a, b, c) = a·b + c (C, CUDA, Rust a.mul_add(b, c))
    case 'fma': need(3, 3); return op('add', [op('multiply', [a0, a1]), a2]);
    // CUDA __saturatef(x) = clamp(x, 0, 1)
    case 'saturate': need(1, 1); return fn('min', [fn('max', [a0, num(0)]), num(1)]);
    case 'where': case 'ifelse': need(3, 3); return cond(a0, a1, a2);
    // Fortran merge(tsource, fsource, mask)
    case 'merge': need(3, 3); return cond(a2, a0, a1);
    case 'clamp_min': need(2, 2); return fn('max', [a0, a1]);
    case 'clamp_max': need(2, 2); return fn('min', [a0, a1]);
    case 'clamp': case 'clip': {
      need(2, 3);
      const lo = a1;
      const hi = a2;
      let out = a0;
      if (lo !== undefined && !omitted(lo)) out = fn('max', [out, lo]);
      if (hi !== undefined && !omitted(hi)) out = fn('min', [out, hi]);
      if (out === a0) throw new SlopewiseError('bad-argument', `${written}() needs a lower or an upper bound`, ctx.locate(written, true));
      return out;
    }
    default:
      throw new Error(`internal: no rewrite for ${name}`);
  }
}

/** Bottom-up canonicalisation. */
export function normalize(node: MathNode, ctx: NormalizeContext): MathNode {
  const n = node.type === 'ParenthesisNode' ? (node as unknown as { content: MathNode }).content : node;
  if (n.type === 'ParenthesisNode') return normalize(n, ctx);
  if (n.type === 'ConstantNode') return n;
  if (n.type === 'SymbolNode') {
    const s = symName(n);
    if (s === 'Infinity' || s === 'pi' || s === 'e') return n;
    return n;
  }
  if (n.type === 'FunctionNode') {
    const written = fnName(n);
    const kids = args(n).map((k) => normalize(k, ctx));
    const name = resolveAlias(written);
    if (name === 'gelu' && ctx.prefixes.some((p) => p.startsWith('jax.') && p.endsWith('.gelu'))) {
      // jax.nn.gelu defaults to approximate=True (JAX API, from memory).
      ctx.notes.add('jax.nn.gelu defaults to the tanh approximation (approximate=True)');
      return normalize(fn('gelu_tanh', kids), ctx);
    }
    const stock = STOCK_FUNCTIONS[name];
    if (stock) {
      for (const k of kids) if (omitted(k)) throw new SlopewiseError('bad-argument', `${written}() does not take keyword arguments`, ctx.locate(written, true));
      if (kids.length < stock[0] || kids.length > stock[1]) arityError(written, stock[0], stock[1], kids.length, ctx);
      if (name === 'log' && kids.length === 2) return div(fn('log', [kids[0] as MathNode]), fn('log', [kids[1] as MathNode]));
      if ((name === 'max' || name === 'min') && kids.length > 2) return kids.slice(1).reduce((acc, k) => fn(name, [acc, k]), kids[0] as MathNode);
      return fn(name, kids);
    }
    if (SPECIAL_FUNCTIONS.has(name)) return tidy(special(name, kids, ctx, written));
    const entry = lookupFunction(name) ?? lookupFunction(written);
    if (entry) return expandCatalogue(entry, written, kids, ctx);
    // α(eˣ − 1), k(x + 1): a parameter-like name before brackets is a product, as in maths notation.
    if (kids.length === 1 && (written.length === 1 || IMPLICIT_PRODUCT_NAMES.has(written)) && !(lookupFunction(written))) {
      ctx.notes.add(`Read ${written}(…) as the product ${written}·(…)`);
      return mul(sym(written), kids[0] as MathNode);
    }
    const hint = suggest(written, allKnownFunctionNames(catalogueNames()));
    if (name === 'softmax' || name === 'log_softmax' || name === 'logsoftmax') {
      throw new SlopewiseError('unknown-function', `${written} is a vector function; the engine reads scalar formulas`, ctx.locate(written, true));
    }
    throw new SlopewiseError('unknown-function', `Unknown function '${written}'${hint ? ` — did you mean ${hint}?` : ''}`, ctx.locate(written, true));
  }
  if (n.type === 'OperatorNode') {
    const kids = args(n).map((k) => normalize(k, ctx));
    for (const k of kids) if (omitted(k)) throw new SlopewiseError('bad-argument', 'An omitted argument cannot be used in arithmetic', undefined);
    const f = (n as unknown as { fn: string }).fn;
    // e^u → exp(u)
    if (f === 'pow' && isSym(kids[0] as MathNode, 'e')) return fn('exp', [kids[1] as MathNode]);
    if (f === 'unaryPlus') return kids[0] as MathNode;
    return rebuild(n, kids);
  }
  if (n.type === 'ConditionalNode') {
    return rebuild(n, children(n).map((k) => normalize(k, ctx)));
  }
  throw new SlopewiseError('not-allowed', `${n.type} is not allowed in a formula`);
}


const BOOLEAN_OPS = new Set(['smaller', 'smallerEq', 'larger', 'largerEq', 'equal', 'unequal', 'and', 'or', 'not']);
const LOGIC_OPS = new Set(['and', 'or', 'not']);

/**
 * Comparisons used as numbers (`x * (x > 0)`, MATLAB/NumPy style) become `(x > 0 ? 1 : 0)`, so every
 * canonical expression evaluates to a number in stock mathjs, never to a boolean.
 */
export function booleansAsNumbers(node: MathNode, context: 'value' | 'condition' = 'value'): MathNode {
  if (node.type === 'ConditionalNode') {
    const [c, a, b] = children(node) as [MathNode, MathNode, MathNode];
    return cond(booleansAsNumbers(c, 'condition'), booleansAsNumbers(a), booleansAsNumbers(b));
  }
  if (node.type === 'OperatorNode' && BOOLEAN_OPS.has((node as unknown as { fn: string }).fn)) {
    const f = (node as unknown as { fn: string }).fn;
    const kids = args(node).map((k) => booleansAsNumbers(k, LOGIC_OPS.has(f) ? 'condition' : 'value'));
    const rebuilt = op(f, kids);
    return context === 'condition' ? rebuilt : cond(rebuilt, num(1), num(0));
  }
  const kids = children(node);
  if (kids.length === 0) return node;
  return rebuild(node, kids.map((k) => booleansAsNumbers(k)));
}
