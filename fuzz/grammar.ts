/**
 * Grammar-based formula generation: a random abstract formula tree, rendered in each notation the
 * engine reads (plain, Unicode, LaTeX and the code dialects), plus an evaluator of the abstract tree
 * of our own. The evaluator is the fuzzer's oracle for translation: the same tree written in every
 * dialect must mean the same function. Activation definitions in `ACT` are written from the papers
 * that introduced them (named beside each), not taken from the engine's catalogue.
 */
import type { Language } from '../src/core/types';
import { Rng } from './rng';

export type Cmp = '>' | '<' | '>=' | '<=';
export type BinOp = '+' | '-' | '*' | '/' | '^';
export type Fn1 = 'exp' | 'log' | 'tanh' | 'sqrt' | 'abs' | 'erf' | 'log1p' | 'expm1' | 'sin' | 'cos' | 'cosh' | 'sinh' | 'atan';
export type Act = keyof typeof ACT;

export type Tree =
  | { k: 'num'; v: number }
  | { k: 'var' }
  | { k: 'par'; name: string }
  | { k: 'neg'; a: Tree }
  | { k: 'bin'; op: BinOp; a: Tree; b: Tree }
  | { k: 'fn'; f: Fn1; a: Tree }
  | { k: 'max' | 'min'; a: Tree; b: Tree }
  | { k: 'act'; f: Act; a: Tree }
  | { k: 'cond'; cmp: Cmp; l: Tree; r: Tree; a: Tree; b: Tree };

/** erf by Abramowitz & Stegun 7.1.26 is too coarse for an oracle; this is the series/continued-fraction pair. */
export function erf(x: number): number {
  if (Number.isNaN(x)) return NaN;
  const ax = Math.abs(x);
  if (ax < 2.5) {
    // Maclaurin series erf x = 2/√π Σ (−1)^n x^(2n+1) / (n! (2n+1)) (handbook identity, A&S 7.1.5).
    let term = ax;
    let sum = ax;
    for (let n = 1; n < 80; n++) {
      term *= -ax * ax / n;
      const t = term / (2 * n + 1);
      sum += t;
      if (Math.abs(t) < 1e-17 * Math.abs(sum)) break;
    }
    return Math.sign(x) * (2 / Math.sqrt(Math.PI)) * sum;
  }
  if (ax > 6) return Math.sign(x);
  // Continued fraction for erfc (A&S 7.1.14), evaluated bottom-up.
  let f = 0;
  for (let n = 60; n >= 1; n--) f = (n / 2) / (ax + f);
  const erfc = Math.exp(-ax * ax) / Math.sqrt(Math.PI) / (ax + f);
  return Math.sign(x) * (1 - erfc);
}

const SELU_ALPHA = 1.6732632423543772; // Klambauer et al. 2017, eq. (14)
const SELU_LAMBDA = 1.0507009873554805; // Klambauer et al. 2017, eq. (14)

/** Activations with unambiguous definitions across the libraries (sources beside each). */
export const ACT = {
  sigmoid: (x: number) => 1 / (1 + Math.exp(-x)), // logistic function, common practice
  relu: (x: number) => Math.max(x, 0), // Nair & Hinton 2010
  softplus: (x: number) => Math.log(1 + Math.exp(x)), // Dugas et al. 2001, β = 1
  silu: (x: number) => x / (1 + Math.exp(-x)), // Elfwing et al. 2018
  softsign: (x: number) => x / (1 + Math.abs(x)), // common practice
  mish: (x: number) => x * Math.tanh(Math.log(1 + Math.exp(x))), // Misra 2019
  selu: (x: number) => SELU_LAMBDA * (x > 0 ? x : SELU_ALPHA * (Math.exp(x) - 1)), // Klambauer et al. 2017
  elu: (x: number) => (x > 0 ? x : Math.exp(x) - 1), // Clevert et al. 2015, α = 1
  gelu: (x: number) => 0.5 * x * (1 + erf(x / Math.SQRT2)), // Hendrycks & Gimpel 2016, exact form
} as const;

const FN1: Record<Fn1, (x: number) => number> = {
  exp: Math.exp, log: Math.log, tanh: Math.tanh, sqrt: Math.sqrt, abs: Math.abs, erf, log1p: Math.log1p,
  expm1: Math.expm1, sin: Math.sin, cos: Math.cos, cosh: Math.cosh, sinh: Math.sinh, atan: Math.atan,
};

