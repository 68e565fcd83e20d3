/**
 * One linear pass over a source file: code tokens on one side, comments (split into lines with
 * their markers stripped) on the other.
 *
 * Knowing string literals is what keeps `"# not a comment"` and `'--'` out of the comments, and
 * knowing comments is what keeps `// return 0` out of the code. Every character is looked at a
 * bounded number of times (closing delimiters are found with `indexOf` from the current position),
 * so the pass is O(n) whatever the input.
 */
import type { Family, LanguageInfo } from './languages';

export type TokenKind = 'id' | 'num' | 'str' | 'op' | 'nl';

export interface Token {
  kind: TokenKind;
  text: string;
  start: number;
  end: number;
  /** 0-based line of `start`. */
  line: number;
  /** 0-based column of `start` (UTF-16 units from the line start). */
  col: number;
}

export interface CommentLine {
  /** Text after the comment marker (and a block comment's leading `*`), right-trimmed. */
  text: string;
  /** Offset of `text[0]` in the document. */
  start: number;
  line: number;
}

export interface Comment {
  kind: 'line' | 'block' | 'doc';
  start: number;
  end: number;
  lines: CommentLine[];
}

export interface Lexed {
  tokens: Token[];
  comments: Comment[];
  /** Offsets where each line starts. */
  lineStarts: number[];
  /** Lines skipped because they exceed LIMITS.maxLineLength (0-based). */
  longLines: number[];
  /**
   * Per line: 1 when the pass reached the line's start outside any token or comment, right after
   * the previous line's newline token (line 0 always). Lexing from such a point depends only on the
   * text after it, which is what lets `relex` restart and stop there.
   */
  clean: Uint8Array;
}

interface LexConfig {
  line: string[];
  block: { open: string; close: string; nested?: boolean; lineStart?: boolean }[];
  /** Quote characters that open ordinary strings. */
  quotes: string;
  triple: boolean;
  backtick: boolean;
  /** `"…"` strings may span lines. */
  multilineStrings: boolean;
  /** `'` after an identifier, number or closing bracket is an operator (transpose / prime / lifetime). */
  primeAfterValue: boolean;
  rustRaw: boolean;
  luaLong: boolean;
  fortranDots: boolean;
  /** Extra characters stripped after a line-comment marker (`///`, `//!`, `#'`, `--!`). */
  extraMarker: string;
}

const CONFIG: Record<Family, LexConfig> = {
  python: mk({ line: ['#'], quotes: '"\'', triple: true, extraMarker: '#!:' }),
  c: mk({ line: ['//'], block: [{ open: '/*', close: '*/' }], quotes: '"\'', backtick: true, rustRaw: true, primeAfterValue: true, extraMarker: '/!<' }),
  julia: mk({ line: ['#'], block: [{ open: '#=', close: '=#', nested: true }], quotes: '"\'', triple: true, multilineStrings: true, primeAfterValue: true, backtick: true, extraMarker: '#' }),
  r: mk({ line: ['#'], quotes: '"\'', backtick: true, multilineStrings: true, extraMarker: "#'" }),
  matlab: mk({ line: ['%', '#'], block: [{ open: '%{', close: '%}', lineStart: true }], quotes: '"\'', primeAfterValue: true, extraMarker: '%' }),
  fortran: mk({ line: ['!'], quotes: '"\'', fortranDots: true, extraMarker: '!$' }),
  lua: mk({ line: ['--'], quotes: '"\'', luaLong: true, extraMarker: '-' }),
  dashdash: mk({ line: ['--'], block: [{ open: '{-', close: '-}', nested: true }], quotes: '"', extraMarker: '-|' }),
  semicolon: mk({ line: [';'], quotes: '"', extraMarker: ';' }),
  hash: mk({ line: ['#'], quotes: '"\'', extraMarker: '#' }),
  percent: mk({ line: ['%'], quotes: '', extraMarker: '%' }),
  markdown: mk({ line: [], quotes: '' }),
  generic: mk({ line: ['#', '//'], block: [{ open: '/*', close: '*/' }], quotes: '"', extraMarker: '#/!' }),
};

