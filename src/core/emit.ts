/**
 * Source code from a canonical tree, in the languages practitioners write activations in.
 *
 * `emitCode(node, language)` returns one expression; `emitFunction(name, node, variable, language)`
 * a whole function definition. Conditionals become the language's own form (ternary, `where`,
 * if-expression); named constants and bound parameters become numeric literals of the language's
 * float type. Only whitelisted node types and functions are accepted; anything else is a
 * `SlopewiseError` naming what the language lacks.
 */
import type { MathNode } from 'mathjs';
import { SlopewiseError } from './errors';
import type { Language } from './types';

export const EMIT_LANGUAGES = [
  'python', 'numpy', 'pytorch', 'c', 'cpp', 'cuda', 'javascript', 'typescript', 'rust', 'julia', 'go', 'java',
] as const;
export type EmitLanguage = (typeof EMIT_LANGUAGES)[number];

export interface EmitOptions {
  /** Values substituted for symbols (bound parameters). */
  params?: Record<string, number>;
}

/** The code generator for a core dialect; Python picks NumPy or PyTorch when the file uses them. */
export function emitLanguageFor(language: Language | string | undefined, fileText?: string): EmitLanguage | undefined {
  switch (language) {
    case 'python':
      return fileText ? pythonFlavour(fileText) : 'python';
    case 'c': case 'cpp': case 'cuda': case 'javascript': case 'typescript': case 'rust': case 'julia': case 'go': case 'java':
    case 'numpy': case 'pytorch':
      return language;
    case 'kotlin':
      return undefined;
    default:
      return undefined;
  }
}

/**
 * NumPy or PyTorch by the file's imports. A check asks once per finding with the same text: the
 * last answer is kept (comparing the same string object again is O(1)).
 */
function pythonFlavour(fileText: string): EmitLanguage {
  if (fileText === lastFlavour.text) return lastFlavour.flavour;
  const flavour: EmitLanguage = /\bimport torch\b|\bfrom torch\b/.test(fileText) ? 'pytorch'
    : /\bimport numpy\b|\bfrom numpy\b/.test(fileText) ? 'numpy' : 'python';
  lastFlavour = { text: fileText, flavour };
  return flavour;
}
let lastFlavour: { text: string; flavour: EmitLanguage } = { text: '', flavour: 'python' };

export function commentPrefix(language: EmitLanguage): string {
  return language === 'python' || language === 'numpy' || language === 'pytorch' || language === 'julia' ? '#' : '//';
}

// Precedence levels (higher binds tighter).
const P = { cond: 1, or: 2, and: 3, cmp: 4, add: 5, mul: 6, unary: 7, pow: 8, atom: 10 } as const;

interface Out {
  code: string;
  prec: number;
  /** Literal value, when the expression is a plain number (for PyTorch's clamp, Rust's powi…). */
  literal?: number;
}

type Style = {
  float(v: number): string;
  func(name: string, args: Out[], node: MathNode): Out;
  pow(a: Out, b: Out): Out;
  cond(c: Out, a: Out, b: Out): Out;
  constant(name: 'pi' | 'e'): string;
  and: string;
  or: string;
  not: string;
  eq: string;
  ne: string;
  /** Precedence of and/or when they are bitwise operators binding tighter than comparisons (NumPy, PyTorch). */
  logicPrec?: { and: number; or: number };
};

const wrap = (o: Out, min: number): string => (o.prec < min ? `(${o.code})` : o.code);
const call = (name: string, args: Out[]): Out => ({ code: `${name}(${args.map((a) => a.code).join(', ')})`, prec: P.atom });

function floatDot(v: number): string {
  if (!Number.isFinite(v)) throw new SlopewiseError('not-allowed', `cannot write ${v} as a literal`);
  let s = String(Math.abs(v));
  if (!/[.eE]/.test(s)) s += '.0';
  else if (/^\d+e/.test(s)) s = s.replace('e', '.0e');
  return s;
}

function unsupported(fn: string, language: EmitLanguage): never {
  throw new SlopewiseError('not-allowed', `${fn}() has no standard-library equivalent in ${language}`);
}

function arity(name: string, args: Out[], n: number): void {
  if (args.length !== n) throw new SlopewiseError('bad-argument', `${name} expects ${n} argument${n === 1 ? '' : 's'}, got ${args.length}`);
}

