/**
 * Tokenizer shared by every code dialect and plain notation. Linear scan, no regular expressions.
 * Numbers lose their dialect suffixes here (1.0f, 1.0d0, 2_f32, 1.0_dp, 1e-3L) so every later stage
 * sees plain decimals. Comment starts that belong to a known dialect end the text (`#`, `//`, `--`, `%`, `!`).
 */
import { SlopewiseError } from '../../errors';
import type { Language } from '../../types';
import { isDigit, isIdentChar, isIdentStart, mapBack } from './text';

export type TokenKind = 'num' | 'id' | 'op' | 'str';

export interface Token {
  kind: TokenKind;
  /** Normalised text (number suffixes removed, `d` exponents turned into `e`). */
  text: string;
  /** Offset in the original input. */
  start: number;
  /** Offset in the original input just past the token. */
  end: number;
  /** The token was preceded by white space. */
  spaced: boolean;
}

const OPERATORS_3 = ['===', '!==', '**='];
const OPERATORS_2 = ['**', '.^', '.*', './', '.+', '.-', '==', '!=', '~=', '<=', '>=', '&&', '||', '::', '->', '=>', ':=', '//', '<<', '>>', '+=', '-=', '*=', '/=', '/*'];
const SINGLE = '+-*/^()[]{},;:?<>=!~&|%.@\\#\'"`';

/** Fortran dotted operators: .and. .or. .not. .gt. … */
const FORTRAN_DOTTED: Readonly<Record<string, string>> = {
  and: 'and', or: 'or', not: 'not', gt: '>', lt: '<', ge: '>=', le: '<=', eq: '==', ne: '!=', true: 'true', false: 'false',
};

const CODE_D_SUFFIX = new Set<Language>(['c', 'cpp', 'cuda', 'java', 'kotlin']);

/** Number suffix letters that belong to the dialect (1.0f, 2L, 1.0d); plain maths reads `2d` as 2·d. */
function isSuffixLetter(c: string, language: Language | undefined): boolean {
  if (language === 'plain' || language === 'latex') return false;
  if (c === 'f' || c === 'F' || c === 'L') return true;
  return (c === 'd' || c === 'D') && language !== undefined && CODE_D_SUFFIX.has(language);
}

export interface LexResult {
  tokens: Token[];
  notes: string[];
}

