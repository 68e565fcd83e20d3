/**
 * Display form for people: decimals rounded to 6 significant digits, Unicode operators (·, −, ≤, ≥,
 * superscript powers), named functions collapsed back (σ(x)·(1 − σ(x)), softplus(x)), Greek
 * parameter names restored (alpha → α). Also LaTeX via mathjs toTex with the same collapsing.
 */
import type { MathNode } from 'mathjs';
import { mark } from './markers';
import { displayScore, polishForDisplay, setPrintedLength } from './polish';
import { args, condParts, fnName, isNum, numValue, opFn, symName, isOpNode } from './nodes';
import { ASCII_TO_GREEK } from './notation/unicode';

const SUPER: Readonly<Record<string, string>> = { '0': '⁰', '1': '¹', '2': '²', '3': '³', '4': '⁴', '5': '⁵', '6': '⁶', '7': '⁷', '8': '⁸', '9': '⁹', '-': '⁻' };

/** Precedence levels: higher binds tighter. */
const PREC: Readonly<Record<string, number>> = {
  conditional: 0, or: 1, and: 2, not: 3, smaller: 4, smallerEq: 4, larger: 4, largerEq: 4, equal: 4, unequal: 4,
  add: 5, subtract: 5, multiply: 6, divide: 6, unaryMinus: 7, unaryPlus: 7, pow: 8,
};

const OPS: Readonly<Record<string, string>> = {
  add: ' + ', subtract: ' − ', multiply: '·', divide: '/', smaller: ' < ', smallerEq: ' ≤ ', larger: ' > ',
  largerEq: ' ≥ ', equal: ' = ', unequal: ' ≠ ', and: ' and ', or: ' or ',
};

const FUNCTION_NAMES: Readonly<Record<string, string>> = { sigmoid: 'σ', log: 'ln', normal_pdf: 'φ', normal_cdf: 'Φ' };

export function formatNumber(v: number): string {
  if (!Number.isFinite(v)) return v > 0 ? '∞' : v < 0 ? '−∞' : 'NaN';
  if (Number.isInteger(v) && Math.abs(v) < 1e15) return String(v).replace('-', '−');
  const s = Number(v.toPrecision(6)).toString();
  return s.replace('-', '−');
}

export interface DisplayOptions {
  /** Symbol names to show differently (e.g. from a user's own Greek spelling). */
  symbols?: Readonly<Record<string, string>>;
}

function symbolText(name: string, opts: DisplayOptions): string {
  const own = opts.symbols?.[name];
  if (own !== undefined) return own;
  if (name === 'pi') return 'π';
  if (name === 'Infinity') return '∞';
  const under = name.indexOf('_');
  if (under > 0) {
    const head = name.slice(0, under);
    const g = ASCII_TO_GREEK[head];
    if (g !== undefined) return g + name.slice(under);
  }
  return ASCII_TO_GREEK[name] ?? name;
}

function precOf(n: MathNode): number {
  if (n.type === 'ConditionalNode') return 0;
  if (n.type === 'OperatorNode') return PREC[opFn(n)] ?? 9;
  if (n.type === 'ConstantNode' && numValue(n) < 0) return 7;
  return 9;
}