/** Functions that map one-to-one onto a name per family. */
const SIMPLE = ['exp', 'log', 'log1p', 'expm1', 'sqrt', 'cbrt', 'abs', 'sin', 'cos', 'tan', 'sinh', 'cosh', 'tanh',
  'asinh', 'atan', 'erf', 'sign', 'floor', 'ceil'];

function cStyle(language: 'c' | 'cuda' | 'cpp'): Style {
  const f = (v: number): string => `${floatDot(v)}f`;
  const names: Record<string, string> = language === 'cpp'
    ? Object.fromEntries(SIMPLE.map((n) => [n, `std::${n === 'abs' ? 'fabs' : n}`]))
    : Object.fromEntries(SIMPLE.map((n) => [n, `${n === 'abs' ? 'fabs' : n}f`]));
  return {
    float: f,
    func(name, args) {
      if (name === 'sign') {
        arity(name, args, 1);
        const x = wrap(args[0]!, P.cmp + 1);
        return { code: `(float)((${x} > 0.0f) - (${x} < 0.0f))`, prec: P.unary };
      }
      if (name === 'sech') { arity(name, args, 1); return { code: `1.0f / ${call(names.cosh!, args).code}`, prec: P.mul }; }
      if (name === 'max' || name === 'min') return fold(args, (a, b) => call(language === 'cpp' ? `std::f${name}` : `f${name}f`, [a, b]));
      if (name === 'pow') { arity(name, args, 2); return call(language === 'cpp' ? 'std::pow' : 'powf', args); }
      const n = names[name];
      if (!n) throw new SlopewiseError('not-allowed', `function ${name} is not supported by the code generator`);
      return call(n, args);
    },
    pow: (a, b) => (b.literal === 2 ? { code: `${wrap(a, P.unary)} * ${wrap(a, P.unary)}`, prec: P.mul }
      : call(language === 'cpp' ? 'std::pow' : 'powf', [a, b])),
    cond: (c, a, b) => ({ code: `${wrap(c, P.or)} ? ${wrap(a, P.or)} : ${wrap(b, P.cond)}`, prec: P.cond }),
    constant: (name) => f(name === 'pi' ? Math.PI : Math.E),
    and: ' && ', or: ' || ', not: '!', eq: ' == ', ne: ' != ',
  };
}

function fold(args: Out[], f: (a: Out, b: Out) => Out): Out {
  if (args.length === 0) throw new SlopewiseError('bad-argument', 'max/min need at least one argument');
  return args.slice(1).reduce(f, args[0]!);
}

function pythonStyle(flavour: 'python' | 'numpy' | 'pytorch'): Style {
  const mod = flavour === 'python' ? 'math' : flavour === 'numpy' ? 'np' : 'torch';
  return {
    float: floatDot,
    func(name, args) {
      if (name === 'sign') {
        arity(name, args, 1);
        if (flavour === 'python') {
          const x = wrap(args[0]!, P.cmp + 1);
          return { code: `float((${x} > 0) - (${x} < 0))`, prec: P.atom };
        }
        return call(`${mod}.sign`, args);
      }
      if (name === 'abs') return call(flavour === 'python' ? 'abs' : `${mod}.abs`, args);
      if (name === 'sech') { arity(name, args, 1); return { code: `1.0 / ${mod}.cosh(${args[0]!.code})`, prec: P.mul }; }
      if (name === 'erf' && flavour === 'numpy') return call('scipy.special.erf', args);
      if (name === 'cbrt' && flavour === 'python') return { code: `${mod}.copysign(abs(${args[0]!.code}) ** (1.0 / 3.0), ${args[0]!.code})`, prec: P.atom };
      if (name === 'max' || name === 'min') {
        if (flavour === 'python') return call(name, args);
        if (flavour === 'numpy') return fold(args, (a, b) => call(`np.${name}imum`, [a, b]));
        // torch.maximum wants two tensors; a bound against a number is a clamp.
        return fold(args, (a, b) => {
          const bound = b.literal !== undefined ? [a, b] : a.literal !== undefined ? [b, a] : undefined;
          // max(x, c) = clamp(x, min=c); min(x, c) = clamp(x, max=c).
          const kw = name === 'max' ? 'min' : 'max';
          return bound ? { code: `torch.clamp(${bound[0]!.code}, ${kw}=${bound[1]!.code})`, prec: P.atom } : call(`torch.${name}imum`, [a, b]);
        });
      }
      if (name === 'pow') { arity(name, args, 2); return { code: `${wrap(args[0]!, P.atom)} ** ${wrap(args[1]!, P.unary)}`, prec: P.pow }; }
      if (!SIMPLE.includes(name)) throw new SlopewiseError('not-allowed', `function ${name} is not supported by the code generator`);
      return call(`${mod}.${name}`, args);
    },
    pow: (a, b) => ({ code: `${wrap(a, P.atom)} ** ${wrap(b, P.unary)}`, prec: P.pow }),
    cond: (c, a, b) => (flavour === 'python'
      ? { code: `${wrap(a, P.or)} if ${wrap(c, P.or)} else ${wrap(b, P.cond)}`, prec: P.cond }
      : call(`${mod}.where`, [c, a, b])),
    constant: (name) => `${flavour === 'pytorch' ? 'math' : mod}.${name}`,
    and: flavour === 'python' ? ' and ' : ' & ', or: flavour === 'python' ? ' or ' : ' | ', not: flavour === 'python' ? 'not ' : '~',
    eq: ' == ', ne: ' != ',
    // Python's & and | bind tighter than comparisons: (x > 0) & (x < 1).
    ...(flavour === 'python' ? {} : { logicPrec: { and: P.cmp + 0.5, or: P.cmp + 0.25 } }),
  };
}