export const PARAM_NAMES = ['alpha', 'beta', 'slope', 'k', 'c'] as const;

/** Evaluates the abstract tree at x with parameter values. */
export function evalTree(t: Tree, x: number, params: Record<string, number>): number {
  switch (t.k) {
    case 'num': return t.v;
    case 'var': return x;
    case 'par': return params[t.name] ?? NaN;
    case 'neg': return -evalTree(t.a, x, params);
    case 'bin': {
      const a = evalTree(t.a, x, params);
      const b = evalTree(t.b, x, params);
      switch (t.op) {
        case '+': return a + b;
        case '-': return a - b;
        case '*': return a * b;
        case '/': return a / b;
        case '^': return Math.pow(a, b);
      }
      break;
    }
    case 'fn': return FN1[t.f](evalTree(t.a, x, params));
    case 'max': return Math.max(evalTree(t.a, x, params), evalTree(t.b, x, params));
    case 'min': return Math.min(evalTree(t.a, x, params), evalTree(t.b, x, params));
    case 'act': return ACT[t.f](evalTree(t.a, x, params));
    case 'cond': {
      const l = evalTree(t.l, x, params);
      const r = evalTree(t.r, x, params);
      const c = t.cmp === '>' ? l > r : t.cmp === '<' ? l < r : t.cmp === '>=' ? l >= r : l <= r;
      return c ? evalTree(t.a, x, params) : evalTree(t.b, x, params);
    }
  }
  return NaN;
}

export interface GenOptions {
  maxDepth: number;
  /** Allow parameters (symbols other than the variable). */
  params: boolean;
  /** Allow conditionals. */
  cond: boolean;
}

const NICE = [0, 0.5, 1, 2, 3, 0.1, 0.01, 0.044715, 1.702, 6, 10, 0.25];

function number(r: Rng): number {
  return r.weighted<() => number>([
    [6, () => r.pick(NICE)],
    [2, () => r.int(0, 20)],
    [2, () => Math.round(r.next() * 1000) / 100],
    [1, () => Number((r.next() * 10).toPrecision(r.int(1, 6)))],
  ])();
}

/** A random formula tree. */
export function genTree(r: Rng, opts: GenOptions, depth = 0): Tree {
  const leafBias = depth >= opts.maxDepth ? 1 : depth / (opts.maxDepth + 1);
  if (r.next() < leafBias * 0.9) {
    return r.weighted<() => Tree>([
      [5, () => ({ k: 'var' })],
      [3, () => ({ k: 'num', v: number(r) })],
      [opts.params ? 1 : 0, () => ({ k: 'par', name: r.pick(PARAM_NAMES) })],
    ])();
  }
  const sub = (): Tree => genTree(r, opts, depth + 1);
  return r.weighted<() => Tree>([
    [6, () => ({ k: 'bin', op: r.pick(['+', '-', '*', '/'] as const), a: sub(), b: sub() })],
    [1, () => ({ k: 'bin', op: '^', a: sub(), b: { k: 'num', v: r.pick([2, 3, 0.5, 1.5, 4]) } })],
    [1, () => ({ k: 'neg', a: sub() })],
    [4, () => ({ k: 'fn', f: r.pick(Object.keys(FN1) as Fn1[]), a: sub() })],
    [2, () => ({ k: r.pick(['max', 'min'] as const), a: sub(), b: r.bool(0.6) ? { k: 'num', v: number(r) } : sub() })],
    [4, () => ({ k: 'act', f: r.pick(Object.keys(ACT) as Act[]), a: r.bool(0.6) ? { k: 'var' } : sub() })],
    [opts.cond ? 1 : 0, () => ({ k: 'cond', cmp: r.pick(['>', '<', '>=', '<='] as const), l: { k: 'var' }, r: { k: 'num', v: r.pick([0, 1, -1, 0.5]) }, a: sub(), b: sub() })],
  ])();
}

/** Dialects the renderer writes (a superset of the engine's `Language` ids, by flavour). */
export const DIALECTS = [
  'plain', 'unicode', 'latex', 'python-numpy', 'python-torch', 'python-math', 'c', 'cpp', 'cuda', 'rust', 'go',
  'julia', 'r', 'matlab', 'fortran', 'javascript', 'typescript', 'java', 'kotlin', 'lua',
] as const;
export type Dialect = (typeof DIALECTS)[number];

