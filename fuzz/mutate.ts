/**
 * Mutation operators on text: character-level (insert/delete/replace/duplicate, with characters the
 * parsers care about), token-level (brackets, operators, comment and string openers, hostile names)
 * and line-level (delete, duplicate, swap, splice from another file). Each mutation is small, so a
 * failing mutant stays close to a valid input and is easy to minimise.
 */
import type { Rng } from './rng';

/** Characters and snippets the lexers, notations and parsers treat specially. */
const INTERESTING = [
  '(', ')', '[', ']', '{', '}', ',', ';', ':', '.', '?', '=', '+', '-', '*', '/', '^', '**', '.^', './', '\\', '#', '%', '!',
  '"', "'", '`', '"""', '/*', '*/', '//', '--', '--[[', ']]', '#=', '=#', '%{', '%}', '$', '$$', '&', '|', '&&', '||', '<', '>',
  '<=', '>=', '==', '!=', '->', '=>', '::', '@', '~', '\n', '\r\n', '\t', ' ', '\u00a0', '\u200b', '\ufeff', '\u0000',
  'σ', '·', '×', '−', '√', '²', '³', '⁻¹', 'π', 'α', 'β', 'λ', '∂', '′', '″', '…', 'e^', 'e^{', '\\frac{', '\\left(', '\\right)',
  '\\sigma', '\\operatorname{', '\\sqrt{', '\\cdot', 'np.', 'torch.', 'F.', 'math.', 'std::', 'Math.', '.exp()', '.max(0.0)',
  '1e308', '1e-320', '-0', 'NaN', 'Infinity', 'inf', '0x1F', '1_000', '1.0f', '1.0d0', '3.', '.5', '1e', '99999999999999999999',
  'exp(', 'log(', 'max(', 'where(', 'if ', ' else ', 'lambda x:', 'def ', 'return ', 'function ', 'end', 'x', 'y', 'z',
  'import', 'evaluate', 'createUnit', 'constructor', '__proto__', 'prototype', 'this', 'f(x)=', 'eval', 'require',
];

function randomChar(r: Rng): string {
  return r.weighted<() => string>([
    [6, () => String.fromCharCode(r.int(32, 126))],
    [1, () => String.fromCharCode(r.int(0, 31))],
    [1, () => String.fromCharCode(r.int(0x80, 0x2fff))],
    [1, () => String.fromCodePoint(r.int(0x1f300, 0x1f6ff))],
    [1, () => String.fromCharCode(r.int(0xd800, 0xdfff))], // lone surrogate
  ])();
}

/** One small character- or token-level mutation. */
export function mutateOnce(text: string, r: Rng): string {
  const at = text.length === 0 ? 0 : r.int(0, text.length);
  const span = Math.min(text.length - at, r.int(1, 8));
  return r.weighted<() => string>([
    [3, () => text.slice(0, at) + r.pick(INTERESTING) + text.slice(at)],
    [2, () => text.slice(0, at) + randomChar(r) + text.slice(at)],
    [2, () => text.slice(0, at) + text.slice(at + Math.max(1, span))],
    [2, () => text.slice(0, at) + r.pick(INTERESTING) + text.slice(at + Math.max(1, span))],
    [1, () => text.slice(0, at) + text.slice(at, at + span).repeat(r.int(2, 20)) + text.slice(at)],
    [1, () => text.slice(0, at)],
    [1, () => text.slice(at)],
    [1, () => {
      // Wrap a slice in brackets (nesting).
      const end = at + span;
      const [o, c] = r.pick([['(', ')'], ['[', ']'], ['{', '}'], ['\\left(', '\\right)'], ['{', '}']] as const);
      const n = r.int(1, 60);
      return text.slice(0, at) + o.repeat(n) + text.slice(at, end) + c.repeat(r.bool(0.8) ? n : r.int(0, n)) + text.slice(end);
    }],
    [1, () => text.slice(0, at) + r.pick(INTERESTING).repeat(r.int(10, 400)) + text.slice(at)],
  ])();
}

/** Several mutations in a row. */
export function mutate(text: string, r: Rng, max = 4): string {
  let t = text;
  const n = r.int(1, max);
  for (let i = 0; i < n; i++) t = mutateOnce(t, r);
  return t;
}

/** Line-level mutations of a source file, then a few character-level ones. */
export function mutateSource(text: string, r: Rng, donors: readonly string[]): string {
  let lines = text.split('\n');
  const rounds = r.int(1, 6);
  for (let k = 0; k < rounds; k++) {
    const i = r.int(0, Math.max(0, lines.length - 1));
    r.weighted<() => void>([
      [2, () => { lines.splice(i, 1); }],
      [2, () => { lines.splice(i, 0, lines[i] ?? ''); }],
      [1, () => { const j = r.int(0, Math.max(0, lines.length - 1)); const a = lines[i] ?? ''; lines[i] = lines[j] ?? ''; lines[j] = a; }],
      [2, () => {
        const donor = r.pick(donors).split('\n');
        const from = r.int(0, Math.max(0, donor.length - 1));
        lines.splice(i, 0, ...donor.slice(from, from + r.int(1, 12)));
      }],
      [3, () => { lines[i] = mutate(lines[i] ?? '', r, 3); }],
      [1, () => { lines = lines.slice(0, i); }],
      [1, () => { lines[i] = (lines[i] ?? '') + ' '.repeat(r.int(100, 5000)); }],
    ])();
  }
  return lines.join(r.bool(0.1) ? '\r\n' : '\n');
}