function jsStyle(): Style {
  return {
    float: (v) => String(Math.abs(v)),
    func(name, args) {
      if (name === 'sech') { arity(name, args, 1); return { code: `1 / Math.cosh(${args[0]!.code})`, prec: P.mul }; }
      if (name === 'erf') unsupported(name, 'javascript');
      if (name === 'max' || name === 'min' || name === 'pow' || SIMPLE.includes(name)) return call(`Math.${name}`, args);
      throw new SlopewiseError('not-allowed', `function ${name} is not supported by the code generator`);
    },
    pow: (a, b) => ({ code: `${wrap(a, P.atom)} ** ${wrap(b, P.unary)}`, prec: P.pow }),
    cond: (c, a, b) => ({ code: `${wrap(c, P.or)} ? ${wrap(a, P.or)} : ${wrap(b, P.cond)}`, prec: P.cond }),
    constant: (name) => (name === 'pi' ? 'Math.PI' : 'Math.E'),
    and: ' && ', or: ' || ', not: '!', eq: ' === ', ne: ' !== ',
  };
}

function rustStyle(): Style {
  const method = (recv: Out, m: string, args: Out[] = []): Out =>
    ({ code: `${wrap(recv, P.atom)}.${m}(${args.map((a) => a.code).join(', ')})`, prec: P.atom });
  const M: Record<string, string> = { exp: 'exp', log: 'ln', log1p: 'ln_1p', expm1: 'exp_m1', sqrt: 'sqrt', cbrt: 'cbrt',
    abs: 'abs', sin: 'sin', cos: 'cos', tan: 'tan', sinh: 'sinh', cosh: 'cosh', tanh: 'tanh', asinh: 'asinh', atan: 'atan',
    sign: 'signum', floor: 'floor', ceil: 'ceil' };
  return {
    // A typed literal keeps method calls on constants unambiguous (`2.0_f32.exp()`).
    float: (v) => `${floatDot(v)}_f32`,
    func(name, args) {
      if (name === 'erf') unsupported(name, 'rust');
      if (name === 'sech') { arity(name, args, 1); return { code: `1.0_f32 / ${method(args[0]!, 'cosh').code}`, prec: P.mul }; }
      if (name === 'max' || name === 'min') return fold(args, (a, b) => method(a, name, [b]));
      if (name === 'pow') { arity(name, args, 2); return method(args[0]!, 'powf', [args[1]!]); }
      const m = M[name];
      if (!m) throw new SlopewiseError('not-allowed', `function ${name} is not supported by the code generator`);
      arity(name, args, 1);
      return method(args[0]!, m);
    },
    pow: (a, b) => (b.literal !== undefined && Number.isInteger(b.literal) && Math.abs(b.literal) < 64
      ? method(a, 'powi', [{ code: String(b.literal), prec: P.atom }]) : method(a, 'powf', [b])),
    cond: (c, a, b) => ({ code: `if ${c.code} { ${a.code} } else { ${b.code} }`, prec: P.cond }),
    constant: (name) => (name === 'pi' ? 'std::f32::consts::PI' : 'std::f32::consts::E'),
    and: ' && ', or: ' || ', not: '!', eq: ' == ', ne: ' != ',
  };
}