function mk(p: Partial<LexConfig>): LexConfig {
  return {
    line: [], block: [], quotes: '', triple: false, backtick: false, multilineStrings: false, primeAfterValue: false,
    rustRaw: false, luaLong: false, fortranDots: false, extraMarker: '', ...p,
  };
}

const OPS3 = ['...', '**=', '//=', '>>=', '<<=', '===', '!=='];
const OPS2 = [
  '**', '//', '==', '!=', '<=', '>=', '&&', '||', '->', '=>', '::', ':=', '<-', '.*', './', '.^', '.+', '.-',
  '+=', '-=', '*=', '/=', '..', '~=', "'", '<<', '>>', '^=', '%=', '|>', '?.', '.\'', '|=', '&=',
];

const ID_START = /[A-Za-z_$\u00c0-\u024f\u0370-\u03ff\u1f00-\u1fff]/;
const ID_PART = /[A-Za-z0-9_$!\u00b2\u00b3\u00b9\u00c0-\u024f\u0370-\u03ff\u1f00-\u1fff\u2070-\u209f]/;

/** Operators by their first character, longest first (the pass looks only at those that can match). */
const OPS_BY_FIRST = new Map<string, string[]>();
for (const o of [...OPS3, ...OPS2.filter((o) => o.length === 2)]) {
  const l = OPS_BY_FIRST.get(o[0]!);
  if (l) l.push(o); else OPS_BY_FIRST.set(o[0]!, [o]);
}

function isDigit(c: string | undefined): boolean {
  return c !== undefined && c >= '0' && c <= '9';
}

function isAsciiLetter(k: number): boolean {
  return (k >= 97 && k <= 122) || (k >= 65 && k <= 90);
}

function isIdStart(c: string | undefined): boolean {
  if (c === undefined) return false;
  const k = c.charCodeAt(0);
  // ASCII without the regex (this runs on every character of a file)
  if (k < 128) return isAsciiLetter(k) || k === 95 || k === 36;
  return ID_START.test(c);
}

function isIdPart(c: string | undefined, family: Family): boolean {
  if (c === undefined) return false;
  const k = c.charCodeAt(0);
  // `!` is part of identifiers only in Julia/Rust macros (`push!`, `vec!`); elsewhere it is an operator.
  if (k === 33) return family === 'julia';
  if (k < 128) return isAsciiLetter(k) || (k >= 48 && k <= 57) || k === 95 || k === 36;
  return ID_PART.test(c);
}

export function lex(text: string, info: LanguageInfo, maxLineLength: number): Lexed {
  const { lineStarts, longLines, src } = prepare(text, maxLineLength);
  if (info.family === 'markdown') return proseLines(src, lineStarts, longLines);
  const clean = new Uint8Array(lineStarts.length);
  clean[0] = 1;
  const tokens: Token[] = [];
  const comments: Comment[] = [];
  run(src, info, { offset: 0, line: 0, tokens, comments, clean });
  return { tokens, comments, lineStarts, longLines, clean };
}

/** Line starts, the lines over the length limit, and the text with those lines blanked out. */
function prepare(text: string, maxLineLength: number): { lineStarts: number[]; longLines: number[]; src: string } {
  const lineStarts: number[] = [0];
  const longLines: number[] = [];
  for (let i = 0; i < text.length; i++) if (text.charCodeAt(i) === 10) lineStarts.push(i + 1);

  // Lines longer than the limit are blanked out for the lexer (minified code, data blobs).
  let src = text;
  for (let l = 0; l < lineStarts.length; l++) {
    const s = lineStarts[l]!;
    const e = l + 1 < lineStarts.length ? lineStarts[l + 1]! - 1 : text.length;
    if (e - s > maxLineLength) {
      longLines.push(l);
    }
  }
  if (longLines.length > 0) {
    const parts: string[] = [];
    let prev = 0;
    for (const l of longLines) {
      const s = lineStarts[l]!;
      const e = l + 1 < lineStarts.length ? lineStarts[l + 1]! - 1 : text.length;
      parts.push(text.slice(prev, s), ' '.repeat(e - s));
      prev = e;
    }
    parts.push(text.slice(prev));
    src = parts.join('');
  }
  return { lineStarts, longLines, src };
}

