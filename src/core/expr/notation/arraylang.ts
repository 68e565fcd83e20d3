/**
 * Array languages — Julia, MATLAB/Octave, R, Fortran: broadcast calls `exp.(x)` and `σ.(x)`,
 * dotted operators (handled in cfamily.normaliseOperators), `@(x) body`, `x -> body`, R `ifelse`,
 * `pmax`, `pmin`, Fortran `merge` (resolved in aliases.ts).
 */
import type { Item } from './tree';
import type { Token } from './lexer';
import { isId, isOp, isParenGroup } from './tree';

/** f.(x) → f(x) */
export function broadcastCalls(items: Item[]): Item[] {
  const out: Item[] = [];
  for (let i = 0; i < items.length; i++) {
    const it = items[i] as Item;
    if (isOp(it, '.') && isId(out[out.length - 1]) && isParenGroup(items[i + 1])) continue;
    out.push(it);
  }
  return out;
}

/** MATLAB `@(x) body`, Julia/Java/Kotlin `x -> body`, JS `x => body` / `(x) => body`. */
export function arrowHead(tokens: Token[]): { tokens: Token[]; variable?: string } {
  const t0 = tokens[0];
  if (t0?.text === '@' && tokens[1]?.text === '(' && tokens[2]?.kind === 'id') {
    const close = tokens.findIndex((t) => t.text === ')');
    if (close > 0) return { tokens: tokens.slice(close + 1), variable: tokens[2].text };
  }
  if (t0?.kind === 'id' && (tokens[1]?.text === '->' || tokens[1]?.text === '=>')) return { tokens: tokens.slice(2), variable: t0.text };
  if (t0?.text === '(' && tokens[1]?.kind === 'id') {
    // (x) => body, (x: number) => body, (x::Float64) -> body
    let k = 2;
    while (k < tokens.length && tokens[k]?.text !== ')' && k < 6) k++;
    if (tokens[k]?.text === ')' && (tokens[k + 1]?.text === '=>' || tokens[k + 1]?.text === '->')) {
      return { tokens: tokens.slice(k + 2), variable: tokens[1].text };
    }
  }
  return { tokens };
}