function juliaStyle(): Style {
  return {
    float: floatDot,
    func(name, args) {
      if (name === 'pow') { arity(name, args, 2); return { code: `${wrap(args[0]!, P.atom)}^${wrap(args[1]!, P.atom)}`, prec: P.pow }; }
      if (name === 'max' || name === 'min' || name === 'sech' || SIMPLE.includes(name)) return call(name, args);
      throw new SlopewiseError('not-allowed', `function ${name} is not supported by the code generator`);
    },
    pow: (a, b) => ({ code: `${wrap(a, P.atom)}^${wrap(b, P.atom)}`, prec: P.pow }),
    cond: (c, a, b) => ({ code: `${wrap(c, P.or)} ? ${wrap(a, P.or)} : ${wrap(b, P.cond)}`, prec: P.cond }),
    constant: (name) => (name === 'pi' ? 'π' : 'ℯ'),
    and: ' && ', or: ' || ', not: '!', eq: ' == ', ne: ' != ',
  };
}

function goStyle(): Style {
  const G: Record<string, string> = { exp: 'Exp', log: 'Log', log1p: 'Log1p', expm1: 'Expm1', sqrt: 'Sqrt', cbrt: 'Cbrt',
    abs: 'Abs', sin: 'Sin', cos: 'Cos', tan: 'Tan', sinh: 'Sinh', cosh: 'Cosh', tanh: 'Tanh', asinh: 'Asinh', atan: 'Atan',
    erf: 'Erf', floor: 'Floor', ceil: 'Ceil', pow: 'Pow' };
  return {
    float: floatDot,
    func(name, args) {
      if (name === 'sign') {
        arity(name, args, 1);
        return { code: `func() float64 { if ${args[0]!.code} > 0 { return 1 } else if ${args[0]!.code} < 0 { return -1 }; return 0 }()`, prec: P.atom };
      }
      if (name === 'sech') { arity(name, args, 1); return { code: `1.0 / math.Cosh(${args[0]!.code})`, prec: P.mul }; }
      if (name === 'max' || name === 'min') return fold(args, (a, b) => call(`math.${name === 'max' ? 'Max' : 'Min'}`, [a, b]));
      const g = G[name];
      if (!g) throw new SlopewiseError('not-allowed', `function ${name} is not supported by the code generator`);
      return call(`math.${g}`, args);
    },
    pow: (a, b) => call('math.Pow', [a, b]),
    // Go has no conditional expression: an immediately called function literal is the idiom.
    cond: (c, a, b) => ({ code: `func() float64 { if ${c.code} { return ${a.code} }; return ${b.code} }()`, prec: P.atom }),
    constant: (name) => (name === 'pi' ? 'math.Pi' : 'math.E'),
    and: ' && ', or: ' || ', not: '!', eq: ' == ', ne: ' != ',
  };
}

function javaStyle(): Style {
  return {
    float: floatDot,
    func(name, args) {
      if (name === 'erf') unsupported(name, 'java');
      if (name === 'sech') { arity(name, args, 1); return { code: `1.0 / Math.cosh(${args[0]!.code})`, prec: P.mul }; }
      if (name === 'sign') return call('Math.signum', args);
      if (name === 'asinh') unsupported(name, 'java');
      if (name === 'max' || name === 'min') return fold(args, (a, b) => call(`Math.${name}`, [a, b]));
      if (name === 'pow' || SIMPLE.includes(name)) return call(`Math.${name}`, args);
      throw new SlopewiseError('not-allowed', `function ${name} is not supported by the code generator`);
    },
    pow: (a, b) => call('Math.pow', [a, b]),
    cond: (c, a, b) => ({ code: `${wrap(c, P.or)} ? ${wrap(a, P.or)} : ${wrap(b, P.cond)}`, prec: P.cond }),
    constant: (name) => (name === 'pi' ? 'Math.PI' : 'Math.E'),
    and: ' && ', or: ' || ', not: '!', eq: ' == ', ne: ' != ',
  };
}

