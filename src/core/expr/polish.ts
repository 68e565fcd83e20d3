/**
 * Display-only polishing of derivative trees: turns what differentiation and the budgeted simplify
 * leave behind (`σ(x)·(1 − σ(x))·(1 − σ(x)) − σ(x)·(1 − σ(x))·σ(x)`, `√2²`, `e^(−(x/√2)²)/√2³/√π`)
 * into forms a practitioner recognises (`σ(x)·(1 − σ(x))·(1 − 2·σ(x))`, `(2 − x²)·φ(x)`).
 *
 * Method: each algebraic layer becomes a sparse Laurent polynomial with numeric coefficients over
 * "atoms" (symbols, function calls, conditionals, sums kept as denominators); constant sub-trees are
 * folded to doubles; like terms are collected; exact divisions cancel denominators; then the result
 * is factored where that helps: common monomials, (1 − σ(u)) and (1 − tanh²(u)) factors, the
 * standard normal density φ(u) = e^(−u²/2)/√(2π) and CDF Φ(u) = (1 + erf(u/√2))/2.
 *
 * The output is for display only (it may contain `normal_pdf`, `normal_cdf` and the engine markers);
 * canonical derivatives never go through here. Everything is bounded: trees above MAX_INPUT_NODES
 * are returned unchanged, polynomials above MAX_TERMS abort the layer (the layer is then kept as it
 * was), divisions stop after MAX_DIVISION_STEPS. Callers keep whichever display is shorter.
 */
import type { MathNode } from 'mathjs';
import { LIMITS } from '../limits';
import {
  args, children, cond, condParts, countNodes, div, fn, fnName, isCond, isFn, isNum, key, mul, neg, num, numValue, op, opFn,
  pow, rebuild, sub, add, sym, symName,
} from './nodes';

const MAX_INPUT_NODES = 600;
const MAX_TERMS = 48;
const MAX_DIVISION_STEPS = 48;
/** Factoring and regrouping are tried per σ/tanh atom only when a layer has at most this many. */
const MAX_SPECIAL_ATOMS = 3;
/** Relative size below which a sum of two coefficients counts as exact cancellation. */
const CANCEL = 1e-12;
const SQRT_2PI = Math.sqrt(2 * Math.PI);

const now: () => number = typeof performance !== 'undefined' ? () => performance.now() : () => Date.now();

class Abort extends Error {}
/** Thrown when the whole polish exceeds MAX_WORK steps: the caller keeps the tree as derived. */
class OutOfWork extends Error {}
/** Work budget of one polish (monomial products, conversions): linear-time guard against surprises. */
const MAX_WORK = 60_000;

/** Monomial: coefficient × Π atom^exponent (exponents are non-zero integers). */
interface Mono { c: number; e: Map<number, number> }
/** Polynomial: monomials keyed by their exponent signature. */
type Poly = Map<string, Mono>;

interface Atom { id: number; node: MathNode; key: string; rank: number; poly?: Poly }

const CONST_FNS: Readonly<Record<string, (v: number) => number>> = {
  sqrt: Math.sqrt, exp: Math.exp, log: Math.log, sin: Math.sin, cos: Math.cos, tanh: Math.tanh, cbrt: Math.cbrt,
};

/** Value of a tree made only of numbers, π and e and arithmetic; NaN when it is not such a tree. */
function constValue(n: MathNode): number {
  switch (n.type) {
    case 'ConstantNode': return isNum(n) ? numValue(n) : NaN;
    case 'SymbolNode': return symName(n) === 'pi' ? Math.PI : symName(n) === 'e' ? Math.E : NaN;
    case 'ParenthesisNode': return constValue(children(n)[0] as MathNode);
    case 'FunctionNode': {
      const f = CONST_FNS[fnName(n)];
      const a = args(n);
      return f && a.length === 1 ? f(constValue(a[0] as MathNode)) : NaN;
    }
    case 'OperatorNode': {
      // Each operand evaluated once, stopping at the first non-constant one (linear time).
      const vals: number[] = [];
      for (const x of args(n)) {
        const v = constValue(x);
        if (Number.isNaN(v)) return NaN;
        vals.push(v);
      }
      const [a, b] = vals as [number, number];
      switch (opFn(n)) {
        case 'add': return a + b;
        case 'subtract': return a - b;
        case 'multiply': return vals.reduce((x, y) => x * y, 1);
        case 'divide': return a / b;
        case 'pow': return a ** b;
        case 'unaryMinus': return -a;
        case 'unaryPlus': return a;
        default: return NaN;
      }
    }
    default: return NaN;
  }
}

function monoKey(e: Map<number, number>): string {
  return [...e.entries()].sort((a, b) => a[0] - b[0]).map(([id, k]) => `${id}^${k}`).join('*');
}

function polyKey(p: Poly): string {
  return [...p.entries()].sort((a, b) => (a[0] < b[0] ? -1 : a[0] > b[0] ? 1 : 0)).map(([k, m]) => `${m.c}:${k}`).join('+');
}

