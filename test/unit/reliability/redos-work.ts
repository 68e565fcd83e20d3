/**
 * The work of the ReDoS test, run inside a worker (see isolate.ts):
 * 1. every regular-expression literal in src/core/** (found with the TypeScript scanner, so none is
 *    missed by a grep) is run against long runs of the characters it mentions, with and without a
 *    mismatching tail — the classic trigger of catastrophic backtracking;
 * 2. each stage's entry point (notation, parse, detection, checking) gets 50,000-character runs of
 *    the characters the parsers care about, on one line and split into lines under the line limit.
 * Returns counts and the names of what ran, so the test can check every pattern was exercised.
 */
import * as fs from 'node:fs';
import * as path from 'node:path';
import ts from 'typescript';
import { LIMITS } from '../../../src/core/limits';
import { SlopewiseError } from '../../../src/core/errors';
import { parseFormula, toCanonicalText } from '../../../src/core/expr';
import { findFormulas } from '../../../src/core/detect';
import { checkText } from '../../../src/core/check';

const ROOT = path.resolve(__dirname, '../../..');

export interface FoundRegex { file: string; line: number; source: string; flags: string }

/** Every regex literal in src/core, with where it is. */
export function regexLiterals(): FoundRegex[] {
  const out: FoundRegex[] = [];
  const walk = (dir: string): void => {
    for (const e of fs.readdirSync(dir, { withFileTypes: true })) {
      const p = path.join(dir, e.name);
      if (e.isDirectory()) { walk(p); continue; }
      if (!e.name.endsWith('.ts')) continue;
      const text = fs.readFileSync(p, 'utf8');
      const sf = ts.createSourceFile(p, text, ts.ScriptTarget.ES2022, true);
      const visit = (n: ts.Node): void => {
        if (n.kind === ts.SyntaxKind.RegularExpressionLiteral) {
          const lit = (n as ts.RegularExpressionLiteral).text;
          const last = lit.lastIndexOf('/');
          out.push({ file: path.relative(ROOT, p), line: sf.getLineAndCharacterOfPosition(n.getStart()).line + 1, source: lit.slice(1, last), flags: lit.slice(last + 1) });
        }
        ts.forEachChild(n, visit);
      };
      visit(sf);
    }
  };
  walk(path.join(ROOT, 'src', 'core'));
  return out;
}

/** Characters a pattern cares about: its literal characters and a representative of each class/escape. */
export function caredCharacters(source: string): string[] {
  const chars = new Set<string>([' ', 'a', '1', '(', '*', '/', '#', '.', '-', 'x', '\t', '=', ',']);
  for (let i = 0; i < source.length; i++) {
    const c = source[i] as string;
    if (c === '\\') {
      const n = source[i + 1] ?? '';
      i++;
      if (n === 's') chars.add(' ');
      else if (n === 'd') chars.add('7');
      else if (n === 'w') chars.add('b');
      else if (n === 'u' && source[i + 1] === '{') {
        const end = source.indexOf('}', i);
        const cp = Number.parseInt(source.slice(i + 2, end), 16);
        if (Number.isFinite(cp)) chars.add(String.fromCodePoint(cp));
      } else if (n === 'u') {
        const cp = Number.parseInt(source.slice(i + 1, i + 5), 16);
        if (Number.isFinite(cp)) chars.add(String.fromCharCode(cp));
      } else if (n === 'p') chars.add('é');
      else if (/[^A-Za-z0-9]/.test(n)) chars.add(n);
      continue;
    }
    if (!/[\^$|?+{}\]]/.test(c)) chars.add(c);
  }
  return [...chars];
}

export interface RegexReport { patterns: number; runs: number; files: string[] }