/** Prose files: every line is a candidate line, as if it were a comment. */
function proseLines(src: string, lineStarts: number[], longLines: number[]): Lexed {
  const comments: Comment[] = [];
  const lines: CommentLine[] = [];
  for (let l = 0; l < lineStarts.length; l++) {
    const s = lineStarts[l]!;
    const e = l + 1 < lineStarts.length ? lineStarts[l + 1]! - 1 : src.length;
    pushLine(lines, src, s, e, l, '');
  }
  if (lines.length > 0) comments.push({ kind: 'block', start: 0, end: src.length, lines });
  const clean = new Uint8Array(lineStarts.length);
  clean.fill(1);
  return { tokens: [], comments, lineStarts, longLines, clean };
}

interface RunState {
  /** Where to start: a clean line start (or 0). */
  offset: number;
  line: number;
  /** Everything lexed before `offset`; the pass appends. */
  tokens: Token[];
  comments: Comment[];
  /** Marked for every clean line start the pass reaches. */
  clean: Uint8Array;
  /**
   * Asked at every clean line start reached after `offset`: true stops the pass there (the caller
   * takes the rest from an earlier pass). Returns where it stopped, or -1 at the end of the text.
   */
  stopAt?: (offset: number, line: number) => boolean;
}

/** The pass itself, from a clean line start; returns the offset and line where `stopAt` stopped it, or null. */
function run(src: string, info: LanguageInfo, st: RunState): { offset: number; line: number } | null {
  const cfg = CONFIG[info.family];
  const { tokens, comments, clean } = st;
  let line = st.line;
  let lineStart = st.offset;
  let i = st.offset;
  const n = src.length;
  // First characters of this language's comment markers: any other character skips those checks.
  const markerFirst = new Set<string>([...cfg.block.map((b) => b.open[0]!), ...cfg.line.map((m) => m[0]!)]);

  const advanceLines = (from: number, to: number): void => {
    for (let k = from; k < to; k++) {
      if (src.charCodeAt(k) === 10) {
        line++;
        lineStart = k + 1;
      }
    }
  };
  const push = (kind: TokenKind, start: number, end: number): void => {
    tokens.push({ kind, text: src.slice(start, end), start, end, line, col: start - lineStart });
  };
  const lastSignificant = (): Token | undefined => tokens[tokens.length - 1];
  const atLineStart = (pos: number): boolean => {
    for (let k = pos - 1; k >= lineStart; k--) {
      const c = src[k];
      if (c !== ' ' && c !== '\t') return false;
    }
    return true;
  };

  while (i < n) {
    const c = src[i]!;
    if (c === '\n') {
      push('nl', i, i + 1);
      i++;
      line++;
      lineStart = i;
      clean[line] = 1;
      if (st.stopAt && st.stopAt(i, line)) return { offset: i, line };
      continue;
    }
    if (c === ' ' || c === '\t' || c === '\r' || c === '\f' || c === '\v') {
      i++;
      continue;
    }

    // Fortran fixed form: c, C, * or ! in column 1 start a comment line.
    if (info.fixedForm && i === lineStart && (c === 'c' || c === 'C' || c === '*')) {
      const e = lineEnd(src, i);
      comments.push(lineComment(src, i + 1, e, line, cfg.extraMarker));
      i = e;
      continue;
    }

    // Block comments.
    let matched = false;
    const marker = markerFirst.has(c);
    if (marker) for (const b of cfg.block) {
      if (src.startsWith(b.open, i) && (!b.lineStart || atLineStart(i))) {
        const end = findBlockEnd(src, i + b.open.length, b.open, b.close, !!b.nested);
        const bodyEnd = Math.max(i + b.open.length, end - (end <= n && src.startsWith(b.close, end - b.close.length) ? b.close.length : 0));
        comments.push(blockComment(src, i + b.open.length, bodyEnd, line, i - lineStart, 'block'));
        advanceLines(i, end);
        i = end;
        matched = true;
        break;
      }
    }
    if (matched) continue;

    // Lua long comments --[[ ]] / --[==[ ]==].
    if (cfg.luaLong && src.startsWith('--[', i)) {
      const lvl = longBracketLevel(src, i + 2);
      if (lvl >= 0) {
        const close = ']' + '='.repeat(lvl) + ']';
        const bodyStart = i + 2 + lvl + 2;
        const ci = src.indexOf(close, bodyStart);
        const end = ci < 0 ? n : ci + close.length;
        comments.push(blockComment(src, bodyStart, ci < 0 ? n : ci, line, i - lineStart, 'block'));
        advanceLines(i, end);
        i = end;
        continue;
      }
    }

    // Line comments.
    let lc: string | undefined;
    if (marker) for (const m of cfg.line) if (src.startsWith(m, i)) { lc = m; break; }
    if (lc !== undefined) {
      // MATLAB: `#` is a comment only in Octave; `%` always. Julia `#=` handled above.
      const e = lineEnd(src, i);
      comments.push(lineComment(src, i + lc.length, e, line, cfg.extraMarker));
      i = e;
      continue;
    }

    // MATLAB continuation `...` makes the rest of the line a comment.
    if (info.family === 'matlab' && src.startsWith('...', i)) {
      const e = lineEnd(src, i);
      i = e + (e < n ? 1 : 0);
      if (e < n) { line++; lineStart = i; }
      continue;
    }

    // Strings.
    if (cfg.rustRaw && c === 'r' && (src[i + 1] === '"' || (src[i + 1] === '#' && (src[i + 2] === '"' || src[i + 2] === '#')))) {
      let k = i + 1;
      let hashes = 0;
      while (src[k] === '#') { hashes++; k++; }
      if (src[k] === '"') {
        const close = '"' + '#'.repeat(hashes);
        const ci = src.indexOf(close, k + 1);
        const end = ci < 0 ? n : ci + close.length;
        push('str', i, end);
        advanceLines(i, end);
        i = end;
        continue;
      }
    }
    if (cfg.luaLong && c === '[') {
      const lvl = longBracketLevel(src, i);
      if (lvl >= 0) {
        const close = ']' + '='.repeat(lvl) + ']';
        const ci = src.indexOf(close, i + lvl + 2);
        const end = ci < 0 ? n : ci + close.length;
        push('str', i, end);
        advanceLines(i, end);
        i = end;
        continue;
      }
    }
    if (cfg.triple && (src.startsWith('"""', i) || src.startsWith("'''", i))) {
      const q = src.slice(i, i + 3);
      let k = i + 3;
      let end = n;
      while (k < n) {
        const ch = src[k];
        if (ch === '\\') { k += 2; continue; }
        if (ch === q[0] && src.startsWith(q, k)) { end = k + 3; break; }
        k++;
      }
      const prev = lastSignificant();
      const startLine = line;
      const startCol = i - lineStart;
      // A triple-quoted string standing alone as a statement is a docstring.
      const standalone = (prev === undefined || prev.kind === 'nl' || (prev.kind === 'id' && prev.text === 'doc' && info.family === 'julia') || isStringPrefixOnly(prev, src, i));
      push('str', i, end);
      if (standalone) comments.push(blockComment(src, i + 3, Math.max(i + 3, end - 3), startLine, startCol, 'doc'));
      advanceLines(i, end);
      i = end;
      continue;
    }
    if (c === "'" && cfg.primeAfterValue && isValueEnd(lastSignificant(), i)) {
      push('op', i, i + 1);
      i++;
      continue;
    }
    if (c === "'" && info.language === 'rust') {
      // Char literal 'a' / '\n' or a lifetime 'a.
      if (src[i + 1] === '\\' || src[i + 2] === "'") {
        const ci = src.indexOf("'", i + (src[i + 1] === '\\' ? 3 : 2));
        const end = ci < 0 || ci > i + 12 ? i + 1 : ci + 1;
        push('str', i, end);
        i = end;
      } else {
        push('op', i, i + 1);
        i++;
      }
      continue;
    }
    if ((cfg.quotes.includes(c)) || (cfg.backtick && c === '`')) {
      const end = scanString(src, i, c, c === '`' || cfg.multilineStrings);
      push('str', i, end);
      advanceLines(i, end);
      i = end;
      continue;
    }

    // Numbers.
    if (isDigit(c) || (c === '.' && isDigit(src[i + 1]) && !isValueEnd(lastSignificant(), i))) {
      const end = scanNumber(src, i, info.family);
      push('num', i, end);
      i = end;
      continue;
    }

    // Identifiers (and string prefixes such as r"…", f"…", b'…').
    if (isIdStart(c)) {
      let k = i + 1;
      while (k < n && isIdPart(src[k], info.family)) k++;
      push('id', i, k);
      i = k;
      continue;
    }

    // Fortran dotted operators .gt. .and. .true.
    if (cfg.fortranDots && c === '.') {
      let k = i + 1;
      while (k < n && k - i < 8 && /[A-Za-z]/.test(src[k]!)) k++;
      if (k > i + 1 && src[k] === '.') {
        push('op', i, k + 1);
        i = k + 1;
        continue;
      }
    }

    // Operators.
    let op = 1;
    const cands = OPS_BY_FIRST.get(c);
    if (cands) for (const o of cands) if (src.startsWith(o, i)) { op = o.length; break; }
    push('op', i, i + op);
    i += op;
  }
  return null;
}