function addMono(p: Poly, m: Mono): void {
  if (m.c === 0) return;
  const k = monoKey(m.e);
  const old = p.get(k);
  if (!old) { p.set(k, { c: m.c, e: m.e }); return; }
  const c = old.c + m.c;
  if (Math.abs(c) <= CANCEL * Math.max(Math.abs(old.c), Math.abs(m.c))) p.delete(k);
  else p.set(k, { c, e: old.e });
  if (p.size > MAX_TERMS) throw new Abort();
}

function constPoly(c: number): Poly {
  const p: Poly = new Map();
  addMono(p, { c, e: new Map() });
  return p;
}

function addPoly(a: Poly, b: Poly, sign = 1): Poly {
  const p: Poly = new Map();
  for (const m of a.values()) addMono(p, m);
  for (const m of b.values()) addMono(p, { c: sign * m.c, e: m.e });
  return p;
}

function scalePoly(a: Poly, c: number): Poly {
  const p: Poly = new Map();
  for (const m of a.values()) addMono(p, { c: m.c * c, e: m.e });
  return p;
}

function monoOnly(p: Poly): Mono | null {
  if (p.size !== 1) return p.size === 0 ? { c: 0, e: new Map() } : null;
  return [...p.values()][0] as Mono;
}

export class Polisher {
  private atoms: Atom[] = [];
  private byKey = new Map<string, Atom>();
  private memo = new Map<string, MathNode>();
  private work = 0;

  constructor(private readonly deadline = Infinity) {}

  private spend(n = 1): void {
    const before = this.work;
    this.work += n;
    if (this.work > MAX_WORK) throw new OutOfWork();
    // The clock is read every 1024 units of work.
    if (before >> 10 !== this.work >> 10 && now() > this.deadline) throw new OutOfWork();
  }

  atom(node: MathNode, rank: number, poly?: Poly): number {
    const k = poly ? `P:${polyKey(poly)}` : key(node);
    const hit = this.byKey.get(k);
    if (hit) return hit.id;
    const a: Atom = { id: this.atoms.length, node, key: k, rank, ...(poly ? { poly } : {}) };
    this.atoms.push(a);
    this.byKey.set(k, a);
    return a.id;
  }

  private atomNode(id: number): MathNode {
    return (this.atoms[id] as Atom).node;
  }

  /** Same-argument rewrites inside one monomial: u·sign(u) → |u|, sinh(u)/cosh(u) → tanh(u). */
  private normalizeMono(m: Mono): Mono {
    if (m.e.size < 2) return m;
    let e = m.e;
    for (const [id, k] of m.e) {
      const a = this.atomNode(id);
      if (!isFn(a) || args(a).length !== 1) continue;
      const argKey = key(args(a)[0] as MathNode);
      const name = fnName(a);
      if (name === 'sign' && k > 0) {
        const base = this.byKey.get(argKey);
        const kb = base ? e.get(base.id) ?? 0 : 0;
        if (base && kb > 0 && e.has(id)) {
          const t = Math.min(k, kb) === 1 ? 1 : 0;
          if (t === 1) {
            e = new Map(e);
            bump(e, id, -1);
            bump(e, base.id, -1);
            bump(e, this.atom(fn('abs', [args(a)[0] as MathNode]), 2), 1);
          }
        }
      }
      if (name === 'sinh' && k > 0 && e.has(id)) {
        const cosh = this.byKey.get(key(fn('cosh', [args(a)[0] as MathNode])));
        const kc = cosh ? e.get(cosh.id) ?? 0 : 0;
        if (cosh && kc < 0) {
          const t = Math.min(k, -kc);
          e = new Map(e);
          bump(e, id, -t);
          bump(e, cosh.id, t);
          bump(e, this.atom(fn('tanh', [args(a)[0] as MathNode]), 2), t);
        }
      }
    }
    return e === m.e ? m : { c: m.c, e };
  }

  mulPoly(a: Poly, b: Poly): Poly {
    this.spend(a.size * b.size);
    const p: Poly = new Map();
    for (const x of a.values()) {
      for (const y of b.values()) {
        const e = new Map(x.e);
        for (const [id, k] of y.e) bump(e, id, k);
        addMono(p, this.normalizeMono({ c: x.c * y.c, e }));
      }
    }
    return p;
  }

  private powPoly(a: Poly, k: number): Poly {
    const m = monoOnly(a);
    if (m) {
      const e = new Map<number, number>();
      for (const [id, x] of m.e) e.set(id, x * k);
      const p: Poly = new Map();
      addMono(p, this.normalizeMono({ c: m.c ** k, e }));
      return p;
    }
    let out = constPoly(1);
    for (let i = 0; i < k; i++) out = this.mulPoly(out, a);
    return out;
  }

  private atomPoly(id: number, k = 1): Poly {
    const p: Poly = new Map();
    addMono(p, { c: 1, e: new Map([[id, k]]) });
    return p;
  }

  /** A sum that cannot be expanded (a denominator, a non-integer power base) as an atom. */
  private sumAtom(p: Poly): number {
    const m = monoOnly(p);
    if (m) throw new Abort();
    return this.atom(this.fromPoly(p), 3, p);
  }