function styleFor(language: EmitLanguage): Style {
  switch (language) {
    case 'python': case 'numpy': case 'pytorch': return pythonStyle(language);
    case 'c': case 'cuda': case 'cpp': return cStyle(language);
    case 'javascript': case 'typescript': return jsStyle();
    case 'rust': return rustStyle();
    case 'julia': return juliaStyle();
    case 'go': return goStyle();
    case 'java': return javaStyle();
  }
}

interface AnyNode {
  type: string;
  value?: unknown;
  name?: string;
  op?: string;
  fn?: string | { name?: string };
  args?: AnyNode[];
  content?: AnyNode;
  condition?: AnyNode;
  trueExpr?: AnyNode;
  falseExpr?: AnyNode;
}

const BIN: Record<string, { op: string; prec: number; key?: 'and' | 'or' | 'eq' | 'ne' }> = {
  add: { op: ' + ', prec: P.add }, subtract: { op: ' - ', prec: P.add },
  multiply: { op: ' * ', prec: P.mul }, dotMultiply: { op: ' * ', prec: P.mul },
  divide: { op: ' / ', prec: P.mul }, dotDivide: { op: ' / ', prec: P.mul },
  smaller: { op: ' < ', prec: P.cmp }, smallerEq: { op: ' <= ', prec: P.cmp },
  larger: { op: ' > ', prec: P.cmp }, largerEq: { op: ' >= ', prec: P.cmp },
  equal: { op: '', prec: P.cmp, key: 'eq' }, unequal: { op: '', prec: P.cmp, key: 'ne' },
  and: { op: '', prec: P.and, key: 'and' }, or: { op: '', prec: P.or, key: 'or' },
};

/** One expression in `language` computing `node`. */
export function emitCode(node: MathNode, language: EmitLanguage, opts: EmitOptions = {}): string {
  return emitNode(node as unknown as AnyNode, styleFor(language), opts.params ?? {}, 0).code;
}

function emitNode(n: AnyNode, s: Style, params: Record<string, number>, depth: number): Out {
  if (depth > 200) throw new SlopewiseError('too-deep', 'expression too deeply nested to emit');
  const rec = (c: AnyNode | undefined): Out => {
    if (!c) throw new SlopewiseError('syntax', 'malformed expression tree');
    return emitNode(c, s, params, depth + 1);
  };
  const lit = (v: number): Out => {
    const code = s.float(v);
    return v < 0 || Object.is(v, -0) ? { code: `-${code}`, prec: P.unary, literal: v } : { code, prec: P.atom, literal: v };
  };
  switch (n.type) {
    case 'ConstantNode': {
      if (typeof n.value !== 'number') throw new SlopewiseError('not-allowed', `constant ${String(n.value)} is not a number`);
      return lit(n.value);
    }
    case 'SymbolNode': {
      const name = n.name ?? '';
      if (Object.prototype.hasOwnProperty.call(params, name)) return lit(params[name]!);
      if (name === 'pi' || name === 'PI') return { code: s.constant('pi'), prec: P.atom, literal: Math.PI };
      if (name === 'e' || name === 'E') return { code: s.constant('e'), prec: P.atom, literal: Math.E };
      if (!/^[\p{L}_][\p{L}\p{N}_]*$/u.test(name)) throw new SlopewiseError('not-allowed', `symbol ${name} is not an identifier`);
      return { code: name, prec: P.atom };
    }
    case 'ParenthesisNode':
      return rec(n.content);
    case 'ConditionalNode':
      return s.cond(rec(n.condition), rec(n.trueExpr), rec(n.falseExpr));
    case 'FunctionNode': {
      const name = typeof n.fn === 'string' ? n.fn : n.fn?.name ?? '';
      return s.func(name, (n.args ?? []).map(rec), n as unknown as MathNode);
    }
    case 'OperatorNode': {
      const args = n.args ?? [];
      const fn = typeof n.fn === 'string' ? n.fn : '';
      if (args.length === 1) {
        const a = rec(args[0]);
        if (fn === 'unaryPlus') return a;
        if (fn === 'unaryMinus') {
          if (a.literal !== undefined && a.prec === P.atom && /^[\d.]/.test(a.code)) return lit(-a.literal);
          // -(x ** 2), never -x ** 2: a syntax error in JavaScript and easy to misread elsewhere.
          return { code: `-${a.prec === P.pow ? `(${a.code})` : wrap(a, P.unary)}`, prec: P.unary };
        }
        if (fn === 'not') return { code: `${s.not}${wrap(a, P.unary)}`, prec: P.unary };
        throw new SlopewiseError('not-allowed', `operator ${n.op ?? fn} is not supported by the code generator`);
      }
      if (args.length !== 2) throw new SlopewiseError('not-allowed', `operator ${n.op ?? fn} with ${args.length} operands`);
      const a = rec(args[0]);
      const b = rec(args[1]);
      if (fn === 'pow' || fn === 'dotPow') {
        // Base: a unary minus binds looser than ^, so (-x)^2 keeps its parentheses everywhere.
        const base = a.prec <= P.unary ? { code: `(${a.code})`, prec: P.atom, ...(a.literal !== undefined ? { literal: a.literal } : {}) } : a;
        return s.pow(base, b);
      }
      const bin = BIN[fn];
      if (!bin) throw new SlopewiseError('not-allowed', `operator ${n.op ?? fn} is not supported by the code generator`);
      const op = bin.key ? (bin.key === 'and' ? s.and : bin.key === 'or' ? s.or : bin.key === 'eq' ? s.eq : s.ne) : bin.op;
      const prec = bin.key === 'and' || bin.key === 'or' ? s.logicPrec?.[bin.key] ?? bin.prec : bin.prec;
      // Left-associative: the right operand needs parentheses at equal precedence (a - (b - c)).
      return { code: `${wrap(a, prec)}${op}${wrap(b, prec + 1)}`, prec };
    }
    default:
      throw new SlopewiseError('not-allowed', `${n.type} is not supported by the code generator`);
  }
}