function isStringPrefixOnly(prev: Token, src: string, quoteAt: number): boolean {
  // `r"""…"""`: the prefix was lexed as an identifier touching the quote; docstring if it starts a line.
  return prev.kind === 'id' && prev.end === quoteAt && /^[rRbBuUfF]{1,2}$/.test(prev.text) && lineStartBefore(src, prev.start);
}

function lineStartBefore(src: string, pos: number): boolean {
  for (let k = pos - 1; k >= 0; k--) {
    const c = src[k];
    if (c === '\n') return true;
    if (c !== ' ' && c !== '\t') return false;
  }
  return true;
}

function isValueEnd(t: Token | undefined, pos: number): boolean {
  if (!t) return false;
  if (t.end !== pos) return false; // transpose / prime only directly after the value
  if (t.kind === 'id' || t.kind === 'num') return true;
  return t.kind === 'op' && (t.text === ')' || t.text === ']' || t.text === '}' || t.text === "'" || t.text === ".'");
}

function lineEnd(src: string, i: number): number {
  const e = src.indexOf('\n', i);
  return e < 0 ? src.length : e;
}

function longBracketLevel(src: string, i: number): number {
  if (src[i] !== '[') return -1;
  let k = i + 1;
  let lvl = 0;
  while (src[k] === '=') { lvl++; k++; }
  return src[k] === '[' ? lvl : -1;
}

