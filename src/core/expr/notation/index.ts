/**
 * Notation → canonical stock-mathjs text. Stages, in order:
 *  1. LaTeX subset → plain text (latex.ts), when the text is LaTeX;
 *  2. Unicode maths → ASCII (unicode.ts);
 *  3. tokens (lexer.ts), statement heads and left-hand sides dropped (plain.ts, python.ts, arraylang.ts, rust.ts);
 *  4. bracket tree (tree.ts) and dialect rewrites per level: casts, namespaces, broadcast and method
 *     calls, keyword arguments, Python conditionals, operator spellings;
 *  5. refusal of what no formula needs (strings, braces, indexing, several statements);
 *  6. emission as text with a map back to the input, for error positions.
 * Function names (expf, math.Exp, pmax, ifelse…) are resolved on the parsed tree (../aliases.ts).
 */
import { SlopewiseError } from '../../errors';
import { FORBIDDEN_NAMES } from '../aliases';
import type { Language } from '../../types';
import { arrowHead, broadcastCalls } from './arraylang';
import { dropCasts, normaliseOperators } from './cfamily';
import { guessLanguage } from './guess';
import { latexToPlain, looksLikeLatex } from './latex';
import type { Token } from './lexer';
import { lex } from './lexer';
import { stripModules } from './modules';
import { splitStatement } from './plain';
import { keywordArguments, pythonHead, pythonTernary } from './python';
import { closureHead, dropAsCasts, methodCalls } from './rust';
import type { Item } from './tree';
import { buildTree, emit, isGroup } from './tree';
import { hasUnicodeMath, unicodeToAscii } from './unicode';

export interface NotationResult {
  /** Text for mathjs.parse. */
  text: string;
  /** Offset in `text` → offset in the input. */
  map: number[];
  language: Language;
  /** The variable named by the formula's head (`f(x) =`, `lambda z:`), if any. */
  variableHint?: string;
  /** Name on the left-hand side (`gelu_fast = …`, `def softplus(x)`), if any. */
  name?: string;
  notes: string[];
  /** Where each name occurs in the input (for error positions after parsing). */
  names: { name: string; at: number; call: boolean }[];
  /** Namespace prefixes seen in front of calls, e.g. "jax.nn.gelu". */
  prefixes: string[];
}

const XOR_LANGUAGES = new Set<Language>(['python', 'c', 'cpp', 'cuda', 'rust', 'go', 'javascript', 'typescript', 'java', 'kotlin']);

function applyLevel(items: Item[], notes: Set<string>, xor: boolean): Item[] {
  // Innermost first, so receivers and arguments are already canonical.
  let level = items.map((it) => (isGroup(it) ? { ...it, items: applyLevel(it.items, notes, xor) } : it));
  level = dropAsCasts(level);
  level = stripModules(level, notes);
  level = dropCasts(level);
  level = normaliseOperators(level, notes, xor);
  level = broadcastCalls(level);
  level = methodCalls(level);
  level = keywordArguments(level, notes);
  level = pythonTernary(level);
  return level;
}

/** Forbidden names first, so `import("fs")` is refused for the call, not for its string. */
function refuseNames(items: readonly Item[]): void {
  for (const it of items) {
    if (isGroup(it)) { refuseNames(it.items); continue; }
    if (it.kind === 'id' && FORBIDDEN_NAMES.has(it.text.toLowerCase())) {
      throw new SlopewiseError('not-allowed', `The name '${it.text}' is not allowed in a formula`, it.start);
    }
  }
}

function refuse(items: readonly Item[]): void {
  for (const it of items) {
    if (isGroup(it)) {
      if (it.open.text === '[' ) throw new SlopewiseError('not-allowed', 'Indexing and arrays ([…]) are not allowed in a formula', it.open.start);
      if (it.open.text === '{') throw new SlopewiseError('not-allowed', 'Objects and blocks ({…}) are not allowed in a formula', it.open.start);
      refuse(it.items);
      continue;
    }
    if (it.kind === 'str') throw new SlopewiseError('not-allowed', 'Strings are not allowed in a formula', it.start);
    if (it.kind === 'op') {
      switch (it.text) {
        case ';': throw new SlopewiseError('not-allowed', 'Only one expression is allowed (found ;)', it.start);
        case '=': throw new SlopewiseError('not-allowed', 'Assignments are not allowed inside a formula', it.start);
        case '//': throw new SlopewiseError('not-allowed', 'Floor division (//) is not supported', it.start);
        case '%': throw new SlopewiseError('not-allowed', 'The % operator is not supported', it.start);
        case '.': throw new SlopewiseError('not-allowed', 'Property access (.) is not allowed', it.start);
        case '\'': throw new SlopewiseError('not-allowed', "A prime (') is only understood on the left-hand side, as in f'(x) = …", it.start);
        case '::': case '@': case '\\': case '#': case '<<': case '>>': case '->': case '=>': case ':=':
        case '+=': case '-=': case '*=': case '/=': case '**=':
          throw new SlopewiseError('not-allowed', `'${it.text}' is not allowed in a formula`, it.start);
        default:
      }
    }
  }
}

/** Reads a formula in any supported notation; returns mathjs-ready text and where it came from. */
export function toCanonicalText(input: string, language?: Language): NotationResult {
  const lang = language ?? guessLanguage(input);
  let text = input;
  let map: number[] | null = null;
  if (lang === 'latex' || (language === undefined && looksLikeLatex(input))) {
    const r = latexToPlain(input);
    text = r.text;
    map = r.map;
  }
  if (hasUnicodeMath(text)) {
    const r = unicodeToAscii(text, map);
    text = r.text;
    map = r.map;
  }
  const identity = map ?? Array.from({ length: text.length }, (_, i) => i);
  const lexed = lex(text, identity, input.length, lang);
  const notes = new Set<string>(lexed.notes);
  let tokens: Token[] = lexed.tokens;
  if (tokens.length === 0) throw new SlopewiseError('syntax', 'Empty formula', 0);
  let variableHint: string | undefined;
  for (const head of [pythonHead, arrowHead, closureHead]) {
    const r = head(tokens);
    if (r.variable !== undefined) variableHint = r.variable;
    tokens = r.tokens;
  }
  const stmt = splitStatement(tokens);
  tokens = stmt.tokens;
  variableHint = stmt.variable ?? variableHint;
  if (variableHint === undefined) {
    // `lambda x: …` may follow the assignment: f = lambda x: …
    for (const head of [pythonHead, arrowHead, closureHead]) {
      const r = head(tokens);
      if (r.variable !== undefined) variableHint = r.variable;
      tokens = r.tokens;
    }
  }
  const tree = applyLevel(buildTree(tokens, input.length), notes, XOR_LANGUAGES.has(lang));
  refuseNames(tree);
  refuse(tree);
  const out = emit(tree);
  const prefixes: string[] = [];
  const kept: string[] = [];
  for (const n of notes) {
    if (n.startsWith('prefix:')) prefixes.push(n.slice('prefix:'.length));
    else kept.push(n);
  }
  const result: NotationResult = { text: out.text, map: out.map, language: lang, notes: kept, names: out.idPositions, prefixes };
  if (variableHint !== undefined) result.variableHint = variableHint;
  if (stmt.lhs !== undefined) result.name = stmt.lhs;
  return result;
}

export { guessLanguage } from './guess';