/** Symbols of the tree that are neither the variable, bound parameters nor named constants. */
function freeSymbols(n: AnyNode, variable: string, params: Record<string, number>, out = new Set<string>()): Set<string> {
  if (n.type === 'SymbolNode' && n.name && n.name !== variable && !(n.name in params)
      && !['pi', 'PI', 'e', 'E'].includes(n.name)) out.add(n.name);
  for (const c of [...(n.args ?? []), n.content, n.condition, n.trueExpr, n.falseExpr]) if (c) freeSymbols(c, variable, params, out);
  return out;
}

/**
 * A function definition `name(variable, free parameters…)` returning `node`, in the language's usual
 * scalar float type (f32 in Rust, float in C/CUDA, float64 in Go, double in Java).
 */
export function emitFunction(name: string, node: MathNode, variable: string, language: EmitLanguage, opts: EmitOptions = {}): string {
  if (!/^[A-Za-z_]\w*$/.test(name)) throw new SlopewiseError('bad-argument', `not a function name: ${name}`);
  const params = opts.params ?? {};
  const body = emitCode(node, language, opts);
  const free = [...freeSymbols(node as unknown as AnyNode, variable, params)].sort();
  const names = [variable, ...free];
  switch (language) {
    case 'python': case 'numpy': case 'pytorch':
      return `def ${name}(${names.join(', ')}):\n    return ${body}`;
    case 'c':
      return `static inline float ${name}(${names.map((v) => `float ${v}`).join(', ')}) {\n    return ${body};\n}`;
    case 'cuda':
      return `__device__ __forceinline__ float ${name}(${names.map((v) => `float ${v}`).join(', ')}) {\n    return ${body};\n}`;
    case 'cpp':
      return `inline float ${name}(${names.map((v) => `float ${v}`).join(', ')}) {\n    return ${body};\n}`;
    case 'javascript':
      return `function ${name}(${names.join(', ')}) {\n  return ${body};\n}`;
    case 'typescript':
      return `function ${name}(${names.map((v) => `${v}: number`).join(', ')}): number {\n  return ${body};\n}`;
    case 'rust':
      return `fn ${name}(${names.map((v) => `${v}: f32`).join(', ')}) -> f32 {\n    ${body}\n}`;
    case 'julia':
      return `${name}(${names.join(', ')}) = ${body}`;
    case 'go':
      return `func ${name}(${names.join(', ')} float64) float64 {\n\treturn ${body}\n}`;
    case 'java':
      return `static double ${name}(${names.map((v) => `double ${v}`).join(', ')}) {\n    return ${body};\n}`;
  }
}