/** The engine language a dialect is written in. */
export function languageOf(d: Dialect): Language {
  switch (d) {
    case 'unicode': return 'plain';
    case 'python-numpy': case 'python-torch': case 'python-math': return 'python';
    default: return d;
  }
}

interface Style {
  fn: (name: Fn1 | 'max' | 'min' | 'pow', args: string[]) => string;
  act: (name: Act, arg: string) => string;
  pow: (a: string, b: string) => string;
  num: (v: number) => string;
  cond?: (c: string, a: string, b: string) => string;
  mul?: string;
  div?: (a: string, b: string) => string;
  neg?: string;
  par?: (name: string) => string;
}

const GREEK: Record<string, string> = { alpha: 'α', beta: 'β', slope: 'λ', k: 'κ', c: 'γ' };

function plainNum(v: number): string {
  return String(v);
}

function floatNum(suffix: string): (v: number) => string {
  return (v) => {
    const s = String(v);
    return (/[.e]/.test(s) ? s : `${s}.0`) + suffix;
  };
}

function call(prefix: string): Style['fn'] {
  return (name, args) => `${prefix}${name}(${args.join(', ')})`;
}

const C_FNS: Record<string, string> = { exp: 'expf', log: 'logf', tanh: 'tanhf', sqrt: 'sqrtf', abs: 'fabsf', erf: 'erff', log1p: 'log1pf', expm1: 'expm1f', sin: 'sinf', cos: 'cosf', cosh: 'coshf', sinh: 'sinhf', atan: 'atanf', max: 'fmaxf', min: 'fminf', pow: 'powf' };
const GO_FNS: Record<string, string> = { exp: 'Exp', log: 'Log', tanh: 'Tanh', sqrt: 'Sqrt', abs: 'Abs', erf: 'Erf', log1p: 'Log1p', expm1: 'Expm1', sin: 'Sin', cos: 'Cos', cosh: 'Cosh', sinh: 'Sinh', atan: 'Atan', max: 'Max', min: 'Min', pow: 'Pow' };