function findBlockEnd(src: string, from: number, open: string, close: string, nested: boolean): number {
  if (!nested) {
    const ci = src.indexOf(close, from);
    return ci < 0 ? src.length : ci + close.length;
  }
  let depth = 1;
  let k = from;
  while (k < src.length) {
    if (src.startsWith(close, k)) {
      depth--;
      k += close.length;
      if (depth === 0) return k;
    } else if (src.startsWith(open, k)) {
      depth++;
      k += open.length;
    } else k++;
  }
  return src.length;
}

function scanString(src: string, i: number, q: string, multiline: boolean): number {
  let k = i + 1;
  while (k < src.length) {
    const ch = src[k];
    if (ch === '\\') { k += 2; continue; }
    if (ch === q) return k + 1;
    if (ch === '\n' && !multiline) return k; // unterminated: stop at the line end
    k++;
  }
  return src.length;
}

function scanNumber(src: string, i: number, family: Family): number {
  let k = i;
  const n = src.length;
  if (src[k] === '0' && (src[k + 1] === 'x' || src[k + 1] === 'X' || src[k + 1] === 'b' || src[k + 1] === 'o')) {
    k += 2;
    while (k < n && /[0-9a-fA-F_]/.test(src[k]!)) k++;
    return k;
  }
  while (k < n && (isDigit(src[k]) || src[k] === '_')) k++;
  // A `.` followed by an operator letter in Fortran (`1.gt.`) or a method call (`2.0.max`) is not part of the number.
  if (src[k] === '.' && !(family === 'fortran' && /[A-Za-z]/.test(src[k + 1] ?? '') && !/[dDeE]/.test(src[k + 1] ?? ''))
    && src[k + 1] !== '.' && !(isIdStart(src[k + 1]) && !/[eEdDfF]/.test(src[k + 1] ?? ''))) {
    k++;
    while (k < n && (isDigit(src[k]) || src[k] === '_')) k++;
  }
  const e = src[k];
  if ((e === 'e' || e === 'E' || ((e === 'd' || e === 'D') && family === 'fortran')) &&
    (isDigit(src[k + 1]) || ((src[k + 1] === '-' || src[k + 1] === '+') && isDigit(src[k + 2])))) {
    k += 2;
    while (k < n && isDigit(src[k])) k++;
  }
  // Suffixes: 1.0f, 1e-3f, 2.0f32, 10L, 1.0_dp, 3u.
  if (family === 'fortran' && src[k] === '_') {
    k++;
    while (k < n && /[A-Za-z0-9_]/.test(src[k]!)) k++;
  } else {
    while (k < n && /[fFlLuUdi]/.test(src[k]!) && k - i < 40) {
      k++;
      while (k < n && isDigit(src[k])) k++;
    }
  }
  return k;
}