  toPoly(n: MathNode): Poly {
    this.spend();
    if (n.type === 'ParenthesisNode') return this.toPoly(children(n)[0] as MathNode);
    if (n.type !== 'ConstantNode' && !(n.type === 'SymbolNode')) {
      const v = constValue(n);
      if (Number.isFinite(v)) return constPoly(v);
    }
    if (isNum(n)) return constPoly(numValue(n));
    if (n.type === 'SymbolNode') return this.atomPoly(this.atom(n, 0));
    if (n.type === 'OperatorNode') {
      const f = opFn(n);
      const a = args(n);
      switch (f) {
        case 'add': return a.map((x) => this.toPoly(x)).reduce((x, y) => addPoly(x, y));
        case 'subtract': return addPoly(this.toPoly(a[0] as MathNode), this.toPoly(a[1] as MathNode), -1);
        case 'unaryMinus': return scalePoly(this.toPoly(a[0] as MathNode), -1);
        case 'unaryPlus': return this.toPoly(a[0] as MathNode);
        case 'multiply': return a.map((x) => this.toPoly(x)).reduce((x, y) => this.mulPoly(x, y));
        case 'divide': return this.mulPoly(this.toPoly(a[0] as MathNode), this.inverse(a[1] as MathNode));
        case 'pow': {
          const [base, ex] = a as [MathNode, MathNode];
          const k = constValue(ex);
          if (Number.isInteger(k) && k !== 0 && Math.abs(k) <= 6) {
            const b = this.toPoly(base);
            if (monoOnly(b)) return this.powPoly(b, k);
            if (k > 0 && k <= 3 && b.size <= 6) return this.powPoly(b, k);
            return this.atomPoly(this.sumAtom(b), k);
          }
          const b = this.toPoly(base);
          const baseNode = monoOnly(b) ? this.fromPoly(b) : this.atomNode(this.sumAtom(b));
          return this.atomPoly(this.atom(op('pow', [baseNode, this.polishNode(ex)]), 2));
        }
        default: return this.atomPoly(this.atom(rebuild(n, a.map((x) => this.polishNode(x))), 4));
      }
    }
    if (n.type === 'FunctionNode') return this.functionPoly(n);
    if (isCond(n)) {
      const { c, a, b } = condParts(n);
      return this.atomPoly(this.atom(cond(this.polishNode(c), this.polishNode(a), this.polishNode(b)), 5));
    }
    throw new Abort();
  }

  private functionPoly(n: MathNode): Poly {
    const name = fnName(n);
    const a = args(n).map((x) => this.polishNode(x));
    if (name === 'sqrt' && a.length === 1) {
      // √(u²) stays as written (it is |u|, not u); √ of a monomial in even powers is not rewritten either.
      return this.atomPoly(this.atom(fn(name, a), 2));
    }
    if (name === 'exp' && a.length === 1) {
      // e^(−u²/2) = √(2π)·φ(u)
      const p = this.toPoly(a[0] as MathNode);
      const m = monoOnly(p);
      if (m && m.e.size === 1 && Math.abs(m.c + 0.5) <= 1e-12) {
        const [[id, k]] = [...m.e.entries()] as [[number, number]];
        if (k === 2) return scalePoly(this.atomPoly(this.atom(fn('normal_pdf', [this.atomNode(id)]), 2)), SQRT_2PI);
      }
    }
    return this.atomPoly(this.atom(fn(name, a), 2));
  }

  /** 1/d as a polynomial: monomials invert, sums (and their powers, products) become atoms^−k. */
  private inverse(d: MathNode): Poly {
    if (d.type === 'ParenthesisNode') return this.inverse(children(d)[0] as MathNode);
    if (isOp(d, 'multiply')) return args(d).map((x) => this.inverse(x)).reduce((x, y) => this.mulPoly(x, y));
    if (isOp(d, 'unaryMinus')) return scalePoly(this.inverse(args(d)[0] as MathNode), -1);
    if (isOp(d, 'pow')) {
      const k = constValue(args(d)[1] as MathNode);
      if (Number.isInteger(k) && k > 0 && k <= 8) return this.powPoly(this.inverse(args(d)[0] as MathNode), k);
    }
    const p = this.toPoly(d);
    const m = monoOnly(p);
    if (m) {
      if (m.c === 0) throw new Abort();
      return this.powPoly(p, -1);
    }
    return this.atomPoly(this.sumAtom(p), -1);
  }

  /** Polished tree of any node (falls back to the node with polished children on overflow). */
  polishNode(n: MathNode): MathNode {
    if (n.type === 'ConstantNode') return (isNum(n) ? asFraction(numValue(n)) : null) ?? n;
    if (n.type === 'SymbolNode') return n;
    // Memoised by structure, and a polished tree counts as polished: without this, nested calls
    // (e^(e^(…))) would re-polish every inner argument at every level, doubling per level.
    const k = key(n);
    const hit = this.memo.get(k);
    if (hit) return hit;
    const out = this.polishUncached(n);
    this.memo.set(k, out);
    this.memo.set(key(out), out);
    return out;
  }