function styleOf(d: Dialect, r: Rng): Style {
  const plainAct: Style['act'] = (n, a) => `${n}(${a})`;
  switch (d) {
    case 'plain':
      return { fn: call(''), act: plainAct, pow: (a, b) => `${a}${r.pick(['^', '**'])}${b}`, num: plainNum, cond: (c, a, b) => `(${c} ? ${a} : ${b})` };
    case 'unicode':
      return {
        fn: (n, args) => (n === 'sqrt' ? `√(${args[0]})` : n === 'exp' && r.bool() ? `e^(${args[0]})` : `${n}(${args.join(', ')})`),
        act: (n, a) => (n === 'sigmoid' ? `σ(${a})` : `${n}(${a})`),
        pow: (a, b) => (b === '2' ? `${a}²` : b === '3' ? `${a}³` : `${a}^${b}`),
        num: plainNum, mul: r.pick(['·', '×', '*']), neg: '−', par: (n) => GREEK[n] ?? n,
        cond: (c, a, b) => `(${c} ? ${a} : ${b})`,
      };
    case 'latex':
      return {
        fn: (n, args) => {
          if (n === 'sqrt') return `\\sqrt{${args[0]}}`;
          if (n === 'exp' && r.bool()) return `e^{${args[0]}}`;
          if (n === 'max' || n === 'min') return `\\${n}\\left(${args.join(', ')}\\right)`;
          if (n === 'erf' || n === 'log1p' || n === 'expm1' || n === 'abs' || n === 'pow') return `\\operatorname{${n}}\\left(${args.join(', ')}\\right)`;
          return `\\${n}\\left(${args.join(', ')}\\right)`;
        },
        act: (n, a) => (n === 'sigmoid' ? `\\sigma\\left(${a}\\right)` : `\\operatorname{${n}}(${a})`),
        pow: (a, b) => `${a}^{${b}}`, num: plainNum, mul: r.pick([' \\cdot ', '*', ' \\times ']),
        div: (a, b) => `\\frac{${a}}{${b}}`, par: (n) => (n === 'alpha' || n === 'beta' ? `\\${n}` : n),
      };
    case 'python-numpy':
      return {
        fn: (n, args) => (n === 'max' ? `np.maximum(${args.join(', ')})` : n === 'min' ? `np.minimum(${args.join(', ')})` : n === 'pow' ? `np.power(${args.join(', ')})` : n === 'erf' ? `scipy.special.erf(${args[0]})` : `np.${n}(${args.join(', ')})`),
        act: (n, a) => (n === 'sigmoid' ? `scipy.special.expit(${a})` : n === 'relu' ? `np.maximum(${a}, 0)` : `${n}(${a})`),
        pow: (a, b) => `${a}**${b}`, num: plainNum,
        cond: (c, a, b) => (r.bool() ? `np.where(${c}, ${a}, ${b})` : `(${a} if ${c} else ${b})`),
      };
    case 'python-torch':
      return {
        fn: (n, args) => (n === 'max' ? `torch.maximum(${args.join(', ')})` : n === 'min' ? `torch.minimum(${args.join(', ')})` : n === 'pow' ? `torch.pow(${args.join(', ')})` : `torch.${n}(${args.join(', ')})`),
        act: (n, a) => (n === 'sigmoid' ? `torch.sigmoid(${a})` : n === 'gelu' ? `F.gelu(${a})` : `F.${n}(${a})`),
        pow: (a, b) => `${a}**${b}`, num: plainNum, cond: (c, a, b) => `torch.where(${c}, ${a}, ${b})`,
      };
    case 'python-math':
      return {
        fn: (n, args) => (n === 'max' || n === 'min' ? `${n}(${args.join(', ')})` : n === 'abs' ? `abs(${args[0]})` : `math.${n}(${args.join(', ')})`),
        act: plainAct, pow: (a, b) => `${a}**${b}`, num: plainNum, cond: (c, a, b) => `(${a} if ${c} else ${b})`,
      };
    case 'c': case 'cuda':
      return {
        fn: (n, args) => `${d === 'cuda' && n === 'exp' && r.bool() ? '__expf' : (C_FNS[n] ?? n)}(${args.join(', ')})`,
        act: plainAct, pow: (a, b) => `powf(${a}, ${b})`, num: floatNum(r.pick(['f', 'f', ''])), cond: (c, a, b) => `(${c} ? ${a} : ${b})`,
      };
    case 'cpp':
      return { fn: (n, args) => `std::${n === 'abs' ? 'fabs' : n}(${args.join(', ')})`, act: plainAct, pow: (a, b) => `std::pow(${a}, ${b})`, num: floatNum(''), cond: (c, a, b) => `(${c} ? ${a} : ${b})` };
    case 'rust':
      return {
        fn: (n, args) => (n === 'max' || n === 'min' || n === 'pow' ? `(${args[0]}).${n === 'pow' ? 'powf' : n}(${args[1]})` : n === 'erf' ? `erf(${args[0]})` : `(${args[0]}).${n === 'log' ? 'ln' : n === 'log1p' ? 'ln_1p' : n === 'expm1' ? 'exp_m1' : n}()`),
        act: plainAct, pow: (a, b) => `(${a}).powf(${b})`, num: floatNum(''),
      };
    case 'go':
      return { fn: (n, args) => `math.${GO_FNS[n] ?? n}(${args.join(', ')})`, act: plainAct, pow: (a, b) => `math.Pow(${a}, ${b})`, num: floatNum('') };
    case 'julia':
      return {
        fn: (n, args) => `${n}${r.bool() && n !== 'max' && n !== 'min' ? '.' : ''}(${args.join(', ')})`,
        act: (n, a) => (n === 'sigmoid' ? `σ(${a})` : `${n}(${a})`), pow: (a, b) => `${a}${r.pick(['^', '.^'])}${b}`, num: plainNum,
        cond: (c, a, b) => `(${c} ? ${a} : ${b})`, mul: r.pick(['*', '.*']), div: (a, b) => `${a}${r.pick(['/', './'])}${b}`,
      };
    case 'r':
      return { fn: (n, args) => (n === 'max' ? `pmax(${args.join(', ')})` : n === 'min' ? `pmin(${args.join(', ')})` : `${n}(${args.join(', ')})`), act: plainAct, pow: (a, b) => `${a}^${b}`, num: plainNum, cond: (c, a, b) => `ifelse(${c}, ${a}, ${b})` };
    case 'matlab':
      return { fn: call(''), act: plainAct, pow: (a, b) => `${a}.^${b}`, num: plainNum, mul: '.*', div: (a, b) => `${a}./${b}` };
    case 'fortran':
      return { fn: call(''), act: plainAct, pow: (a, b) => `${a}**${b}`, num: (v) => `${floatNum('')(v).replace(/e/, 'd')}${/e/.test(String(v)) ? '' : 'd0'}` };
    case 'javascript': case 'typescript':
      return { fn: (n, args) => `Math.${n}(${args.join(', ')})`, act: plainAct, pow: (a, b) => (r.bool() ? `Math.pow(${a}, ${b})` : `${a} ** ${b}`), num: plainNum, cond: (c, a, b) => `(${c} ? ${a} : ${b})` };
    case 'java':
      return { fn: (n, args) => `Math.${n}(${args.join(', ')})`, act: plainAct, pow: (a, b) => `Math.pow(${a}, ${b})`, num: floatNum(''), cond: (c, a, b) => `(${c} ? ${a} : ${b})` };
    case 'kotlin':
      return { fn: (n, args) => `${r.bool() ? 'kotlin.math.' : ''}${n}(${args.join(', ')})`, act: plainAct, pow: (a, b) => `(${a}).pow(${b})`, num: floatNum('') };
    case 'lua':
      return { fn: (n, args) => `math.${n}(${args.join(', ')})`, act: plainAct, pow: (a, b) => `${a}^${b}`, num: plainNum };
  }
}

