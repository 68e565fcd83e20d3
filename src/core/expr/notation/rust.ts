/**
 * Method-call dialects (Rust, PyTorch tensors, Kotlin/Java receivers): `x.exp()`, `(-x).exp()`,
 * `x.max(0.0)`, `x.clamp(min=0)`, `x.powi(2)`, `x.tanh()` → `exp(x)`, `exp(-x)`, `max(x, 0.0)` …
 * Also Rust `as f32` casts and closures `|x| expr`.
 */
import { SlopewiseError } from '../../errors';
import type { Item } from './tree';
import type { Token } from './lexer';
import { isGroup, isId, isOp, isParenGroup, paren, synth } from './tree';

const NUMERIC_TYPES = new Set(['f16', 'f32', 'f64', 'i32', 'i64', 'u32', 'u64', 'usize', 'isize', 'bf16']);

/** x as f32 → x */
export function dropAsCasts(items: Item[]): Item[] {
  const out: Item[] = [];
  for (let i = 0; i < items.length; i++) {
    const it = items[i];
    if (isId(it, 'as') && isId(items[i + 1]) && NUMERIC_TYPES.has((items[i + 1] as Token).text)) {
      i++;
      continue;
    }
    out.push(it as Item);
  }
  return out;
}

/**
 * receiver.name(args) → name(receiver, args). The receiver is the atom just before the dot: a
 * number, a name, a bracketed group, or a call (name + group), which makes chains work left to right:
 * x.abs().max(0) → max(abs(x), 0). Julia's broadcast call f.(x) is handled before this (arraylang.ts).
 */
export function methodCalls(items: Item[]): Item[] {
  const out: Item[] = [];
  for (let i = 0; i < items.length; i++) {
    const it = items[i] as Item;
    if (isOp(it, '.') && isId(items[i + 1])) {
      const name = items[i + 1] as Token;
      const args = items[i + 2];
      if (!isParenGroup(args)) {
        throw new SlopewiseError('not-allowed', `Property access .${name.text} is not allowed`, it.start);
      }
      // Receiver: the last atom (and its call name) already in `out`.
      const last = out[out.length - 1];
      if (last === undefined || (isGroup(last) === false && (last as Token).kind === 'op')) {
        throw new SlopewiseError('syntax', `.${name.text}() needs something before the dot`, it.start);
      }
      const receiver: Item[] = [];
      receiver.unshift(out.pop() as Item);
      const before = out[out.length - 1];
      if (isGroup(receiver[0]) && isId(before) && !isOp(out[out.length - 2], '.')) receiver.unshift(out.pop() as Item);
      const callArgs: Item[] = [paren(receiver, it.start)];
      if (args.items.length > 0) callArgs.push(synth('op', ',', it.start), ...args.items);
      out.push(name, { kind: 'group', open: args.open, close: args.close, items: callArgs });
      i += 2;
      continue;
    }
    out.push(it);
  }
  return out;
}

/** Rust closure `|x| body` (at the start of a formula) → variable hint + body. */
export function closureHead(tokens: Token[]): { tokens: Token[]; variable?: string } {
  if (tokens.length >= 4 && tokens[0]?.text === '|' && tokens[1]?.kind === 'id') {
    // |x| or |x: f32|
    let j = 2;
    if (tokens[j]?.text === ':' ) j += 2;
    // |x| / 2 is an absolute value; a closure body starts with an operand.
    const next = tokens[j + 1];
    const operand = next !== undefined && (next.kind !== 'op' || next.text === '(' || next.text === '-' || next.text === '|');
    if (tokens[j]?.text === '|' && operand) return { tokens: tokens.slice(j + 1), variable: tokens[1].text };
  }
  return { tokens };
}
