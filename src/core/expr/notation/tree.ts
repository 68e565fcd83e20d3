/**
 * Bracket tree over tokens: dialect rewrites work on balanced groups instead of scanning text, so
 * every rewrite is linear in the tokens of one level and nothing can backtrack. Absolute-value bars
 * |x| become groups too.
 */
import { SlopewiseError } from '../../errors';
import { LIMITS } from '../../limits';
import type { Token } from './lexer';

export interface Group {
  kind: 'group';
  open: Token;
  close: Token;
  items: Item[];
}

export type Item = Token | Group;

export function isGroup(item: Item | undefined): item is Group {
  return item !== undefined && item.kind === 'group';
}

export function isOp(item: Item | undefined, text?: string): item is Token {
  return item !== undefined && item.kind === 'op' && (text === undefined || item.text === text);
}

export function isId(item: Item | undefined, text?: string): item is Token {
  return item !== undefined && item.kind === 'id' && (text === undefined || item.text === text);
}

export function isParenGroup(item: Item | undefined): item is Group {
  return isGroup(item) && item.open.text === '(';
}

const CLOSER: Readonly<Record<string, string>> = { '(': ')', '[': ']', '{': '}' };

/** Synthesises a token at a position (for rewrites that add text). */
export function synth(kind: Token['kind'], text: string, at: number): Token {
  return { kind, text, start: at, end: at, spaced: true };
}

export function firstStart(item: Item): number {
  return isGroup(item) ? item.open.start : item.start;
}

/** Can an operand start here? (Decides whether `|` opens or closes an absolute value.) */
function expectsOperand(prev: Item | undefined): boolean {
  if (prev === undefined) return true;
  if (isGroup(prev)) return false;
  if (prev.kind === 'op') return prev.text !== ')' && prev.text !== ']' && prev.text !== '}';
  return false;
}

/** Builds the bracket tree; nesting is bounded by LIMITS.maxNesting before any recursion happens. */
export function buildTree(tokens: readonly Token[], inputLength: number): Item[] {
  const root: Item[] = [];
  const stack: { open: Token; items: Item[] }[] = [];
  let current = root;
  for (const t of tokens) {
    if (t.kind === 'op' && (t.text === '(' || t.text === '[' || t.text === '{')) {
      if (stack.length >= LIMITS.maxNesting) throw new SlopewiseError('too-deep', `Nested more than ${LIMITS.maxNesting} levels deep`, t.start);
      stack.push({ open: t, items: current });
      current = [];
      continue;
    }
    if (t.kind === 'op' && t.text === '|' ) {
      const top = stack[stack.length - 1];
      if (top && top.open.text === '|' && !expectsOperand(current[current.length - 1])) {
        stack.pop();
        const g: Group = { kind: 'group', open: top.open, close: t, items: current };
        current = top.items;
        current.push(g);
        continue;
      }
      if (expectsOperand(current[current.length - 1])) {
        if (stack.length >= LIMITS.maxNesting) throw new SlopewiseError('too-deep', `Nested more than ${LIMITS.maxNesting} levels deep`, t.start);
        stack.push({ open: t, items: current });
        current = [];
        continue;
      }
      throw new SlopewiseError('not-allowed', 'Bitwise | is not supported (use or)', t.start);
    }
    if (t.kind === 'op' && (t.text === ')' || t.text === ']' || t.text === '}')) {
      const top = stack.pop();
      if (!top) throw new SlopewiseError('syntax', `Unmatched ${t.text}`, t.start);
      if (CLOSER[top.open.text] !== t.text) {
        throw new SlopewiseError('syntax', top.open.text === '|' ? 'Unclosed |' : `${top.open.text} closed by ${t.text}`, top.open.start);
      }
      const g: Group = { kind: 'group', open: top.open, close: t, items: current };
      current = top.items;
      current.push(g);
      continue;
    }
    current.push(t);
  }
  const open = stack[stack.length - 1];
  if (open) throw new SlopewiseError('syntax', open.open.text === '|' ? 'Unclosed |' : `Unclosed ${open.open.text}`, open.open.start);
  void inputLength;
  return root;
}

/** Splits a level at top-level commas. */
export function splitCommas(items: readonly Item[]): Item[][] {
  const parts: Item[][] = [[]];
  for (const it of items) {
    if (isOp(it, ',')) parts.push([]);
    else parts[parts.length - 1]?.push(it);
  }
  return parts;
}

export function joinCommas(parts: readonly Item[][], at: number): Item[] {
  const out: Item[] = [];
  parts.forEach((p, i) => {
    if (i > 0) out.push(synth('op', ',', at));
    out.push(...p);
  });
  return out;
}

/** Wraps items in a synthetic ( … ) group. */
export function paren(items: Item[], at: number): Group {
  return { kind: 'group', open: synth('op', '(', at), close: synth('op', ')', at), items };
}

/** Flattens back to text for mathjs, with a map from text offsets to input offsets. */
export function emit(items: readonly Item[]): { text: string; map: number[]; idPositions: { name: string; at: number; call: boolean }[] } {
  const parts: string[] = [];
  const map: number[] = [];
  const idPositions: { name: string; at: number; call: boolean }[] = [];
  const put = (s: string, at: number): void => {
    if (parts.length > 0) { parts.push(' '); map.push(at); }
    parts.push(s);
    for (let i = 0; i < s.length; i++) map.push(at);
  };
  const walk = (level: readonly Item[]): void => {
    level.forEach((it, idx) => {
      if (isGroup(it)) {
        if (it.open.text === '|') {
          put('abs', it.open.start);
          put('(', it.open.start);
        } else put(it.open.text === '{' ? '{' : it.open.text, it.open.start);
        walk(it.items);
        put(it.open.text === '|' ? ')' : it.close.text, it.close.start);
        return;
      }
      if (it.kind === 'id') idPositions.push({ name: it.text, at: it.start, call: isParenGroup(level[idx + 1]) });
      put(it.kind === 'str' ? JSON.stringify(it.text) : it.text, it.start);
    });
  };
  walk(items);
  return { text: parts.join(''), map, idPositions };
}