  private polishUncached(n: MathNode): MathNode {
    if (n.type === 'OperatorNode' && !['add', 'subtract', 'multiply', 'divide', 'pow', 'unaryMinus', 'unaryPlus'].includes(opFn(n))) {
      const polished = rebuild(n, args(n).map((x) => this.polishNode(x)));
      return COMPARISONS.has(opFn(n)) ? simplerComparison(polished) : polished;
    }
    try {
      return this.fromPoly(this.cancel(this.toPoly(n)));
    } catch (e) {
      if (!(e instanceof Abort)) throw e;
      return rebuild(n, children(n).map((x) => this.polishNode(x)));
    }
  }

  // ---- exact division and cancellation -------------------------------------------------------

  /** P / D when D divides P exactly (multivariate division in a lex order led by D's atoms), else null. */
  divide(p: Poly, d: Poly): Poly | null {
    const lead = [...new Set([...d.values()].flatMap((m) => [...m.e.keys()]))].sort((a, b) => a - b);
    const all = (x: Mono, y: Mono): number => {
      for (const id of lead) {
        const dx = (x.e.get(id) ?? 0) - (y.e.get(id) ?? 0);
        if (dx !== 0) return dx;
      }
      const ids = [...new Set([...x.e.keys(), ...y.e.keys()])].sort((a, b) => a - b);
      for (const id of ids) {
        const dx = (x.e.get(id) ?? 0) - (y.e.get(id) ?? 0);
        if (dx !== 0) return dx;
      }
      return 0;
    };
    const top = (q: Poly): Mono => [...q.values()].reduce((x, y) => (all(x, y) >= 0 ? x : y));
    const ld = top(d);
    let rest: Poly = new Map(p);
    const quotient: Poly = new Map();
    for (let step = 0; rest.size > 0; step++) {
      if (step >= MAX_DIVISION_STEPS) return null;
      this.spend(rest.size);
      const lp = top(rest);
      const e = new Map(lp.e);
      for (const [id, k] of ld.e) bump(e, id, -k);
      for (const id of lead) if ((e.get(id) ?? 0) < 0) return null;
      const q: Mono = { c: lp.c / ld.c, e };
      addMono(quotient, q);
      const qp: Poly = new Map([[monoKey(e), q]]);
      const prev = rest;
      rest = addPoly(rest, this.mulPoly(qp, d), -1);
      // The leading term must go away exactly; otherwise the order is not respected (stop).
      if (rest.has(monoKey(lp.e)) && prev.has(monoKey(lp.e))) return null;
    }
    return quotient;
  }

  /** Cancels sum atoms in denominators against the terms they multiply. */
  cancel(p: Poly): Poly {
    let cur = p;
    for (let round = 0; round < 6; round++) {
      let changed = false;
      for (const atom of this.atoms) {
        if (!atom.poly) continue;
        const groups = new Map<number, Poly>();
        const others: Poly = new Map();
        for (const m of cur.values()) {
          const k = m.e.get(atom.id) ?? 0;
          if (k < 0) {
            const e = new Map(m.e);
            e.delete(atom.id);
            const g = groups.get(k) ?? new Map();
            addMono(g, { c: m.c, e });
            groups.set(k, g);
          } else addMono(others, m);
        }
        if (groups.size === 0) continue;
        let next = others;
        let any = false;
        for (const [k, g] of groups) {
          const q = this.divide(g, atom.poly);
          const kept = q ?? g;
          const power = q ? k + 1 : k;
          if (q) any = true;
          next = addPoly(next, power === 0 ? kept : this.mulPoly(kept, this.atomPoly(atom.id, power)));
        }
        if (any) { cur = next; changed = true; }
      }
      if (!changed) break;
    }
    return cur;
  }

  // ---- back to a tree ------------------------------------------------------------------------

  private monoTree(m: Mono, withCoef: boolean): { tree: MathNode; negative: boolean } {
    const ids = [...m.e.keys()].sort((a, b) => (this.atoms[a] as Atom).rank - (this.atoms[b] as Atom).rank || a - b);
    let top: MathNode | null = null;
    let bottom: MathNode | null = null;
    for (const id of ids) {
      const k = m.e.get(id) as number;
      const f = Math.abs(k) === 1 ? this.atomNode(id) : op('pow', [this.atomNode(id), num(Math.abs(k))]);
      if (k > 0) top = top ? op('multiply', [top, f]) : f;
      else bottom = bottom ? op('multiply', [bottom, f]) : f;
    }
    const negative = withCoef && m.c < 0;
    let c = withCoef ? Math.abs(m.c) : 1;
    if (Math.abs(c - 1) <= 1e-12) c = 1;
    // 0.5·u² → u²/2, 0.166667·u → u/6: reciprocals of small integers read better as divisions.
    const inv = 1 / c;
    const r0 = Math.round(inv);
    if (top !== null && c < 1 && r0 >= 2 && r0 <= 12 && Math.abs(inv - r0) <= 1e-9 * inv && (r0 === 2 || String(c).length > 5)) {
      const r = Math.round(inv);
      bottom = bottom ? op('multiply', [num(r), bottom]) : num(r);
      c = 1;
    }
    const frac = top === null ? asFraction(c) : null;
    if (frac) return { tree: bottom ? op('divide', [frac, bottom]) : frac, negative };
    if (c !== 1) top = top ? op('multiply', [num(c), top]) : num(c);
    const head = top ?? num(1);
    return { tree: bottom ? op('divide', [head, bottom]) : head, negative };
  }

