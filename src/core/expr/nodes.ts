/**
 * Small constructors and queries over mathjs nodes, with the light folding every stage needs so trees
 * stay small: 0·u → 0, 1·u → u, u + 0 → u, u^1 → u, −(−u) → u, numbers combined.
 */
import type { MathNode } from 'mathjs';
import { math } from '../math';

type AnyNode = MathNode & Record<string, unknown>;

export function num(v: number): MathNode {
  return new math.ConstantNode(v);
}

export function sym(name: string): MathNode {
  return new math.SymbolNode(name);
}

export function fn(name: string, args: MathNode[]): MathNode {
  return new math.FunctionNode(new math.SymbolNode(name), args);
}

export function isNum(n: MathNode, v?: number): boolean {
  if (n.type !== 'ConstantNode') return false;
  const value = (n as AnyNode).value;
  return typeof value === 'number' && (v === undefined || value === v);
}

export function numValue(n: MathNode): number {
  return (n as AnyNode).value as number;
}

export function isSym(n: MathNode, name?: string): boolean {
  return n.type === 'SymbolNode' && (name === undefined || (n as AnyNode).name === name);
}

export function symName(n: MathNode): string {
  return (n as AnyNode).name as string;
}

export function isFn(n: MathNode, name?: string): boolean {
  if (n.type !== 'FunctionNode') return false;
  return name === undefined || fnName(n) === name;
}

export function fnName(n: MathNode): string {
  return ((n as AnyNode).fn as AnyNode).name as string;
}

export function args(n: MathNode): MathNode[] {
  return ((n as AnyNode).args as MathNode[] | undefined) ?? [];
}

export function isOpNode(n: MathNode, fnName?: string): boolean {
  return n.type === 'OperatorNode' && (fnName === undefined || (n as AnyNode).fn === fnName);
}

export function opFn(n: MathNode): string {
  return (n as AnyNode).fn as string;
}

export function isCond(n: MathNode): boolean {
  return n.type === 'ConditionalNode';
}

export function condParts(n: MathNode): { c: MathNode; a: MathNode; b: MathNode } {
  const x = n as AnyNode;
  return { c: x.condition as MathNode, a: x.trueExpr as MathNode, b: x.falseExpr as MathNode };
}

const SYMBOL: Readonly<Record<string, string>> = {
  add: '+', subtract: '-', multiply: '*', divide: '/', pow: '^', unaryMinus: '-', unaryPlus: '+',
  smaller: '<', smallerEq: '<=', larger: '>', largerEq: '>=', equal: '==', unequal: '!=', and: 'and', or: 'or', not: 'not',
};

export function op(fnName: string, operands: MathNode[]): MathNode {
  const s = SYMBOL[fnName];
  if (s === undefined) throw new Error(`internal: unknown operator ${fnName}`);
  return new math.OperatorNode(s as '+', fnName as 'add', operands);
}

export function cond(c: MathNode, a: MathNode, b: MathNode): MathNode {
  if (key(a) === key(b)) return a;
  return new math.ConditionalNode(c, a, b);
}

function finite(v: number): boolean {
  return Number.isFinite(v);
}

export function add(a: MathNode, b: MathNode): MathNode {
  if (isNum(a, 0)) return b;
  if (isNum(b, 0)) return a;
  if (isNum(a) && isNum(b) && finite(numValue(a) + numValue(b))) return num(numValue(a) + numValue(b));
  if (isOpNode(b, 'unaryMinus')) return sub(a, args(b)[0] as MathNode);
  if (isNum(b) && numValue(b) < 0) return sub(a, num(-numValue(b)));
  return op('add', [a, b]);
}

export function sub(a: MathNode, b: MathNode): MathNode {
  if (isNum(b, 0)) return a;
  if (isNum(a, 0)) return neg(b);
  if (isNum(a) && isNum(b) && finite(numValue(a) - numValue(b))) return num(numValue(a) - numValue(b));
  if (isOpNode(b, 'unaryMinus')) return add(a, args(b)[0] as MathNode);
  return op('subtract', [a, b]);
}