/** Renders a tree in a dialect, fully parenthesised (so precedence differences cannot change its meaning). */
export function render(t: Tree, d: Dialect, variable: string, r: Rng): string {
  const s = styleOf(d, r);
  const go = (n: Tree): string => {
    switch (n.k) {
      case 'num': return s.num(n.v);
      case 'var': return variable;
      case 'par': return s.par ? s.par(n.name) : n.name;
      case 'neg': return `(${s.neg ?? '-'}${go(n.a)})`;
      case 'bin': {
        const a = go(n.a);
        const b = go(n.b);
        if (n.op === '^') return `(${s.pow(`(${a})`, b)})`;
        if (n.op === '/' && s.div) return `(${s.div(a, b)})`;
        if (n.op === '*' && s.mul) return `(${a}${s.mul}${b})`;
        if (n.op === '-' && s.neg) return `(${a} ${s.neg} ${b})`;
        return `(${a} ${n.op} ${b})`;
      }
      case 'fn': return s.fn(n.f, [go(n.a)]);
      case 'max': case 'min': return s.fn(n.k, [go(n.a), go(n.b)]);
      case 'act': return s.act(n.f, go(n.a));
      case 'cond': {
        const c = `${go(n.l)} ${n.cmp} ${go(n.r)}`;
        if (s.cond) return s.cond(c, go(n.a), go(n.b));
        // No expression conditional in this dialect: write it as the equivalent max/min-free plain form.
        return styleOf('plain', r).cond?.(c, go(n.a), go(n.b)) ?? go(n.a);
      }
    }
  };
  return go(t);
}

/** Whether the dialect needed the plain fallback for a conditional (then the text is mixed). */
export function usesCond(t: Tree): boolean {
  switch (t.k) {
    case 'cond': return true;
    case 'neg': case 'fn': case 'act': return usesCond(t.a);
    case 'bin': case 'max': case 'min': return usesCond(t.a) || usesCond(t.b);
    default: return false;
  }
}

export function treeSize(t: Tree): number {
  switch (t.k) {
    case 'num': case 'var': case 'par': return 1;
    case 'neg': case 'fn': case 'act': return 1 + treeSize(t.a);
    case 'bin': case 'max': case 'min': return 1 + treeSize(t.a) + treeSize(t.b);
    case 'cond': return 1 + treeSize(t.l) + treeSize(t.r) + treeSize(t.a) + treeSize(t.b);
  }
}

/** A head the formula may be written with in each dialect (`f(x) = `, `def f(x): return`, …). */
export function withHead(body: string, d: Dialect, variable: string, r: Rng): string {
  if (!r.bool(0.3)) return body;
  switch (d) {
    case 'plain': case 'unicode': return r.pick([`f(${variable}) = ${body}`, `y = ${body}`, `act(${variable}) = ${body}`]);
    case 'latex': return `f(${variable}) = ${body}`;
    case 'python-numpy': case 'python-torch': case 'python-math': return r.pick([`lambda ${variable}: ${body}`, `y = ${body}`, `return ${body}`]);
    case 'javascript': case 'typescript': return r.pick([`(${variable}) => ${body}`, `return ${body};`]);
    case 'matlab': return `y = ${body};`;
    case 'julia': return `f(${variable}) = ${body}`;
    case 'rust': return r.pick([`|${variable}| ${body}`, `${body}`]);
    default: return `y = ${body}`;
  }
}