  private sumTree(parts: { tree: MathNode; negative: boolean }[]): MathNode {
    if (parts.length === 0) return num(0);
    const first = parts.findIndex((p) => !p.negative);
    const ordered = first > 0 ? [parts[first] as { tree: MathNode; negative: boolean }, ...parts.filter((_, i) => i !== first)] : parts;
    let out: MathNode | null = null;
    for (const p of ordered) {
      if (out === null) out = p.negative ? neg(p.tree) : p.tree;
      else out = op(p.negative ? 'subtract' : 'add', [out, p.tree]);
    }
    return out as MathNode;
  }

  private degree(m: Mono): number {
    let d = 0;
    for (const k of m.e.values()) if (k > 0) d += k;
    return d;
  }

  /** Flat sum, terms by ascending degree (constants first), a positive term leading. */
  private flat(p: Poly): MathNode {
    const ms = [...p.values()].sort((a, b) => this.degree(a) - this.degree(b) || this.firstRank(a) - this.firstRank(b));
    return this.sumTree(ms.map((m) => this.monoTree(m, true)));
  }

  private firstRank(m: Mono): number {
    let r = 99;
    for (const id of m.e.keys()) r = Math.min(r, (this.atoms[id] as Atom).rank * 1000 + id);
    return r;
  }

  /** Special factors to try: 1 − σ(u) for every σ atom, 1 − tanh²(u) for every tanh atom. */
  private specialFactors(p: Poly): { poly: Poly; tree: MathNode }[] {
    const out: { poly: Poly; tree: MathNode }[] = [];
    const seen = new Set<number>();
    for (const m of p.values()) {
      for (const id of m.e.keys()) {
        if (seen.has(id)) continue;
        seen.add(id);
        const a = this.atomNode(id);
        if (isFn(a, 'sigmoid')) out.push({ poly: addPoly(constPoly(1), this.atomPoly(id), -1), tree: op('subtract', [num(1), a]) });
        if (isFn(a, 'tanh')) out.push({ poly: addPoly(constPoly(1), this.atomPoly(id, 2), -1), tree: op('subtract', [num(1), op('pow', [a, num(2)])]) });
      }
    }
    return out;
  }

  /** c · monomial · special factors · rest, or null when nothing factors out. */
  private factored(p: Poly, depth: number): MathNode | null {
    if (p.size < 2) return null;
    const ms = [...p.values()];
    // Common monomial: the smallest exponent of every atom present in all terms.
    const common = new Map<number, number>();
    for (const [id, k] of (ms[0] as Mono).e) {
      let min = k;
      let inAll = true;
      for (const m of ms) {
        const x = m.e.get(id);
        if (x === undefined || Math.sign(x) !== Math.sign(k)) { inAll = false; break; }
        min = k > 0 ? Math.min(min, x) : Math.max(min, x);
      }
      if (inAll) common.set(id, min);
    }
    // Common numeric factor: the coefficient of the lowest-degree term when all are its multiples.
    let rest: Poly = new Map();
    for (const m of ms) {
      const e = new Map(m.e);
      for (const [id, k] of common) bump(e, id, -k);
      addMono(rest, { c: m.c, e });
    }
    const factors: MathNode[] = [];
    let found = common.size > 0;
    for (const sf of this.specialFactors(rest).slice(0, 2 * MAX_SPECIAL_ATOMS)) {
      for (let i = 0; i < 3 && rest.size > 1; i++) {
        const q = this.divide(rest, sf.poly);
        if (!q) break;
        factors.push(sf.tree);
        rest = q;
        found = true;
      }
    }
    let c = 1;
    // Common integer factor: 4·u − 6·v → 2·(2·u − 3·v).
    const ints = [...rest.values()].map((m) => Math.abs(m.c));
    if (rest.size > 1 && ints.every((v) => Number.isInteger(v) && v < 1e9)) {
      const g = ints.reduce((a, b) => gcd(a, b));
      if (g > 1) { c = g; rest = scalePoly(rest, 1 / g); found = true; }
    }
    if (!found) return null;
    const restMono = monoOnly(rest);
    if (restMono && restMono.e.size === 0) { c *= restMono.c; rest = constPoly(1); }
    const lead = [...rest.values()].every((m) => m.c < 0) ? -1 : 1;
    if (lead < 0) { c = -c; rest = scalePoly(rest, -1); }
    const head = this.monoTree({ c, e: common }, true);
    let tree = head.tree;
    const restTree = rest.size === 1 && monoOnly(rest)?.e.size === 0 ? null : this.best(rest, depth + 1);
    const extra = [...factors, ...(restTree ? [restTree] : [])];
    if (extra.length > 0) {
      const prod = extra.reduce((x, y) => op('multiply', [x, y]));
      if (isNum(tree, 1)) tree = prod;
      else if (isOp(tree, 'divide')) {
        const [t, b] = args(tree) as [MathNode, MathNode];
        tree = op('divide', [isNum(t, 1) ? prod : op('multiply', [t, prod]), b]);
      } else tree = op('multiply', [tree, prod]);
    }
    return head.negative ? neg(tree) : tree;
  }