function print(n: MathNode, opts: DisplayOptions): string {
  switch (n.type) {
    case 'ConstantNode': return formatNumber(numValue(n));
    case 'SymbolNode': return symbolText(symName(n), opts);
    case 'ParenthesisNode': return print((n as unknown as { content: MathNode }).content, opts);
    case 'ConditionalNode': {
      const { c, a, b } = condParts(n);
      return `${wrap(c, 1, opts)} ? ${wrap(a, 1, opts)} : ${wrap(b, 0, opts)}`;
    }
    case 'FunctionNode': {
      const name = fnName(n);
      const a = args(n);
      if (name === 'abs' && a.length === 1) return `|${print(a[0] as MathNode, opts)}|`;
      if (name === 'sqrt' && a.length === 1) {
        const inner = a[0] as MathNode;
        return precOf(inner) >= 9 && !inner.type.startsWith('Function') ? `√${print(inner, opts)}` : `√(${print(inner, opts)})`;
      }
      if (name === 'exp' && a.length === 1) {
        // Print the argument once (printing it twice doubles the work at every level of a tower).
        const inner = a[0] as MathNode;
        const s = print(inner, opts);
        if (s.length <= 14) return precOf(inner) >= 9 && inner.type !== 'FunctionNode' ? `e^${s}` : `e^(${s})`;
        return `exp(${s})`;
      }
      return `${FUNCTION_NAMES[name] ?? name}(${a.map((x) => print(x, opts)).join(', ')})`;
    }
    case 'OperatorNode': {
      const f = opFn(n);
      const a = args(n);
      const p = PREC[f] ?? 9;
      // −(2·u/v) reads −2·u/v: negation commutes with products and quotients.
      if (f === 'unaryMinus') return `−${wrap(a[0] as MathNode, PREC.multiply as number, opts)}`;
      if (f === 'unaryPlus') return wrap(a[0] as MathNode, p, opts);
      if (f === 'not') return `not ${wrap(a[0] as MathNode, p, opts)}`;
      if (f === 'pow') {
        const [base, ex] = a as [MathNode, MathNode];
        const b = wrap(base, p + 1, opts);
        if (isNum(ex) && Number.isInteger(numValue(ex)) && Math.abs(numValue(ex)) < 100) {
          return b + [...String(numValue(ex))].map((c) => SUPER[c] ?? c).join('');
        }
        return `${b}^${wrap(ex, p + 1, opts)}`;
      }
      if (f === 'divide' && a.length === 2 && a.every((x) => isNum(x) && Number.isInteger(numValue(x)) && numValue(x) !== 0 && Math.abs(numValue(x)) < 1e9)) {
        // 2/6 → 1/3 (integers only, so the printed fraction is exactly the value).
        const [p0, q0] = a.map(numValue) as [number, number];
        const g = gcdInt(Math.abs(p0), Math.abs(q0));
        if (g > 1) return `${formatNumber(p0 / g)}/${formatNumber(q0 / g)}`;
      }
      const sep = OPS[f] ?? ` ${f} `;
      const left = wrap(a[0] as MathNode, p, opts);
      const rest = a.slice(1).map((x) => {
        // Right operands of − and / need brackets at equal precedence.
        const needTighter = f === 'subtract' || f === 'divide' || (f === 'multiply' && isOpNode(x, 'divide'));
        return wrap(x, needTighter ? p + 1 : p, opts);
      });
      return [left, ...rest].join(sep);
    }
    default:
      return n.toString();
  }
}

function gcdInt(a: number, b: number): number {
  return b === 0 ? a : gcdInt(b, a % b);
}

function wrap(n: MathNode, min: number, opts: DisplayOptions): string {
  const s = print(n, opts);
  return precOf(n) < min ? `(${s})` : s;
}

setPrintedLength((n) => print(n, {}).length);

/** Unicode display of a canonical or marked tree. */
export function displayForm(node: MathNode, opts: DisplayOptions = {}): string {
  return print(mark(node), opts);
}

/**
 * Display of a derivative: the polished tree (constants folded, like terms collected, σ/tanh
 * factors, φ/Φ named; see polish.ts) when it prints shorter than the tree as derived, else that.
 */
export function derivativeDisplayForm(node: MathNode, opts: DisplayOptions = {}, maxLength = Infinity): string {
  return derivativeDisplayTree(node, opts, maxLength).text;
}

/**
 * The display tree behind `derivativeDisplayForm` and its text: the polished tree when it reads
 * better (displayScore) and prints no longer than `maxLength`, else the marked tree as derived.
 */
export function derivativeDisplayTree(node: MathNode, opts: DisplayOptions = {}, maxLength = Infinity): { tree: MathNode; text: string } {
  const marked = mark(node);
  const plain = print(marked, opts);
  const tree = polishForDisplay(marked);
  const polished = print(tree, opts);
  if (polished.length <= maxLength && displayScore(tree) < displayScore(marked)) return { tree, text: polished };
  return { tree: marked, text: plain };
}

/** LaTeX of a canonical or marked tree (mathjs toTex, σ and softplus collapsed). */
export function latexForm(node: MathNode): string {
  return mark(node).toTex({
    parenthesis: 'auto',
    handler: (n: MathNode, options: object) => {
      if (n.type === 'FunctionNode') {
        const name = fnName(n);
        const inner = args(n).map((a) => a.toTex(options)).join(', ');
        if (name === 'sigmoid') return `\\sigma\\left(${inner}\\right)`;
        if (name === 'softplus') return `\\operatorname{softplus}\\left(${inner}\\right)`;
      }
      return undefined as unknown as string;
    },
  } as never);
}
