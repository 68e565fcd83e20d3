/**
 * Plain maths and statement shapes shared by all dialects: `f(x) = …`, `y = …`, `y := …`, `y <- …`,
 * declarations (`float y = …`, `let y: f32 = …`, `local y = …`), `return …`, trailing `;`. The left-hand
 * side is dropped; a call-shaped one (`f(x) = …`) names the variable.
 */
import { SlopewiseError } from '../../errors';
import type { Token } from './lexer';

const STATEMENT_WORDS = new Set(['return', 'let', 'const', 'var', 'auto', 'local', 'val', 'mut', 'static', 'constexpr', 'inline', 'real', 'double', 'float', 'pub', 'fn', 'function', 'export']);

export function splitStatement(tokens: Token[]): { tokens: Token[]; variable?: string; lhs?: string } {
  let toks = tokens;
  while (toks.length > 0 && toks[toks.length - 1]?.text === ';') toks = toks.slice(0, -1);
  // Top-level assignment: the first '=', ':=' or '<-' (adjacent < and -) outside brackets.
  let depth = 0;
  let split = -1;
  let width = 1;
  for (let k = 0; k < toks.length; k++) {
    const t = toks[k] as Token;
    if (t.kind !== 'op') continue;
    if (t.text === '(' || t.text === '[' || t.text === '{') depth++;
    else if (t.text === ')' || t.text === ']' || t.text === '}') depth--;
    else if (depth === 0 && (t.text === '=' || t.text === ':=')) { split = k; break; }
    else if (depth === 0 && t.text === '<' && k === 1 && toks[k + 1]?.text === '-' && toks[k + 1]?.start === t.end) { split = k; width = 2; break; }
    else if (depth === 0 && (t.text === '+=' || t.text === '-=' || t.text === '*=' || t.text === '/=')) {
      throw new SlopewiseError('not-allowed', `Compound assignment ${t.text} is not a formula`, t.start);
    }
  }
  let variable: string | undefined;
  let lhs: string | undefined;
  if (split >= 0) {
    const left = toks.slice(0, split);
    toks = toks.slice(split + width);
    // f(x) = …, double f(double x) = …: the last call-shaped part names the variable.
    const open = left.findIndex((t) => t.text === '(');
    // f(x) = …, f'(x) = …, f''(x) = …
    let nameAt = open - 1;
    while (nameAt > 0 && left[nameAt]?.text === '\'') nameAt--;
    if (open > 0 && left[nameAt]?.kind === 'id') {
      lhs = left.slice(nameAt, open).map((t) => t.text).join('');
      const params = left.slice(open + 1).filter((t) => t.kind === 'id');
      const last = params.length > 1 && left[open + 1]?.kind === 'id' && left[open + 2]?.kind === 'id' ? params[1] : params[0];
      variable = last?.text;
    } else {
      const names = left.filter((t) => t.kind === 'id' && !STATEMENT_WORDS.has(t.text));
      lhs = names[names.length - 1]?.text ?? names[0]?.text;
    }
  }
  while (toks.length > 0 && toks[0]?.kind === 'id' && (toks[0].text === 'return')) toks = toks.slice(1);
  if (toks.length === 0) throw new SlopewiseError('syntax', 'Nothing to read on the right-hand side', tokens[tokens.length - 1]?.end ?? 0);
  const result: { tokens: Token[]; variable?: string; lhs?: string } = { tokens: toks };
  if (variable !== undefined) result.variable = variable;
  if (lhs !== undefined) result.lhs = lhs;
  return result;
}