  /**
   * Over a common denominator, the sums in it expanded where they multiply the numerator:
   * 1.5/(1 + |x|) − 1.5·|x|/(1 + |x|)² = (1.5·(1 + |x|) − 1.5·|x|)/(1 + |x|)² = 1.5/(1 + |x|)².
   * Exact algebra (multiply and divide by the same non-zero denominator); `best` keeps it only when it
   * prints shorter.
   */
  private together(p: Poly, depth: number): MathNode | null {
    if (p.size < 2) return null;
    const den = new Map<number, number>();
    for (const m of p.values()) {
      for (const [id, k] of m.e) if (k < 0 && (this.atoms[id] as Atom).poly) den.set(id, Math.max(den.get(id) ?? 0, -k));
    }
    if (den.size === 0) return null;
    try {
      let num: Poly = new Map();
      for (const m of p.values()) {
        const e = new Map(m.e);
        for (const [id, k] of den) bump(e, id, k);
        const expand: [number, number][] = [];
        for (const [id, k] of e) if (den.has(id) && k > 0) expand.push([id, k]);
        for (const [id] of expand) e.delete(id);
        let term: Poly = new Map();
        addMono(term, this.normalizeMono({ c: m.c, e }));
        for (const [id, k] of expand) term = this.mulPoly(term, this.powPoly((this.atoms[id] as Atom).poly as Poly, k));
        num = addPoly(num, term);
      }
      if (num.size >= p.size) return null;
      const numMono = monoOnly(num);
      if (numMono) {
        // A single term over the denominator: one monomial with the denominator's negative powers.
        const e = new Map(numMono.e);
        for (const [id, k] of den) bump(e, id, -k);
        const t = this.monoTree({ c: numMono.c, e }, true);
        return t.negative ? neg(t.tree) : t.tree;
      }
      const denTree = this.monoTree({ c: 1, e: den }, false).tree;
      return op('divide', [this.best(num, depth + 1), denTree]);
    } catch (e) {
      if (e instanceof Abort) return null;
      throw e;
    }
  }

  /** Terms grouped by what multiplies a σ/tanh atom, each group factored: σ + k·x·σ·(1 − σ). */
  private grouped(p: Poly, depth: number): MathNode | null {
    const specials = this.specialAtoms(p);
    let best: MathNode | null = null;
    let bestLen = Infinity;
    for (const s of specials) {
      const groups = new Map<string, Poly>();
      for (const m of p.values()) {
        const e = new Map(m.e);
        e.delete(s);
        const k = monoKey(e);
        const g = groups.get(k) ?? new Map();
        addMono(g, m);
        groups.set(k, g);
      }
      if (groups.size < 2 || groups.size === p.size) continue;
      const parts = [...groups.values()].map((g) => {
        const t = this.factored(g, depth + 1) ?? this.flat(g);
        return splitSign(t);
      });
      const tree = this.sumTree(parts);
      const len = printedLength(tree);
      if (len < bestLen) { best = tree; bestLen = len; }
    }
    return best;
  }

  /**
   * P as a combination of the derivative-friendly basis of one σ or tanh atom (degree ≤ 3):
   * tanh t: 1, t, 1 − t², t·(1 − t²); σ s: 1, s, s·(1 − s), s·(1 − s)·(1 − 2s). Coefficients are
   * polynomials in the other atoms: 0.5 + 0.5·tanh(u) + x·(…)·(1 − tanh(u)²).
   */
  private basis(p: Poly, depth: number): MathNode | null {
    const specials = this.specialAtoms(p);
    let best: MathNode | null = null;
    let bestLen = Infinity;
    for (const id of specials) {
      const cs: Poly[] = [new Map(), new Map(), new Map(), new Map()];
      let ok = true;
      for (const m of p.values()) {
        const k = m.e.get(id) ?? 0;
        if (k < 0 || k > 3) { ok = false; break; }
        const e = new Map(m.e);
        e.delete(id);
        addMono(cs[k] as Poly, { c: m.c, e });
      }
      if (!ok) continue;
      const [c0, c1, c2, c3] = cs as [Poly, Poly, Poly, Poly];
      const a = this.atomNode(id);
      const one = op('subtract', [num(1), isFn(a, 'tanh') ? op('pow', [a, num(2)]) : a]);
      let terms: [Poly, MathNode | null][];
      if (isFn(a, 'tanh')) {
        terms = [[addPoly(c0, c2), null], [addPoly(c1, c3), a], [scalePoly(c2, -1), one], [scalePoly(c3, -1), op('multiply', [a, one])]];
      } else {
        const b2 = op('multiply', [a, one]);
        const b3 = op('multiply', [b2, op('subtract', [num(1), op('multiply', [num(2), a])])]);
        terms = [[c0, null], [addPoly(addPoly(c1, c2), c3), a], [scalePoly(addPoly(c2, scalePoly(c3, 1.5)), -1), b2], [scalePoly(c3, 0.5), b3]];
      }
      const parts: { tree: MathNode; negative: boolean }[] = [];
      for (const [coef, basisTree] of terms) {
        if (coef.size === 0) continue;
        const negative = [...coef.values()].every((m) => m.c < 0);
        const c = negative ? scalePoly(coef, -1) : coef;
        const cm = monoOnly(c);
        let tree: MathNode;
        if (basisTree === null) tree = this.best(c, depth + 1);
        else if (cm && cm.e.size === 0 && Math.abs(cm.c - 1) <= 1e-12) tree = basisTree;
        else {
          const ct = cm ? this.monoTree(cm, true).tree : this.best(c, depth + 1);
          tree = isOp(ct, 'divide') ? op('divide', [op('multiply', [args(ct)[0] as MathNode, basisTree]), args(ct)[1] as MathNode]) : op('multiply', [ct, basisTree]);
        }
        parts.push({ tree, negative });
      }
      const tree = this.sumTree(parts);
      const len = printedLength(tree);
      if (len < bestLen) { best = tree; bestLen = len; }
    }
    return best;
  }

