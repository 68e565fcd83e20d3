/**
 * Formulas written in comments and docstrings.
 *
 * A comment line holds a formula when it has a recognisable left-hand side and a right-hand side
 * that reads as maths:
 * - definitions: `f(x) = …`, `σ(x) = …`, `L(p, y) = …`, `y = …`, `relu(x) := …`;
 * - declared derivatives: `f'(x) = …`, `d/dx σ(x) = …`, `dy/dx = …`, `∂L/∂p = …`,
 *   `derivative: …`, `derivative of tanh: …`, `grad = …`, including forms in the saved output
 *   (`s*(1-s)`, `1 - y^2`);
 * - piecewise definitions spread over several lines (`x  if x > 0` / `0.01x  otherwise`, `{ … ,`,
 *   LaTeX `cases`), or written inline (`x if x > 0 else 0`).
 * Everything is hand-scanned in one pass per line; see reject.ts for what is turned away.
 */
import type { Comment, CommentLine } from './lexer';
import type { FormulaRole, Span } from '../types';
import { keyOf } from '../cache';
import { isAsciiArt, isIndexArithmetic, isShape, rejectFormulaText, rejectLine } from './reject';
import {
  LOSS_SYMBOLS, LOSS_WORDS, MATH_WORDS, OUTPUT_NAMES, PIECE_WORDS, TARGET_NAMES, VARIABLE_WORDS,
} from './words';

export interface CommentFormula {
  span: Span;
  /** Engine input (plain maths or LaTeX; piecewise assembled as `c ? a : b`). */
  text: string;
  role: FormulaRole;
  name?: string;
  variable?: string;
  argument?: 'input' | 'output';
  /** For a declared derivative: the function it is the derivative of, when named (`d/dx tanh(x)`). */
  forwardName?: string;
  /** Argument names declared on the left-hand side (`L(p, y)` → p, y). */
  args: string[];
  /** 0-based first and last line. */
  line: number;
  endLine: number;
  /** The comment block this came from (index into the groups), for adjacency. */
  group: number;
  docstring: boolean;
}

export interface CommentScan {
  formulas: CommentFormula[];
  /** Lines that looked like formulas but were turned away, with the reason (for `scan --verbose` and tests). */
  rejected: { line: number; reason: string }[];
  /** Comment groups: first and last line of each, whether a docstring. */
  groups: { firstLine: number; lastLine: number; docstring: boolean; text: string }[];
}

interface Head {
  kind: 'func' | 'sym' | 'deriv';
  /** The name on the left (`f`, `sigmoid`, `y`, `dL/dz`). */
  name: string;
  args: string[];
  /** For derivatives: the variable (`x` in d/dx) and the differentiated function. */
  wrt?: string;
  of?: string;
  prime?: boolean;
}

const OUTPUT_TEXT = ['in terms of the output', 'of the output', 'saved output', 'from the output', 'takes the output', 'output form', 'given the output', 'in terms of y', 'in terms of s'];

/**
 * `memo`, when given, keeps each comment block's result keyed by the block's lines with offsets and
 * line numbers relative to its first line (see DetectMemo in index.ts): an unchanged block that moved
 * is rebased instead of read again.
 */
export function scanComments(comments: Comment[], memo?: { get(key: string): CommentScan | undefined; set(key: string, v: CommentScan): void }): CommentScan {
  const groups = groupComments(comments);
  const formulas: CommentFormula[] = [];
  const rejected: { line: number; reason: string }[] = [];
  const groupInfo: CommentScan['groups'] = [];
  groups.forEach((g, gi) => {
    const first = g.lines[0]!;
    if (!memo) {
      scanGroup(g, gi, formulas, rejected, groupInfo);
      return;
    }
    const parts: (string | number | boolean)[] = [g.doc, g.lines.length];
    for (const l of g.lines) parts.push(l.text, l.start - first.start, l.line - first.line);
    const key = keyOf(...parts);
    let rel = memo.get(key);
    if (!rel) {
      // scanned as if the block were group 0 at offset 0, line 0
      const f: CommentFormula[] = [];
      const r: { line: number; reason: string }[] = [];
      const gr: CommentScan['groups'] = [];
      scanGroup({ doc: g.doc, lines: g.lines.map((l) => ({ text: l.text, start: l.start - first.start, line: l.line - first.line })) }, 0, f, r, gr);
      rel = { formulas: f, rejected: r, groups: gr };
      memo.set(key, rel);
    }
    const dStart = first.start;
    const dLine = first.line;
    for (const f of rel.formulas) formulas.push({ ...f, args: [...f.args], span: { start: f.span.start + dStart, end: f.span.end + dStart }, line: f.line + dLine, endLine: f.endLine + dLine, group: gi });
    for (const r of rel.rejected) rejected.push({ line: r.line + dLine, reason: r.reason });
    for (const x of rel.groups) groupInfo.push({ ...x, firstLine: x.firstLine + dLine, lastLine: x.lastLine + dLine });
  });
  return { formulas, rejected, groups: groupInfo };
}