export function neg(a: MathNode): MathNode {
  if (isNum(a)) return num(-numValue(a));
  if (isOpNode(a, 'unaryMinus')) return args(a)[0] as MathNode;
  if (isOpNode(a, 'subtract')) return sub(args(a)[1] as MathNode, args(a)[0] as MathNode);
  if (isOpNode(a, 'multiply') && isNum(args(a)[0] as MathNode)) return mul(num(-numValue(args(a)[0] as MathNode)), args(a)[1] as MathNode);
  return op('unaryMinus', [a]);
}

export function mul(a: MathNode, b: MathNode): MathNode {
  if (isNum(a, 0) || isNum(b, 0)) return num(0);
  if (isNum(a, 1)) return b;
  if (isNum(b, 1)) return a;
  if (isNum(a, -1)) return neg(b);
  if (isNum(b, -1)) return neg(a);
  if (isNum(a) && isNum(b) && finite(numValue(a) * numValue(b))) return num(numValue(a) * numValue(b));
  // Numbers in front: u·2 → 2·u; 2·(3·u) → 6·u.
  if (isNum(b) && !isNum(a)) return mul(b, a);
  if (isNum(a) && isOpNode(b, 'multiply') && isNum(args(b)[0] as MathNode)) return mul(num(numValue(a) * numValue(args(b)[0] as MathNode)), args(b)[1] as MathNode);
  // u·(c·w) → c·(u·w): numbers lead, so canonical text reads back to the same tree.
  if (!isNum(a) && isOpNode(b, 'multiply') && isNum(args(b)[0] as MathNode)) return mul(args(b)[0] as MathNode, mul(a, args(b)[1] as MathNode));
  // u·(1/v) → u/v
  if (isOpNode(b, 'divide') && isNum(args(b)[0] as MathNode, 1)) return div(a, args(b)[1] as MathNode);
  if (isOpNode(a, 'unaryMinus')) return neg(mul(args(a)[0] as MathNode, b));
  if (isOpNode(b, 'unaryMinus')) return neg(mul(a, args(b)[0] as MathNode));
  return op('multiply', [a, b]);
}

export function div(a: MathNode, b: MathNode): MathNode {
  if (isNum(a, 0)) return num(0);
  if (isNum(b, 1)) return a;
  if (isNum(a) && isNum(b) && numValue(b) !== 0 && finite(numValue(a) / numValue(b))) {
    const q = numValue(a) / numValue(b);
    // Keep 1/3 as written rather than 0.333…, unless the quotient is short.
    if (Number.isInteger(q) || String(q).length <= 8) return num(q);
  }
  if (isOpNode(a, 'unaryMinus')) return neg(div(args(a)[0] as MathNode, b));
  return op('divide', [a, b]);
}

export function pow(a: MathNode, b: MathNode): MathNode {
  if (isNum(b, 1)) return a;
  if (isNum(b, 0)) return num(1);
  if (isNum(a) && isNum(b) && finite(numValue(a) ** numValue(b)) && Number.isInteger(numValue(b)) && Math.abs(numValue(b)) <= 8) return num(numValue(a) ** numValue(b));
  return op('pow', [a, b]);
}

const symbolSets = new WeakMap<MathNode, ReadonlySet<string>>();

/** Symbols in `n` (not function names), cached per node: trees are never mutated in the engine. */
function symbolsOf(n: MathNode): ReadonlySet<string> {
  const hit = symbolSets.get(n);
  if (hit) return hit;
  let out: ReadonlySet<string>;
  if (n.type === 'SymbolNode') out = new Set([(n as AnyNode).name as string]);
  else {
    const kids = children(n);
    if (kids.length === 1) out = symbolsOf(kids[0] as MathNode);
    else {
      const set = new Set<string>();
      for (const k of kids) for (const name of symbolsOf(k)) set.add(name);
      out = set;
    }
  }
  symbolSets.set(n, out);
  return out;
}

/** Does `n` contain the symbol `v`? */
export function dependsOn(n: MathNode, v: string): boolean {
  return symbolsOf(n).has(v);
}