  /** σ and tanh atoms of P; none when there are more than MAX_SPECIAL_ATOMS (each costs a pass). */
  private specialAtoms(p: Poly): number[] {
    const ids = [...new Set([...p.values()].flatMap((m) => [...m.e.keys()]))].filter((id) => isFn(this.atomNode(id), 'sigmoid') || isFn(this.atomNode(id), 'tanh'));
    return ids.length > MAX_SPECIAL_ATOMS ? [] : ids;
  }

  private best(p: Poly, depth = 0): MathNode {
    this.spend(4 * p.size);
    const flat = this.flat(p);
    if (depth > 2) return flat;
    let best = flat;
    let bestLen = printedLength(flat);
    const b = this.basis(p, depth);
    // A basis rewrite earns no bonus for its σ(1 − σ) terms: they are summands, not factors.
    for (const [c, len0] of [[this.factored(p, depth), 0], [this.grouped(p, depth), 0], [this.together(p, depth), 0], [b, b ? SPECIAL_BONUS * specialCount(b) : 0]] as const) {
      if (!c) continue;
      const len = printedLength(c) + len0;
      if (len < bestLen) { best = c; bestLen = len; }
    }
    return best;
  }

  /** Φ(u) for (1 + erf(u/√2))/2 terms, then the best-reading tree. */
  fromPoly(p0: Poly): MathNode {
    let p = p0;
    const constTerm = p.get('');
    if (constTerm) {
      for (const [k, m] of p) {
        if (m.e.size !== 1) continue;
        const [[id, x]] = [...m.e.entries()] as [[number, number]];
        const a = this.atomNode(id);
        if (x !== 1 || !isFn(a, 'erf')) continue;
        const inner = this.toPoly(args(a)[0] as MathNode);
        const im = monoOnly(inner);
        if (!im || im.e.size !== 1 || Math.abs(im.c - Math.SQRT1_2) > 1e-12) continue;
        const [[wid, wk]] = [...im.e.entries()] as [[number, number]];
        if (wk !== 1 || Math.abs(m.c - constTerm.c) > 1e-12 * Math.abs(m.c)) continue;
        const next: Poly = new Map(p);
        next.delete(k);
        next.delete('');
        addMono(next, { c: 2 * m.c, e: new Map([[this.atom(fn('normal_cdf', [this.atomNode(wid)]), 2), 1]]) });
        p = next;
        break;
      }
    }
    return this.best(p);
  }
}

/** A constant in (0, 1) with a long decimal that is p/q for q ≤ 12 (1/6, 2/3), as that fraction. */
function asFraction(c: number): MathNode | null {
  if (!(c > 0 && c < 1) || String(c).length <= 6) return null;
  for (let q = 2; q <= 12; q++) {
    const pq = c * q;
    if (Math.abs(pq - Math.round(pq)) <= 1e-12 * q) return op('divide', [num(Math.round(pq)), num(q)]);
  }
  return null;
}

const COMPARISONS = new Set(['smaller', 'smallerEq', 'larger', 'largerEq']);

/**
 * Equivalent, shorter comparisons (exact over the reals, display only):
 * max(u, c) < d → u < d when c < d; min(u, c) > d → u > d when c > d; u + c < d → u < d − c.
 */