function scanGroup(g: Group, gi: number, formulas: CommentFormula[], rejected: { line: number; reason: string }[], groupInfo: CommentScan['groups']): void {
  const blockText = g.lines.map((l) => l.text).join('\n');
  const lower = blockText.toLowerCase();
  const outputHint = OUTPUT_TEXT.some((t) => lower.includes(t));
  groupInfo.push({ firstLine: g.lines[0]!.line, lastLine: g.lines[g.lines.length - 1]!.line, docstring: g.doc, text: blockText });
  let li = 0;
  while (li < g.lines.length) {
    const consumed = scanLineAt(g.lines, li, gi, g.doc, outputHint, formulas, rejected);
    li += Math.max(1, consumed);
  }
}

interface Group {
  lines: CommentLine[];
  doc: boolean;
}

/** Consecutive own-line `//` or `#` comments form one block, like a block comment. */
function groupComments(comments: Comment[]): Group[] {
  const out: Group[] = [];
  let cur: Group | undefined;
  let lastLine = -2;
  for (const c of comments) {
    if (c.kind === 'line' && cur && !cur.doc && c.lines[0]!.line === lastLine + 1 && cur.lines.length < 400) {
      cur.lines.push(...c.lines);
    } else {
      cur = { lines: [...c.lines], doc: c.kind === 'doc' };
      out.push(cur);
      if (c.kind !== 'line') {
        lastLine = -2;
        cur = undefined;
        continue;
      }
    }
    lastLine = c.lines[c.lines.length - 1]!.line;
  }
  return out;
}

/** Try to read a formula starting on line `li`; returns how many lines it used (0 = none). */
function scanLineAt(
  lines: CommentLine[], li: number, group: number, doc: boolean, outputHint: boolean,
  out: CommentFormula[], rejected: { line: number; reason: string }[],
): number {
  const cl = lines[li]!;
  const text = stripMathDelimiters(cl.text);
  if (text.length === 0) return 1;
  // Every definition has an `=` or a keyword head's `:` (findDefinition), and a rejection is kept
  // only for a line with `=`: prose lines (most comment lines) stop here.
  if (!cl.text.includes('=') && !text.includes('=') && !text.includes(':')) return 1;
  const lineReject = rejectLine(cl.text);
  if (lineReject) {
    if (cl.text.includes('=')) rejected.push({ line: cl.line, reason: lineReject });
    return 1;
  }
  let pos = 0;
  let used = 1;
  while (pos < text.length) {
    const m = findDefinition(text, pos);
    if (!m) break;
    pos = m.next;
    const textReject = rejectFormulaText(text.slice(m.lhsStart, m.rhsEnd));
    if (textReject) { rejected.push({ line: cl.line, reason: textReject }); continue; }
    let rhs = text.slice(m.rhsStart, m.rhsEnd).trim();
    let endLine = cl.line;
    let endOffset = cl.start + offsetIn(cl.text, text, m.rhsEnd);
    // Piecewise over several lines, or a right-hand side that starts on the next line.
    const pieces: Piece[] = [];
    const first = rhs === '' || rhs === '{' ? undefined : parsePiece(rhs);
    const latex = rhs.includes('\\begin{cases}');
    if (latex) {
      let acc = rhs;
      let k = li;
      while (!acc.includes('\\end{cases}') && k + 1 < lines.length && k - li < 12) {
        k++;
        acc += ' ' + lines[k]!.text;
      }
      const cases = latexCases(acc);
      if (!cases) { rejected.push({ line: cl.line, reason: 'prose' }); continue; }
      rhs = cases;
      used = Math.max(used, k - li + 1);
      endLine = lines[k]!.line;
      endOffset = lines[k]!.start + lines[k]!.text.length;
    } else if (rhs === '' || rhs === '{' || (first && (first.cond !== undefined || first.otherwise) && !first.inline)) {
      if (first) pieces.push(first);
      let k = li + 1;
      while (k < lines.length && pieces.length < 12) {
        const p = parsePiece(stripMathDelimiters(lines[k]!.text));
        if (!p) break;
        if (p.cond === undefined && !p.otherwise) {
          // A bare expression on the next line is the right-hand side when the first line ended at `=`.
          if (rhs === '' && pieces.length === 0 && k === li + 1) {
            pieces.push(p);
            k++;
            break;
          }
          break;
        }
        pieces.push(p);
        k++;
        if (p.otherwise) break;
      }
      if (pieces.length === 0) continue;
      const assembled = assemble(pieces);
      if (!assembled) { rejected.push({ line: cl.line, reason: 'prose' }); continue; }
      rhs = assembled;
      used = Math.max(used, k - li);
      const last = lines[k - 1]!;
      endLine = last.line;
      endOffset = last.start + last.text.length;
    } else if (first && first.inline) {
      const assembled = assemble(first.inline);
      if (!assembled) continue;
      rhs = assembled;
    }
    const head = m.head;
    const argNames = new Set(head.args);
    if (head.wrt) argNames.add(head.wrt);
    const verdict = judgeRhs(rhs, argNames, head);
    if (verdict) { rejected.push({ line: cl.line, reason: verdict }); continue; }
    const f = makeFormula(head, rhs, cl, m.lhsStart, text, endOffset, endLine, group, doc, outputHint);
    if (f) out.push(f);
  }
  return used;
}

