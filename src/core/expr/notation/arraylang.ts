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
  // Julia's @. broadcast macro changes nothing for scalars.
  if (tokens[0]?.text === '@' && tokens[1]?.text === '.') return arrowHead(tokens.slice(2));
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
  return functionHead(tokens);
}

/**
 * `function(x) body` (R, JS, Lua), `function f(x) … end`, `fn f(x: f32) -> f32 { body }` (Rust),
 * `fun f(x: Double) = body` (Kotlin): the first parameter names the variable; a braced block or a
 * trailing `end` around the body is removed, and so is `return`.
 */
function functionHead(tokens: Token[]): { tokens: Token[]; variable?: string } {
  const t0 = tokens[0]?.text;
  if (t0 !== 'function' && t0 !== 'fn' && t0 !== 'fun' && t0 !== 'func') return { tokens };
  let k = 1;
  if (tokens[k]?.kind === 'id') k++;
  if (tokens[k]?.text !== '(') return { tokens };
  const variable = tokens[k + 1]?.kind === 'id' ? tokens[k + 1]?.text : undefined;
  let depth = 0;
  let close = -1;
  for (let j = k; j < tokens.length; j++) {
    const t = tokens[j]?.text;
    if (t === '(') depth++;
    else if (t === ')') { depth--; if (depth === 0) { close = j; break; } }
  }
  if (close < 0) return { tokens };
  let body = tokens.slice(close + 1);
  // Return types: -> f32, : Double, float64 (Go)
  if (body[0]?.text === '->' || body[0]?.text === ':') body = body.slice(2);
  else if (t0 === 'func' && body[0]?.kind === 'id' && body[1]?.text === '{') body = body.slice(1);
  if (body[0]?.text === '=') body = body.slice(1);
  body = blockBody(body);
  return variable === undefined ? { tokens: body } : { tokens: body, variable };
}

/** `{ return e; }` → e; `… end` → …; leading `return`, trailing `;` dropped. */
export function blockBody(tokens: Token[]): Token[] {
  let body = tokens;
  if (body[0]?.text === '{' && body[body.length - 1]?.text === '}') body = body.slice(1, -1);
  if (body[body.length - 1]?.text === 'end') body = body.slice(0, -1);
  while (body[body.length - 1]?.text === ';') body = body.slice(0, -1);
  if (body[0]?.text === 'return') body = body.slice(1);
  return body;
}