function simplerComparison(n: MathNode): MathNode {
  const f = opFn(n);
  let [a, b] = args(n) as [MathNode, MathNode];
  if (!isNum(b)) return n;
  const d = numValue(b);
  const below = f === 'smaller' || f === 'smallerEq';
  for (let i = 0; i < 4; i++) {
    if (isFn(a) && args(a).length === 2 && isNum(args(a)[1] as MathNode)) {
      const c = numValue(args(a)[1] as MathNode);
      // max(u, c) < d with c < d: true whenever u ≤ c, so it is u < d; likewise min(u, c) > d with c > d.
      if ((fnName(a) === 'max' && below && c < d) || (fnName(a) === 'min' && !below && c > d)) { a = args(a)[0] as MathNode; continue; }
    }
    if (isOp(a, 'add') && isNum(args(a)[0] as MathNode) && !isNum(args(a)[1] as MathNode)) a = op('add', [args(a)[1] as MathNode, args(a)[0] as MathNode]);
    if (isOp(a, 'multiply') && args(a).length === 2 && isNum(args(a)[0] as MathNode) && numValue(args(a)[0] as MathNode) !== 0) {
      // k·u < d → u < d/k (the comparison turns round for k < 0), when d/k is exact.
      const k = numValue(args(a)[0] as MathNode);
      const q = d / k;
      if (q * k === d && String(q).length <= 8) {
        const flip: Readonly<Record<string, string>> = { smaller: 'larger', smallerEq: 'largerEq', larger: 'smaller', largerEq: 'smallerEq' };
        return op(k > 0 ? f : (flip[f] as string), [args(a)[1] as MathNode, num(q)]);
      }
    }
    if ((isOp(a, 'add') || isOp(a, 'subtract')) && isNum(args(a)[1] as MathNode)) {
      const c = numValue(args(a)[1] as MathNode) * (isOp(a, 'add') ? 1 : -1);
      const moved = d - c;
      // Only when the moved constant is exact (no new rounding in what is shown).
      if (Number.isFinite(moved) && moved + c === d) { b = num(moved); a = args(a)[0] as MathNode; return simplerComparison(op(f, [a, b])); }
    }
    break;
  }
  return a === args(n)[0] ? n : op(f, [a, b]);
}

/** A tree as ± magnitude: −u, (−2)·u and (−2·u)/v all count as negative. */
function splitSign(t: MathNode): { tree: MathNode; negative: boolean } {
  if (isOp(t, 'unaryMinus')) return { tree: args(t)[0] as MathNode, negative: true };
  if (isNum(t) && numValue(t) < 0) return { tree: num(-numValue(t)), negative: true };
  if (isOp(t, 'multiply') || isOp(t, 'divide')) {
    const [a, ...rest] = args(t) as [MathNode, ...MathNode[]];
    const inner = splitSign(a);
    if (inner.negative) {
      const head = isNum(inner.tree, 1) && isOp(t, 'multiply') ? null : inner.tree;
      const kids = head ? [head, ...rest] : rest;
      const tree = kids.length === 1 ? (kids[0] as MathNode) : op(opFn(t), kids);
      return { tree, negative: true };
    }
  }
  return { tree: t, negative: false };
}

function gcd(a: number, b: number): number {
  return b === 0 ? a : gcd(b, a % b);
}

function bump(e: Map<number, number>, id: number, k: number): void {
  const v = (e.get(id) ?? 0) + k;
  if (v === 0) e.delete(id);
  else e.set(id, v);
}

function isOp(n: MathNode, f: string): boolean {
  return n.type === 'OperatorNode' && opFn(n) === f;
}

let measure: (n: MathNode) => number = (n) => n.toString().length;

/** Sets how candidate trees are compared (display.ts installs its printer). */
export function setPrintedLength(f: (n: MathNode) => number): void {
  measure = f;
}

/** Recognisable factors: 1 − σ(u), 1 − tanh²(u). */
function specialCount(n: MathNode): number {
  let count = 0;
  const walk = (c: MathNode): void => {
    if (isOp(c, 'subtract') && isNum(args(c)[0] as MathNode, 1)) {
      const b = args(c)[1] as MathNode;
      if (isFn(b, 'sigmoid') || (isOp(b, 'pow') && isNum(args(b)[1] as MathNode, 2) && isFn(args(b)[0] as MathNode, 'tanh'))) count++;
    }
    for (const k of children(c)) walk(k);
  };
  walk(n);
  return count;
}

/** Characters a factor such as (1 − σ(x)) may cost before the expanded form is preferred. */
const SPECIAL_BONUS = 8;

/** How well a display tree reads: printed length, recognisable factors counting as shorter. */
export function displayScore(n: MathNode): number {
  return measure(n) - SPECIAL_BONUS * specialCount(n);
}

function printedLength(n: MathNode): number {
  return displayScore(n);
}

/** Polished display tree of a marked derivative tree (display only; see the module comment). */
export function polishForDisplay(node: MathNode, opts: { budgetMs?: number } = {}): MathNode {
  if (countNodes(node, MAX_INPUT_NODES + 1) > MAX_INPUT_NODES) return node;
  try {
    return new Polisher(now() + (opts.budgetMs ?? LIMITS.displayPolishBudgetMs)).polishNode(node);
  } catch (e) {
    if (e instanceof OutOfWork) return node;
    throw e;
  }
}

/** Expands the display-only names (φ, Φ) back into stock mathjs, for checking polished trees. */
export function expandDisplayNames(node: MathNode): MathNode {
  const kids = children(node);
  const n = kids.length === 0 ? node : rebuild(node, kids.map(expandDisplayNames));
  if (isFn(n, 'normal_pdf')) return div(fn('exp', [neg(div(pow(args(n)[0] as MathNode, num(2)), num(2)))]), fn('sqrt', [mul(num(2), sym('pi'))]));
  if (isFn(n, 'normal_cdf')) return mul(num(0.5), add(num(1), fn('erf', [div(args(n)[0] as MathNode, fn('sqrt', [num(2)]))])));
  void sub;
  return n;
}
