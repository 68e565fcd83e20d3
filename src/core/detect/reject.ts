/**
 * Text that only looks mathematical: dates, versions, URLs, array shapes, section numbers, index
 * arithmetic, ASCII art. Each test is a single pass over the text (hand-written scans, or regular
 * expressions without nested quantifiers or overlapping alternatives, which run in linear time).
 */
import { INDEX_NAMES } from './words';

export type RejectReason = 'url' | 'date' | 'version' | 'section' | 'ascii-art' | 'shape' | 'index' | 'prose';

const URL_MARKERS = ['://', 'www.', 'mailto:', '.com/', '.org/', '.html'];
// yyyy-mm-dd, dd/mm/yyyy, dd.mm.yyyy, hh:mm
const DATE_ISO = /\b\d{4}-\d{1,2}-\d{1,2}\b/;
const DATE_SLASH = /\b\d{1,2}\/\d{1,2}\/\d{2,4}\b/;
const DATE_DOTS = /\b\d{1,2}\.\d{1,2}\.\d{4}\b/;
const TIME = /\b\d{1,2}:\d{2}(:\d{2})?\b/;
const VERSION = /\b[vV]?\d+\.\d+\.\d+/;
const VERSION_V = /\b[vV]\d+(\.\d+)?\b/;
const SECTION_WORD = /\b(Sec|Section|section|Chapter|chapter|Eq|Eqn|Equation|equation|Fig|Figure|Table|Appendix|Step|step|Algorithm)\.?\s\(?\d/;
const SECTION_LEAD = /^\(?\d+(\.\d+)+\)?\s+[A-Z][a-z]{2,}|^\d+\.\d+\.\d+\s/;

/** Whole-line rejections: the line as a whole is not a place for a formula. */
export function rejectLine(line: string): RejectReason | undefined {
  for (const m of URL_MARKERS) if (line.includes(m)) return 'url';
  if (isAsciiArt(line)) return 'ascii-art';
  return undefined;
}

/** Rejections of a candidate formula's text (left side, right side). */
export function rejectFormulaText(text: string): RejectReason | undefined {
  if (DATE_ISO.test(text) || DATE_SLASH.test(text) || DATE_DOTS.test(text) || TIME.test(text)) return 'date';
  if (VERSION.test(text) || VERSION_V.test(text)) return 'version';
  if (text.includes('§') || SECTION_WORD.test(text) || SECTION_LEAD.test(text.trim())) return 'section';
  return undefined;
}

/**
 * ASCII art and decorations: runs of three or more drawing characters (`---`, `===`, `|__|`, `+--+`),
 * arrows between boxes (`-->`, `<--`, `==>`), box-drawing characters, or a line made mostly of
 * punctuation.
 */
export function isAsciiArt(line: string): boolean {
  let run = 0;
  let runChar = '';
  let punct = 0;
  let visible = 0;
  for (let i = 0; i < line.length; i++) {
    const c = line[i]!;
    const code = c.charCodeAt(0);
    if (code >= 0x2500 && code <= 0x259f) return true; // box drawing, block elements
    if (code >= 0x2190 && code <= 0x21ff) return true; // arrows
    if (c === ' ' || c === '\t') { run = 0; runChar = ''; continue; }
    visible++;
    if ('-=_|+*~#<>/\\.:^'.includes(c)) {
      punct++;
      if (c === runChar) run++;
      else { run = 1; runChar = c; }
      if (run >= 3 && c !== '.' && c !== '*') return true;
      if (run >= 4) return true;
    } else {
      run = 0;
      runChar = '';
    }
  }
  if (line.includes('->') && (line.includes('[') || line.includes('|'))) return true;
  if (line.includes('-->') || line.includes('<--') || line.includes('==>') || line.includes('<==')) return true;
  return visible >= 6 && punct / visible > 0.6;
}

/**
 * Array shapes and tuples: `(B, T, C)`, `[N, D]`, `(batch, seq, dim)` — a bracketed, comma-separated
 * list of bare names or integers, with no operator inside.
 */
export function isShape(text: string): boolean {
  const t = text.trim();
  if (t.length < 3) return false;
  const open = t[0];
  const close = t[t.length - 1];
  if (!((open === '(' && close === ')') || (open === '[' && close === ']'))) return false;
  const inner = t.slice(1, -1);
  if (!inner.includes(',')) return false;
  for (const part of inner.split(',')) {
    const p = part.trim();
    if (p.length === 0) continue;
    if (!/^[A-Za-z_][A-Za-z0-9_]*$|^\d+$|^\.\.\.$|^None$/.test(p)) return false;
  }
  return true;
}

/**
 * Index arithmetic: only index-like names (`i`, `n`, `idx`, `B`, `T`…) and integers combined with
 * `+ - *` (`i+1`, `n-1`, `B*T`), or any subscript `a[i+1]`.
 */
export function isIndexArithmetic(text: string): boolean {
  let k = 0;
  let sawName = false;
  let sawOp = false;
  while (k < text.length) {
    const c = text[k]!;
    if (c === ' ' || c === '\t') { k++; continue; }
    if (/[A-Za-z_]/.test(c)) {
      let e = k + 1;
      while (e < text.length && /[A-Za-z0-9_]/.test(text[e]!)) e++;
      const w = text.slice(k, e);
      if (text[e] === '[') return true; // subscript
      if (!INDEX_NAMES.has(w)) return false;
      sawName = true;
      k = e;
      continue;
    }
    if (c >= '0' && c <= '9') {
      let e = k + 1;
      while (e < text.length && text[e]! >= '0' && text[e]! <= '9') e++;
      if (text[e] === '.') return false; // a decimal: not an index
      k = e;
      continue;
    }
    if (c === '+' || c === '-' || c === '*' || c === '(' || c === ')' || c === '/' ) {
      if (c !== '(' && c !== ')') sawOp = true;
      k++;
      continue;
    }
    return false;
  }
  return sawName && sawOp;
}