function offsetIn(original: string, stripped: string, pos: number): number {
  // stripMathDelimiters only replaces `$` by spaces, so positions coincide.
  return original.length === stripped.length ? pos : Math.min(pos, original.length);
}

function stripMathDelimiters(s: string): string {
  let r = s;
  if (r.includes('$')) r = r.split('$').join(' ');
  if (r.includes('\\[') || r.includes('\\]')) r = r.split('\\[').join('  ').split('\\]').join('  ');
  return r;
}

interface DefMatch {
  head: Head;
  lhsStart: number;
  rhsStart: number;
  rhsEnd: number;
  next: number;
}

const DERIV_KEYWORDS = ['derivative', 'gradient', 'grad', 'backward', 'slope', 'deriv'];

/** Find the next `lhs = rhs` (or `derivative: rhs`) at or after `from`. */
function findDefinition(text: string, from: number): DefMatch | undefined {
  let i = from;
  while (i < text.length) {
    const c = text[i]!;
    const isEq = c === '=' && text[i + 1] !== '=' && text[i - 1] !== '=' && text[i - 1] !== '<' && text[i - 1] !== '>' &&
      text[i - 1] !== '!' && text[i + 1] !== '>' && text[i - 1] !== '~';
    const isColon = c === ':' && text[i + 1] !== ':' && text[i - 1] !== ':' && text[i + 1] !== '=';
    if (isEq || isColon) {
      const lhsEnd = text[i - 1] === ':' ? i - 1 : i; // `:=`
      const lhsFrom = segmentStart(text, from, lhsEnd);
      const lhs = text.slice(lhsFrom, lhsEnd);
      const head = isEq ? matchHead(lhs) : matchKeywordHead(lhs);
      if (head) {
        const rhsStart = i + 1;
        const rhsEnd = rhsStop(text, rhsStart);
        // `derivative: d/dx f(x) = …` — the formula is the `=` one that follows
        if (isColon && text[rhsEnd] === '=') { i++; continue; }
        const lhsStart = lhsFrom + head.offset;
        return { head: head.head, lhsStart, rhsStart, rhsEnd, next: Math.max(rhsEnd, rhsStart) };
      }
    }
    i++;
  }
  return undefined;
}

/** The left-hand side begins after the last `:` , `;` or sentence break before it. */
function segmentStart(text: string, from: number, end: number): number {
  let depth = 0;
  // A left-hand side is short (a head is at most ~40 characters): looking back further than
  // MAX_LHS would make lines with many `=` quadratic.
  const stop = Math.max(from, end - MAX_LHS);
  for (let k = end - 1; k >= stop; k--) {
    const c = text[k]!;
    if (c === ')' || c === ']') depth++;
    else if (c === '(' || c === '[') { if (depth === 0) return k + 1; depth--; }
    else if (depth === 0 && (c === ':' || c === ';' || (c === ',' && text[k + 1] === ' ') || (c === '.' && text[k + 1] === ' '))) return k + 1;
  }
  return stop;
}

const MAX_LHS = 80;