/** Runs every literal against runs of its cared characters (length = the detector's line limit). */
export function runRegexes(length: number = LIMITS.maxLineLength): RegexReport {
  const found = regexLiterals();
  let runs = 0;
  for (const f of found) {
    let re: RegExp;
    try {
      re = new RegExp(f.source, f.flags.replace('g', '').replace('y', ''));
    } catch {
      continue;
    }
    const cs = caredCharacters(f.source);
    const inputs: string[] = [];
    for (const c of cs) {
      inputs.push(c.repeat(length), c.repeat(length - 1) + '\u0001', 'x' + c.repeat(length - 1));
    }
    // Two-character alternations: the second shape of catastrophic patterns ((a|ab)*, (\s*\w)*).
    for (let i = 0; i + 1 < cs.length; i++) inputs.push(((cs[i] as string) + (cs[i + 1] as string)).repeat(length >> 1) + '\u0001');
    for (const s of inputs) {
      re.lastIndex = 0;
      re.exec(s);
      s.replace(new RegExp(re.source, re.flags.includes('g') ? re.flags : re.flags + 'g'), '');
      runs++;
    }
  }
  return { patterns: found.length, runs, files: [...new Set(found.map((f) => f.file))] };
}

const RUN_CHARS = [' ', '1', '(', ')', '*', '/', '#', '-', '=', '.', 'x', '\\', '{', '"', "'", '`', '%', '!', ';', '$', '^', 'σ', '·', '²', '\t'];

export interface EntryReport { calls: number; refusals: number; languages: string[] }

/** Every stage's entry point on 50,000-character runs, one line and split into lines. */
export function runEntryPoints(runLength = 50_000): EntryReport {
  let calls = 0;
  let refusals = 0;
  // One language per lexical family (the family decides the comment and string syntax the lexer scans).
  const languages = ['python', 'c', 'julia', 'r', 'matlab', 'fortran', 'lua', 'latex', 'markdown'];
  const call = (f: () => unknown): void => {
    calls++;
    try {
      f();
    } catch (e) {
      if (!(e instanceof SlopewiseError)) throw e;
      refusals++;
    }
  };
  for (const c of RUN_CHARS) {
    const long = c.repeat(runLength);
    // Split into lines just under the line limit, so the detector reads them rather than skipping.
    const width = LIMITS.maxLineLength - 10;
    const lines = Array.from({ length: Math.ceil(runLength / width) }, () => c.repeat(width)).join('\n');
    const formula = c.repeat(LIMITS.maxFormulaLength - 1);
    call(() => toCanonicalText(formula));
    call(() => parseFormula(formula));
    call(() => parseFormula(`x + ${c.repeat(LIMITS.maxFormulaLength - 10)}`));
    call(() => parseFormula(long)); // refused by length before anything else runs
    for (const languageId of languages) {
      call(() => findFormulas(long, { languageId }));
      call(() => findFormulas(lines, { languageId }));
      call(() => findFormulas(`# y = ${c.repeat(width - 8)}\n`.repeat(4), { languageId }));
    }
    call(() => findFormulas(`# y = x if x > 0 ${c.repeat(width - 20)}\n`.repeat(4), { languageId: 'python' }));
    call(() => checkText(lines, { languageId: 'python' }));
    call(() => checkText(`// y = ${c.repeat(width - 8)}\n`.repeat(4), { languageId: 'c' }));
  }
  return { calls, refusals, languages };
}

/** Comment lines `y = x if x > 0 aaaa…` (the shape that made isCondition's regex quadratic). */
export function conditionLines(lines: number): number {
  const width = LIMITS.maxLineLength - 30;
  const text = Array.from({ length: lines }, () => `# y = x if x > 0 ${'a'.repeat(width)}`).join('\n');
  return findFormulas(text, { languageId: 'python' }).length;
}

/** A function body of `depth` nested calls in each code family (2^depth work before the stmt.ts fix). */
export function nestedCalls(depth: number): number {
  let n = 0;
  const call = `${'g('.repeat(depth)}x${')'.repeat(depth)}`;
  const files: [string, string][] = [
    ['rust', `fn f(x: f64) -> f64 {\n  ${call}\n}\n`],
    ['python', `def f(x):\n    return ${call}\n`],
    ['r', `f <- function(x) {\n  ${call}\n}\n`],
    ['julia', `f(x) = ${call}\n`],
  ];
  for (const [languageId, text] of files) n += checkText(text, { languageId }).length + findFormulas(text, { languageId }).length;
  return n;
}