/** Tokenises `text`; `map` maps offsets of `text` to the original input (`end` = input length). */
export function lex(text: string, map: readonly number[], end: number, language: Language | undefined): LexResult {
  const tokens: Token[] = [];
  const notes: string[] = [];
  const pos = (i: number): number => mapBack(map, i, end);
  let i = 0;
  let spaced = false;
  const n = text.length;
  while (i < n) {
    const c = text.charAt(i);
    if (c === ' ' || c === '\t' || c === '\n' || c === '\r') { i++; spaced = true; continue; }
    const start = i;
    // Comments that a dialect allows at the end of a formula.
    if (c === '#' && language !== 'latex') { notes.push('Ignored a trailing # comment'); break; }
    if (c === '/' && text[i + 1] === '/' && language !== 'python') { notes.push('Ignored a trailing // comment'); break; }
    if (c === '/' && text[i + 1] === '*') {
      const close = text.indexOf('*/', i + 2);
      if (close < 0) throw new SlopewiseError('syntax', 'Unclosed /* comment', pos(i));
      i = close + 2;
      spaced = true;
      continue;
    }
    if (c === '-' && text[i + 1] === '-' && language === 'lua') { notes.push('Ignored a trailing -- comment'); break; }
    if (c === '%' && language === 'matlab') { notes.push('Ignored a trailing % comment'); break; }
    if (c === '!' && text[i + 1] !== '=' && language === 'fortran') { notes.push('Ignored a trailing ! comment'); break; }
    if (isDigit(c) || (c === '.' && isDigit(text.charAt(i + 1)))) {
      let j = i;
      let body = '';
      while (j < n && (isDigit(text.charAt(j)) || (text[j] === '_' && isDigit(text.charAt(j + 1)) && j > i))) {
        if (text[j] !== '_') body += text.charAt(j);
        j++;
      }
      if (text[j] === '.' && !(text[j + 1] === '*' || text[j + 1] === '/' || text[j + 1] === '^' || text[j + 1] === '(' || isIdentStart(text.charAt(j + 1)) && !isExponentAt(text, j + 1))) {
        body += '.';
        j++;
        while (j < n && isDigit(text.charAt(j))) { body += text.charAt(j); j++; }
      }
      if (text[j] === 'x' && body === '0') throw new SlopewiseError('not-allowed', 'Hexadecimal numbers are not supported', pos(i));
      if (isExponentAt(text, j)) {
        const letter = text.charAt(j);
        body += 'e';
        j++;
        if (text[j] === '+' || text[j] === '-') { body += text.charAt(j); j++; }
        while (j < n && isDigit(text.charAt(j))) { body += text.charAt(j); j++; }
        if (letter === 'd' || letter === 'D') notes.push('Read a Fortran double-precision exponent (d) as e');
      }
      // Dialect suffixes: 1.0f, 2L, 1.0_f32, 1f64, 1.0_dp, 1.0_8.
      if (text[j] === '_' && isIdentChar(text.charAt(j + 1))) {
        j++;
        while (j < n && isIdentChar(text.charAt(j))) j++;
      } else if ((text[j] === 'f' || text[j] === 'i' || text[j] === 'u') && (text.startsWith('32', j + 1) || text.startsWith('64', j + 1) || text.startsWith('16', j + 1)) && !isIdentChar(text.charAt(j + 3))) {
        j += 3;
      } else if (isSuffixLetter(text.charAt(j), language) && !isIdentChar(text.charAt(j + 1))) {
        j++;
      }
      if (body.endsWith('.')) body += '0';
      if (body.startsWith('.')) body = '0' + body;
      tokens.push({ kind: 'num', text: body, start: pos(start), end: pos(j - 1) + 1, spaced });
      i = j;
      spaced = false;
      continue;
    }
    if (isIdentStart(c)) {
      let j = i + 1;
      while (j < n && isIdentChar(text.charAt(j))) j++;
      tokens.push({ kind: 'id', text: text.slice(i, j), start: pos(start), end: pos(j - 1) + 1, spaced });
      i = j;
      spaced = false;
      continue;
    }
    // A prime after a name or bracket (f'(x), y'') is notation, not a string.
    if (c === '\'' && i > 0 && (isIdentChar(text.charAt(i - 1)) || text[i - 1] === ')' || text[i - 1] === '\'')) {
      tokens.push({ kind: 'op', text: '\'', start: pos(start), end: pos(i) + 1, spaced });
      i++;
      spaced = false;
      continue;
    }
    if (c === '"' || c === '\'' || c === '`') {
      const close = text.indexOf(c, i + 1);
      if (close < 0) throw new SlopewiseError('syntax', `Unclosed ${c} string`, pos(i));
      tokens.push({ kind: 'str', text: text.slice(i + 1, close), start: pos(start), end: pos(close) + 1, spaced });
      i = close + 1;
      spaced = false;
      continue;
    }
    if (c === '.') {
      // Fortran .and. / .gt. …
      let j = i + 1;
      while (j < n && j - i < 7 && ((text.charAt(j) >= 'a' && text.charAt(j) <= 'z') || (text.charAt(j) >= 'A' && text.charAt(j) <= 'Z'))) j++;
      const word = text.slice(i + 1, j).toLowerCase();
      if (j > i + 1 && text[j] === '.' && FORTRAN_DOTTED[word] !== undefined) {
        tokens.push({ kind: word === 'true' || word === 'false' ? 'id' : 'op', text: FORTRAN_DOTTED[word] ?? word, start: pos(start), end: pos(j) + 1, spaced });
        i = j + 1;
        spaced = false;
        continue;
      }
    }
    let op = '';
    for (const o of OPERATORS_3) if (text.startsWith(o, i)) { op = o; break; }
    if (op === '') for (const o of OPERATORS_2) if (text.startsWith(o, i)) { op = o; break; }
    if (op === '' && SINGLE.includes(c)) op = c;
    if (op === '') throw new SlopewiseError('syntax', `Unexpected character '${c}'`, pos(i));
    tokens.push({ kind: 'op', text: op, start: pos(start), end: pos(i + op.length - 1) + 1, spaced });
    i += op.length;
    spaced = false;
  }
  return { tokens, notes };
}

/** An exponent starts at `j`: e/E (or Fortran d/D) followed by a digit or a sign and a digit. */
function isExponentAt(text: string, j: number): boolean {
  const c = text.charAt(j);
  if (!(c === 'e' || c === 'E' || c === 'd' || c === 'D')) return false;
  const d = text.charAt(j + 1);
  if (isDigit(d)) return true;
  return (d === '+' || d === '-') && isDigit(text.charAt(j + 2));
}