function lineComment(src: string, from: number, to: number, line: number, extra: string): Comment {
  let s = from;
  // Strip repeated marker characters (`///`, `//!`, `#'`, `%%`, `!!`, `---`) and one space.
  while (s < to && s - from < 4 && extra.includes(src[s]!)) s++;
  const lines: CommentLine[] = [];
  pushLine(lines, src, s, to, line, '');
  return { kind: 'line', start: from, end: to, lines };
}

function blockComment(src: string, from: number, to: number, line: number, _col: number, kind: 'block' | 'doc'): Comment {
  const lines: CommentLine[] = [];
  let s = from;
  let l = line;
  while (s <= to) {
    const nl = src.indexOf('\n', s);
    const e = nl < 0 || nl > to ? to : nl;
    let k = s;
    while (k < e && (src[k] === ' ' || src[k] === '\t')) k++;
    // ` * text` inside /* */ blocks.
    if (src[k] === '*' && src[k + 1] !== '*' && src[k + 1] !== '/') k++;
    else if (src[k] === '*' && src[k + 1] === '*' && k === s && l === line) k += 1;
    pushLine(lines, src, k, e, l, '');
    if (e >= to) break;
    s = e + 1;
    l++;
  }
  return { kind, start: from, end: to, lines };
}

function pushLine(lines: CommentLine[], src: string, s: number, e: number, line: number, _m: string): void {
  let a = s;
  while (a < e && (src[a] === ' ' || src[a] === '\t')) a++;
  let b = e;
  while (b > a && (src[b - 1] === ' ' || src[b - 1] === '\t' || src[b - 1] === '\r')) b--;
  lines.push({ text: src.slice(a, b), start: a, line });
}

/** Characters a token may look past its end (operators, number suffixes, Fortran dots): a restart keeps this far before a change. */
const LOOKAHEAD_MARGIN = 16;