/** Node count, stopping early at `cap`. */
export function countNodes(n: MathNode, cap = Infinity): number {
  let count = 0;
  const stack: MathNode[] = [n];
  while (stack.length > 0 && count < cap) {
    const c = stack.pop() as MathNode;
    count++;
    if (c.type === 'ConditionalNode') {
      const p = condParts(c);
      stack.push(p.c, p.a, p.b);
    } else if (c.type === 'ParenthesisNode') stack.push((c as AnyNode).content as MathNode);
    else stack.push(...args(c));
  }
  return count;
}

/** Free symbols (not function names), in first-seen order. */
export function freeSymbols(n: MathNode): string[] {
  const seen = new Set<string>();
  const walk = (c: MathNode): void => {
    if (c.type === 'SymbolNode') { seen.add((c as AnyNode).name as string); return; }
    if (c.type === 'ConditionalNode') { const p = condParts(c); walk(p.c); walk(p.a); walk(p.b); return; }
    if (c.type === 'ParenthesisNode') { walk((c as AnyNode).content as MathNode); return; }
    for (const a of args(c)) walk(a);
  };
  walk(n);
  return [...seen];
}

/** Replaces symbols by nodes. */
export function substitute(n: MathNode, map: ReadonlyMap<string, MathNode>): MathNode {
  return n.transform((c) => (c.type === 'SymbolNode' && map.has((c as AnyNode).name as string) ? (map.get((c as AnyNode).name as string) as MathNode).cloneDeep() : c));
}

/** Rebuilds a node with new children through the folding constructors. */
export function rebuild(n: MathNode, kids: MathNode[]): MathNode {
  if (n.type === 'OperatorNode') {
    const f = opFn(n);
    const [a, b] = kids as [MathNode, MathNode];
    switch (f) {
      case 'add': return add(a, b);
      case 'subtract': return sub(a, b);
      case 'multiply': return kids.length === 2 ? mul(a, b) : kids.reduce((x, y) => mul(x, y));
      case 'divide': return div(a, b);
      case 'pow': return pow(a, b);
      case 'unaryMinus': return neg(a);
      case 'unaryPlus': return a;
      default: return op(f, kids);
    }
  }
  if (n.type === 'FunctionNode') return fn(fnName(n), kids);
  if (n.type === 'ConditionalNode') return cond(kids[0] as MathNode, kids[1] as MathNode, kids[2] as MathNode);
  return n;
}

/** Children in order (condition, branches for conditionals). */
export function children(n: MathNode): MathNode[] {
  if (n.type === 'ConditionalNode') { const p = condParts(n); return [p.c, p.a, p.b]; }
  if (n.type === 'ParenthesisNode') return [(n as AnyNode).content as MathNode];
  if (n.type === 'OperatorNode' || n.type === 'FunctionNode') return args(n);
  return [];
}

/** Light clean-up: folding constructors applied bottom-up, parentheses removed. */
export function tidy(n: MathNode): MathNode {
  if (n.type === 'ParenthesisNode') return tidy((n as AnyNode).content as MathNode);
  const kids = children(n);
  if (kids.length === 0) return n;
  return rebuild(n, kids.map(tidy));
}

const keys = new WeakMap<MathNode, string>();

/**
 * Structural key, cached per node. Linear in the tree: mathjs `toString` re-prints children while
 * placing parentheses, which was measured to take seconds on 24-deep exp towers.
 */
export function key(n: MathNode): string {
  const hit = keys.get(n);
  if (hit !== undefined) return hit;
  let k: string;
  switch (n.type) {
    case 'ConstantNode': k = `#${String((n as AnyNode).value)}`; break;
    case 'SymbolNode': k = `$${(n as AnyNode).name as string}`; break;
    case 'ParenthesisNode': k = key((n as AnyNode).content as MathNode); break;
    case 'OperatorNode': k = `${opFn(n)}(${args(n).map(key).join(',')})`; break;
    case 'FunctionNode': k = `@${fnName(n)}(${args(n).map(key).join(',')})`; break;
    case 'ConditionalNode': { const p = condParts(n); k = `?(${key(p.c)},${key(p.a)},${key(p.b)})`; break; }
    default: k = `!${n.type}:${n.toString()}`;
  }
  keys.set(n, k);
  return k;
}