/** Which part of a left-hand side names the formula. */
function matchHead(lhsRaw: string): { head: Head; offset: number } | undefined {
  const lhs = lhsRaw.replace(/\s+$/, '');
  if (lhs.length === 0) return undefined;
  const end = lhs.length;
  // name(args) possibly preceded by d/dx
  if (lhs[end - 1] === ')' || lhs[end - 1] === ']') {
    const open = matchingOpen(lhs, end - 1);
    if (open < 0) return undefined;
    const args = lhs.slice(open + 1, end - 1).split(/[,;]/).map((a) => a.trim()).filter((a) => a.length > 0);
    let k = open;
    while (k > 0 && lhs[k - 1] === ' ') k--;
    const nameEnd = k;
    while (k > 0 && isNameChar(lhs[k - 1]!)) k--;
    let name = lhs.slice(k, nameEnd);
    // `d/dx[σ(x)]`, `d/dx (x²)`
    const dop = derivOperatorBefore(lhs, k);
    if (name === '' || /^d\/d/.test(lhs.slice(k)) || (dop && name.startsWith('d') && name.length <= 3 && lhs[k - 1] === '/')) {
      const op = derivOperatorBefore(lhs, open) ?? dop;
      if (op && lhs[end - 1] === ']') {
        const inner = lhs.slice(open + 1, end - 1).trim();
        const f = matchHead(inner);
        return { head: { kind: 'deriv', name: `d/d${op.wrt}`, args: f?.head.args ?? [op.wrt], wrt: op.wrt, of: f?.head.name }, offset: op.start };
      }
      if (op) return { head: { kind: 'deriv', name: `d/d${op.wrt}`, args: [op.wrt], wrt: op.wrt }, offset: op.start };
      return undefined;
    }
    if (!args.every((a) => /^[A-Za-z_\u0370-\u03ff][A-Za-z0-9_\u0370-\u03ff]*$|^[A-Za-z_\u0370-\u03ff][A-Za-z0-9_\u0370-\u03ff]*\s*=\s*[-+0-9.eE]+$/.test(a))) return undefined;
    if (args.length === 0 || args.length > 4) return undefined;
    const argNames = args.map((a) => a.split('=')[0]!.trim());
    let prime = false;
    if (name.endsWith("'") || name.endsWith('′')) {
      prime = true;
      name = name.replace(/['′]+$/, '');
    }
    if (!name || name.length > 32 || !/^[A-Za-z_\u0370-\u03ff\u2113]/.test(name)) return undefined;
    if (/^(if|for|while|return|print|assert|def|and|or|not|with|elif|else)$/.test(name)) return undefined;
    const before = derivOperatorBefore(lhs, k);
    if (before) {
      return { head: { kind: 'deriv', name: `d/d${before.wrt}`, args: argNames, wrt: before.wrt, of: name }, offset: before.start };
    }
    if (!prefixOk(lhs, k)) return undefined;
    if (prime) return { head: { kind: 'deriv', name: `${name}'`, args: argNames, wrt: argNames[0], of: name, prime: true }, offset: k };
    return { head: { kind: 'func', name, args: argNames }, offset: k };
  }
  // dy/dx, ∂L/∂p, dL_dz, f'
  let k = end;
  while (k > 0 && isNameChar(lhs[k - 1]!)) k--;
  const last = lhs.slice(k, end);
  if (last === '') return undefined;
  if (lhs[k - 1] === '/') {
    let j = k - 1;
    while (j > 0 && lhs[j - 1] === ' ') j--;
    const numEnd = j;
    while (j > 0 && isNameChar(lhs[j - 1]!)) j--;
    const num = lhs.slice(j, numEnd);
    const wrt = stripD(last);
    const of = stripD(num);
    if (wrt !== undefined && of !== undefined && prefixOk(lhs, j)) {
      return { head: { kind: 'deriv', name: `${num}/${last}`, args: [wrt], wrt, of: of || undefined }, offset: j };
    }
    return undefined;
  }
  if (!prefixOk(lhs, k)) return undefined;
  if (last.endsWith("'") || last.endsWith('′')) {
    const name = last.replace(/['′]+$/, '');
    if (!name) return undefined;
    return { head: { kind: 'deriv', name: `${name}'`, args: [], of: name, prime: true }, offset: k };
  }
  if (/^[0-9]/.test(last) || last.length > 32) return undefined;
  const lower = last.toLowerCase();
  if (DERIV_KEYWORDS.includes(lower) || /^d[a-z]*_d[a-z]+$/i.test(last)) {
    const wrt = /_d([a-z]+)$/i.exec(last)?.[1];
    return { head: { kind: 'deriv', name: last, args: wrt ? [wrt] : [], wrt } , offset: k };
  }
  return { head: { kind: 'sym', name: last, args: [] }, offset: k };
}

/** `derivative: …`, `derivative of tanh: …`, `grad wrt x: …` */
function matchKeywordHead(lhsRaw: string): { head: Head; offset: number } | undefined {
  const lhs = lhsRaw.trim();
  const lower = lhs.toLowerCase();
  const start = lhsRaw.length - lhsRaw.trimStart().length;
  for (const kw of DERIV_KEYWORDS) {
    const at = lower.lastIndexOf(kw);
    if (at < 0) continue;
    if (at > 0 && /[a-z0-9_]/i.test(lower[at - 1]!)) continue;
    const rest = lhs.slice(at + kw.length).trim();
    let of: string | undefined;
    let wrt: string | undefined;
    if (rest !== '') {
      const m = /^(?:of\s+)?([A-Za-z_\u0370-\u03ff][\w\u0370-\u03ff]*)(?:\s*\(\s*([A-Za-z_]\w*)\s*\))?(?:\s+(?:wrt|w\.r\.t\.|with respect to)\s+([A-Za-z_]\w*))?$/.exec(rest);
      if (!m) {
        const w = /^(?:wrt|w\.r\.t\.|with respect to)\s+([A-Za-z_]\w*)$/.exec(rest);
        if (!w) continue;
        wrt = w[1];
      } else {
        of = m[1];
        wrt = m[3] ?? m[2];
      }
    }
    return { head: { kind: 'deriv', name: kw, args: wrt ? [wrt] : [], wrt, of }, offset: start + at };
  }
  // `f'(x): …` in docstring lists, `d/dx:` shorthand
  const dd = /^d\/d([A-Za-z])$/.exec(lhs);
  if (dd) return { head: { kind: 'deriv', name: lhs, args: [dd[1]!], wrt: dd[1] }, offset: start };
  return undefined;
}

function stripD(s: string): string | undefined {
  if (s.startsWith('∂')) return s.slice(1);
  if (s.startsWith('d') && s.length >= 1 && s.length <= 12) return s.slice(1);
  return undefined;
}

function derivOperatorBefore(lhs: string, k: number): { wrt: string; start: number } | undefined {
  // `d/dx`, `∂/∂x`, `d/dx ` before position k
  let j = k;
  while (j > 0 && lhs[j - 1] === ' ') j--;
  const seg = lhs.slice(Math.max(0, j - 8), j);
  const m = /(d|∂)\s?\/\s?(d|∂)([A-Za-z\u0370-\u03ff])$/.exec(seg);
  if (!m) return undefined;
  const start = Math.max(0, j - 8) + (m.index ?? 0);
  if (!prefixOk(lhs, start)) return undefined;
  return { wrt: m[3]!, start };
}

/** What precedes the head must be prose or nothing: not an identifier glued to it, not code. */
function prefixOk(lhs: string, k: number): boolean {
  if (k === 0) return true;
  const c = lhs[k - 1]!;
  if (c !== ' ' && c !== '\t' && c !== '(' && c !== '`' && c !== '*' && c !== '"') return false;
  const before = lhs.slice(0, k).trim();
  if (before === '') return true;
  // `if x = …`, `let y = …` (code in comments is fine), but an operator before means we are mid-expression.
  const lastc = before[before.length - 1]!;
  return !'+-*/^<>'.includes(lastc) || lastc === '*';
}

function isNameChar(c: string): boolean {
  return /[A-Za-z0-9_'′\u0370-\u03ff\u2113∂]/.test(c);
}

function matchingOpen(s: string, closeAt: number): number {
  let depth = 0;
  for (let k = closeAt; k >= 0; k--) {
    const c = s[k];
    if (c === ')' || c === ']') depth++;
    else if (c === '(' || c === '[') {
      depth--;
      if (depth === 0) return k;
    }
  }
  return -1;
}

const STOP_WORDS = ['where', 'with', 'so', 'which', 'see', 'i.e.', 'e.g.', 'and', 'because', 'since', 'giving', 'thus', 'hence', 'note'];

/** End of a right-hand side: a prose break, a trailing comment, a sentence end, another `=`. */
function rhsStop(text: string, from: number): number {
  let depth = 0;
  let k = from;
  while (k < text.length) {
    const c = text[k]!;
    if (c === '(' || c === '[' || c === '{') depth++;
    else if (c === ')' || c === ']' || c === '}') depth = Math.max(0, depth - 1);
    else if (depth === 0) {
      if (c === ';') return k;
      if (c === '=' && text[k + 1] !== '=' && text[k - 1] !== '=' && text[k - 1] !== '<' && text[k - 1] !== '>' && text[k - 1] !== '!' && text[k + 1] !== '>') return k;
      if (c === '.' && (k + 1 === text.length || text[k + 1] === ' ') && !/[0-9]/.test(text[k - 1] ?? '')) return k;
      if (c === ' ' && (text.startsWith(' -- ', k) || text.startsWith(' # ', k) || text.startsWith(' // ', k))) return k;
      if ((c === ',' || c === ' ') && k + 1 < text.length) {
        const rest = text.slice(k + 1).trimStart();
        for (const w of STOP_WORDS) {
          if (rest.startsWith(w) && !/[A-Za-z0-9_]/.test(rest[w.length] ?? '') && (c === ',' || w === 'where' || w === 'with' || w === 'see' || w === 'i.e.' || w === 'e.g.' || w === 'since' || w === 'because')) return k;
        }
      }
    }
    k++;
  }
  return text.length;
}

interface Piece {
  expr: string;
  cond?: string;
  otherwise?: boolean;
  /** `a if c else b` on one line: the pieces it stands for. */
  inline?: Piece[];
}

/** One line of a piecewise definition: `expr if cond`, `expr, x > 0`, `expr otherwise`, `{ expr …`. */
function parsePiece(raw: string): Piece | undefined {
  let s = raw.trim();
  while (s.startsWith('{') || s.startsWith('|')) s = s.slice(1).trim();
  if (s.endsWith('}') && !s.includes('{')) s = s.slice(0, -1).trim();
  if (s.endsWith(',') || s.endsWith('.') || s.endsWith(';')) s = s.slice(0, -1).trim();
  if (s === '') return undefined;
  const words = topLevelWords(s);
  // a if c else b
  const ifAt = words.find((w) => w.word === 'if');
  const elseAt = words.find((w) => w.word === 'else' && ifAt !== undefined && w.at > ifAt.at);
  const otherAt = words.find((w) => (w.word === 'otherwise' || w.word === 'elsewhere') && ifAt !== undefined && w.at > ifAt.at);
  if (ifAt && otherAt && !elseAt) {
    // a if c, b otherwise
    const mid = s.slice(ifAt.at + 2, otherAt.at);
    const comma = lastTopLevel(mid, ',');
    if (comma > 0) {
      const a = s.slice(0, ifAt.at).trim();
      const c = mid.slice(0, comma).trim();
      const b = mid.slice(comma + 1).trim();
      if (a && b && isCondition(c)) return { expr: a, cond: c, inline: [{ expr: a, cond: c }, { expr: b, otherwise: true }] };
    }
  }
  if (ifAt && elseAt) {
    const a = s.slice(0, ifAt.at).trim();
    const c = s.slice(ifAt.at + 2, elseAt.at).trim();
    const rest = parsePiece(s.slice(elseAt.at + 4));
    if (!a || !isCondition(c) || !rest) return undefined;
    const tail = rest.inline ?? [{ expr: rest.expr, otherwise: true }];
    return { expr: a, cond: c, inline: [{ expr: a, cond: c }, ...tail] };
  }
  for (const w of words) {
    if (w.word === 'otherwise' || w.word === 'else' || w.word === 'elsewhere') {
      const e = stripTrailingComma(s.slice(0, w.at));
      if (!e) return undefined;
      return { expr: e, otherwise: true };
    }
    if (w.word === 'if' || w.word === 'for' || w.word === 'when') {
      const e = stripTrailingComma(s.slice(0, w.at));
      const c = s.slice(w.at + w.word.length).trim();
      if (!e || !isCondition(c)) return undefined;
      return { expr: e, cond: c };
    }
  }
  // `expr, cond` or `expr  (cond)`
  const comma = lastTopLevel(s, ',');
  if (comma > 0) {
    const c = s.slice(comma + 1).trim();
    if (isCondition(c)) return { expr: s.slice(0, comma).trim(), cond: c };
  }
  if (s.endsWith(')')) {
    const open = matchingOpen(s, s.length - 1);
    if (open > 0) {
      const c = s.slice(open + 1, -1).trim();
      if (isCondition(c) && s.slice(0, open).trim() !== '') return { expr: s.slice(0, open).trim(), cond: c };
    }
  }
  return { expr: s };
}

function stripTrailingComma(s: string): string {
  let t = s.trim();
  if (t.endsWith(',')) t = t.slice(0, -1).trim();
  return t;
}

function topLevelWords(s: string): { word: string; at: number }[] {
  const out: { word: string; at: number }[] = [];
  let depth = 0;
  for (let k = 0; k < s.length; k++) {
    const c = s[k]!;
    if (c === '(' || c === '[' || c === '{') depth++;
    else if (c === ')' || c === ']' || c === '}') depth--;
    else if (depth === 0 && /[a-z]/.test(c) && (k === 0 || !/[A-Za-z0-9_]/.test(s[k - 1]!))) {
      let e = k + 1;
      while (e < s.length && /[A-Za-z0-9_]/.test(s[e]!)) e++;
      const w = s.slice(k, e);
      if (PIECE_WORDS.has(w)) out.push({ word: w, at: k });
      k = e - 1;
    }
  }
  return out;
}

function lastTopLevel(s: string, ch: string): number {
  let depth = 0;
  for (let k = s.length - 1; k >= 0; k--) {
    const c = s[k];
    if (c === ')' || c === ']') depth++;
    else if (c === '(' || c === '[') depth--;
    else if (depth === 0 && c === ch) return k;
  }
  return -1;
}

function isCondition(c: string): boolean {
  if (!c) return false;
  // The lookbehind starts a match only at the first letter of a run (same matches, linear time: without
  // it a 4,000-letter run cost ~180 ms per comment line, found by the ReDoS test).
  return /[<>≤≥≠]|==|!=/.test(c) && !/(?<![A-Za-z])[A-Za-z]{4,}\s+[A-Za-z]{4,}/.test(c);
}

function normaliseCondition(c: string): string {
  return c.replace(/≤/g, '<=').replace(/≥/g, '>=').replace(/≠/g, '!=').replace(/∧/g, ' and ').replace(/\band\b/g, ' and ');
}

/** Pieces → `(c1) ? (e1) : ((c2) ? (e2) : (e3))`. The last piece's condition, if any, is taken as "otherwise". */
function assemble(pieces: Piece[]): string | undefined {
  if (pieces.length === 1 && pieces[0]!.cond === undefined) return pieces[0]!.expr;
  if (pieces.length < 2) return undefined;
  let acc = `(${pieces[pieces.length - 1]!.expr})`;
  for (let k = pieces.length - 2; k >= 0; k--) {
    const p = pieces[k]!;
    if (p.cond === undefined) return undefined;
    acc = `(${normaliseCondition(p.cond)}) ? (${p.expr}) : ${acc}`;
  }
  return acc;
}

function latexCases(s: string): string | undefined {
  const a = s.indexOf('\\begin{cases}');
  const b = s.indexOf('\\end{cases}');
  if (a < 0 || b < a) return undefined;
  const body = s.slice(a + '\\begin{cases}'.length, b);
  const rows = body.split('\\\\').map((r) => r.trim()).filter((r) => r.length > 0);
  const pieces: Piece[] = [];
  for (const r of rows) {
    const amp = r.indexOf('&');
    if (amp < 0) return undefined;
    const expr = r.slice(0, amp).trim();
    let cond = r.slice(amp + 1).trim().replace(/\\text\{\s*(if|for)?\s*/g, '').replace(/\}/g, ' ').replace(/^(if|for)\s+/, '').trim();
    cond = cond.replace(/\\leq?\b/g, '<=').replace(/\\geq?\b/g, '>=').replace(/\\lt\b/g, '<').replace(/\\gt\b/g, '>').replace(/,$/, '').trim();
    if (/^(otherwise|else|elsewhere)/.test(cond)) pieces.push({ expr, otherwise: true });
    else if (isCondition(cond)) pieces.push({ expr, cond });
    else return undefined;
  }
  return assemble(pieces);
}

const ALLOWED = /^[A-Za-z0-9\s+\-*/^().,_'<>=!?:|\\&{}[\]·×−√²³¹⁰⁴⁵⁶⁷⁸⁹⁻⁺ₓσπ∂′≤≥ℓ∑∏\u0370-\u03ff\u2070-\u209f\u00b7\u2212\u221a⋅∗]+$/;

/** Does the right-hand side read as maths rather than prose or code? Returns the reason if not. */
function judgeRhs(rhs: string, argNames: Set<string>, head: Head): string | undefined {
  const t = rhs.trim();
  if (t.length === 0 || t.length > 600) return 'prose';
  if (!ALLOWED.test(t)) return 'prose';
  if (isAsciiArt(t)) return 'ascii-art';
  if (isShape(t)) return 'shape';
  if (isIndexArithmetic(t)) return 'index';
  if (INDEXY_HEAD.has(head.name) && isIndexArithmetic(t.replace(/[A-Za-z_]\w*/g, 'i'))) return 'index';
  if (rejectFormulaText(t)) return rejectFormulaText(t);
  // top-level commas outside calls: a tuple or a list, not a formula
  if (topLevelComma(t)) return 'shape';
  // prose: two adjacent words, or an unknown long word used as a value
  const words = wordsOf(t);
  let hasSymbol = false;
  let hasOp = /[+\-*/^·×−√²³?<>]|\\frac|\\sqrt|\\cdot/.test(t);
  for (let w = 0; w < words.length; w++) {
    const cur = words[w]!;
    const known = MATH_WORDS.has(cur.word) || MATH_WORDS.has(cur.word.toLowerCase()) || argNames.has(cur.word) ||
      VARIABLE_WORDS.has(cur.word) || cur.word.includes('_') || /\d/.test(cur.word) || cur.word.length <= 2 || cur.latex;
    if (cur.call) hasOp = true;
    if (!known && !cur.call && cur.word.length >= 3) return 'prose';
    if (w > 0) {
      const prev = words[w - 1]!;
      const between = t.slice(prev.end, cur.start);
      if (/^\s+$/.test(between) && prev.word.length >= 3 && cur.word.length >= 3 && !PIECE_WORDS.has(prev.word) &&
        !PIECE_WORDS.has(cur.word) && !['and', 'or', 'not'].includes(prev.word) && !['and', 'or', 'not'].includes(cur.word) && !prev.latex) {
        return 'prose';
      }
    }
    if (!NAMESPACES.has(cur.word) && !cur.latex) hasSymbol = true;
  }
  if (!hasSymbol) return 'constant';
  if (!hasOp && head.kind === 'sym') return 'prose';
  return undefined;
}

const INDEXY_HEAD = new Set(['i', 'j', 'k', 'n', 'idx', 'index', 'offset', 'stride', 'size', 'len', 'N', 'pos']);
const NAMESPACES = new Set(['np', 'numpy', 'torch', 'math', 'jnp', 'jax', 'nn', 'tf', 'F', 'std', 'Math', 'pi', 'e', 'frac', 'cdot', 'left', 'right', 'text', 'mathrm', 'operatorname', 'sqrt', 'exp', 'log', 'tanh']);

function topLevelComma(t: string): boolean {
  let depth = 0;
  let parenIsCall: boolean[] = [];
  for (let k = 0; k < t.length; k++) {
    const c = t[k]!;
    if (c === '(' || c === '[' || c === '{') {
      const call = k > 0 && /[A-Za-z0-9_\u0370-\u03ff]/.test(t[k - 1]!);
      parenIsCall.push(call || c === '{');
      depth++;
    } else if (c === ')' || c === ']' || c === '}') {
      depth--;
      parenIsCall = parenIsCall.slice(0, Math.max(0, depth));
    } else if (c === ',') {
      if (depth === 0) return true;
      if (!parenIsCall.includes(true)) return true;
    }
  }
  return false;
}

interface Word { word: string; start: number; end: number; call: boolean; latex: boolean }

function wordsOf(t: string): Word[] {
  const out: Word[] = [];
  let k = 0;
  while (k < t.length) {
    const c = t[k]!;
    if (/[A-Za-z_\u0370-\u03ff]/.test(c)) {
      let e = k + 1;
      while (e < t.length && /[A-Za-z0-9_\u0370-\u03ff]/.test(t[e]!)) e++;
      let j = e;
      while (t[j] === ' ') j++;
      const latex = t[k - 1] === '\\';
      const dotted = t[k - 1] === '.';
      if (!dotted) out.push({ word: t.slice(k, e), start: k, end: e, call: t[j] === '(', latex });
      k = e;
      continue;
    }
    k++;
  }
  return out;
}

function makeFormula(
  head: Head, rhs: string, cl: CommentLine, lhsStart: number, _text: string, endOffset: number, endLine: number,
  group: number, doc: boolean, outputHint: boolean,
): CommentFormula | undefined {
  const start = cl.start + lhsStart;
  const span = { start, end: Math.max(endOffset, start + 1) };
  const lowerName = head.name.toLowerCase();
  let role: FormulaRole = 'activation';
  let variable: string | undefined = head.args[0];
  let argument: 'input' | 'output' | undefined;
  if (head.kind === 'deriv') {
    role = 'derivative';
    variable = head.wrt ?? head.args[0];
    const syms = new Set(wordsOf(rhs).filter((w) => !w.call && !w.latex).map((w) => w.word));
    const outSym = [...syms].find((s) => OUTPUT_NAMES.has(s) && s !== variable);
    if (outSym && (variable === undefined || !syms.has(variable))) {
      argument = 'output';
      variable = outSym;
    } else if (outputHint && variable === undefined && outSym) {
      argument = 'output';
      variable = outSym;
    } else argument = 'input';
  } else if (LOSS_SYMBOLS.has(head.name) || LOSS_WORDS.some((w) => lowerName.includes(w)) ||
    (head.kind === 'func' && head.args.length === 2 && TARGET_NAMES.has(head.args[1]!))) {
    role = 'loss';
  }
  const name = head.kind === 'deriv' ? (head.of ? `${head.of}'` : head.name) : head.name;
  const vars = new Set<string>([...head.args, ...(variable ? [variable] : []), 's', 'y', 'x', 'z', 't', 'p']);
  const f: CommentFormula = {
    span, text: implicitProducts(rhs, vars), role, name, args: head.args, line: cl.line, endLine, group, docstring: doc,
  };
  if (variable) f.variable = variable;
  if (argument) f.argument = argument;
  if (head.of && !OUTPUT_NAMES.has(head.of) && head.of !== 'f' && head.of !== 'y') f.forwardName = head.of;
  if (head.kind === 'deriv' && head.of && LOSS_SYMBOLS.has(head.of)) f.forwardName = head.of;
  return f;
}

/**
 * In maths, `x (1 + e^x)` and `s(1 - s)` are products, not calls: a variable name directly before `(`
 * gets an explicit `*`. Only names that are variables of the formula are touched.
 */
export function implicitProducts(text: string, vars: Set<string>): string {
  let out = '';
  let k = 0;
  while (k < text.length) {
    const c = text[k]!;
    if (/[A-Za-z_\u0370-\u03ff]/.test(c) && (k === 0 || !/[A-Za-z0-9_.\\]/.test(text[k - 1]!))) {
      let e = k + 1;
      while (e < text.length && /[A-Za-z0-9_\u0370-\u03ff]/.test(text[e]!)) e++;
      const w = text.slice(k, e);
      let j = e;
      while (text[j] === ' ') j++;
      out += w;
      if (text[j] === '(' && vars.has(w)) out += ' *';
      k = e;
      continue;
    }
    out += c;
    k++;
  }
  return out;
}