/** The first index k < n with at(k) ≥ v (n if none), for `at` ascending in k. */
function firstAtLeast(n: number, v: number, at: (k: number) => number): number {
  let lo = 0;
  let hi = n;
  while (lo < hi) { const mid = (lo + hi) >> 1; if (at(mid) < v) lo = mid + 1; else hi = mid; }
  return lo;
}

/**
 * `lex(text, …)`, reusing `prev` — the pass over `prevText` with the same language and limit —
 * outside the edited region. The pass restarts at the last clean line start at least
 * LOOKAHEAD_MARGIN characters before the first changed character, and stops at the first clean line
 * start after the last changed character that was also clean in `prev`: from there both texts are
 * the same and lexing depends only on what follows (see `Lexed.clean`), so the rest of `prev` is
 * taken with offsets and lines shifted. Same result as `lex`; files with over-long lines and prose
 * files are lexed whole.
 */
export function relex(prevText: string, prev: Lexed, text: string, info: LanguageInfo, maxLineLength: number): Lexed {
  if (text === prevText) return prev;
  if (info.family === 'markdown' || prev.longLines.length > 0) return lex(text, info, maxLineLength);
  const { lineStarts, longLines, src } = prepare(text, maxLineLength);
  if (longLines.length > 0) return lex(text, info, maxLineLength);
  const min = Math.min(prevText.length, text.length);
  let p = 0;
  while (p < min && prevText.charCodeAt(p) === text.charCodeAt(p)) p++;
  let s = 0;
  while (s < min - p && prevText.charCodeAt(prevText.length - 1 - s) === text.charCodeAt(text.length - 1 - s)) s++;
  const delta = text.length - prevText.length;
  const changeEnd = text.length - s; // first character of the common suffix, in `text`

  // restart: the last clean line of prev that starts at least the margin before the change
  let r = firstAtLeast(prev.lineStarts.length, p - LOOKAHEAD_MARGIN + 1, (k) => prev.lineStarts[k]!) - 1;
  while (r > 0 && prev.clean[r] !== 1) r--;
  if (r < 0) r = 0;
  const from = prev.lineStarts[r]!;
  const clean = new Uint8Array(lineStarts.length);
  clean.set(prev.clean.subarray(0, r + 1));
  const tokens = prev.tokens.slice(0, firstAtLeast(prev.tokens.length, from, (k) => prev.tokens[k]!.start));
  const comments = prev.comments.slice(0, firstAtLeast(prev.comments.length, from, (k) => prev.comments[k]!.start));

  let oldLine = -1;
  const stopped = run(src, info, {
    offset: from, line: r, tokens, comments, clean,
    stopAt: (q) => {
      if (q < changeEnd) return false;
      const l = firstAtLeast(prev.lineStarts.length, q - delta, (k) => prev.lineStarts[k]!);
      if (l >= prev.lineStarts.length || prev.lineStarts[l] !== q - delta || prev.clean[l] !== 1) return false;
      oldLine = l;
      return true;
    },
  });
  if (stopped) {
    const q = stopped.offset - delta;
    const dl = stopped.line - oldLine;
    for (let k = firstAtLeast(prev.tokens.length, q, (j) => prev.tokens[j]!.start); k < prev.tokens.length; k++) {
      const t = prev.tokens[k]!;
      tokens.push({ kind: t.kind, text: t.text, start: t.start + delta, end: t.end + delta, line: t.line + dl, col: t.col });
    }
    for (let k = firstAtLeast(prev.comments.length, q, (j) => prev.comments[j]!.start); k < prev.comments.length; k++) {
      const c = prev.comments[k]!;
      comments.push({ kind: c.kind, start: c.start + delta, end: c.end + delta, lines: c.lines.map((l) => ({ text: l.text, start: l.start + delta, line: l.line + dl })) });
    }
    for (let l = oldLine; l < prev.clean.length; l++) clean[l + dl] = prev.clean[l]!;
  }
  return { tokens, comments, lineStarts, longLines, clean };
}
