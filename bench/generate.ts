/**
 * Seeded inputs for the bench, made here and never checked in: source files that look like real
 * code (mostly ordinary statements, some activation functions with comments and derivatives, in
 * several languages), a tree of such files for the CLI, and a bare comment extractor as the
 * "cheapest possible pass" baseline.
 */
import * as fs from 'node:fs';
import * as path from 'node:path';
import { Rng } from '../fuzz/rng';
import { SOURCE_LANGUAGES, genSource, type SourceLanguage } from '../fuzz/sources';

const WORDS = ['total', 'count', 'batch', 'index', 'offset', 'buffer', 'state', 'config', 'result', 'items', 'value', 'scale', 'step', 'width', 'name'];

/** One line of ordinary code, no formula (loops, calls, assignments, prose comments). */
function fillerLine(r: Rng, lang: SourceLanguage): string {
  const a = r.pick(WORDS);
  const b = r.pick(WORDS);
  const c = lang.line || '#';
  const semi = ['c', 'cpp', 'cuda-cpp', 'java', 'javascript', 'typescript', 'rust', 'go'].includes(lang.languageId) ? ';' : '';
  return r.weighted<() => string>([
    [4, () => `    ${a}_${b} = ${a} + ${r.int(1, 99)}${semi}`],
    [2, () => `    log_message("${a} done at step", ${b})${semi}`],
    [2, () => `${lang.line ? `${c} ` : ''}Update the ${a} before the ${b} is read again.`],
    [1, () => `    ${a}.append(${b}[${r.int(0, 9)}])${semi}`],
    [1, () => ''],
    [1, () => `${lang.line ? `${c} ` : ''}See issue 123, released 2024-01-05 (v${r.int(1, 9)}.${r.int(0, 9)}.${r.int(0, 9)}).`],
  ])();
}

/** About `lines` lines of code in one language: filler with a formula function every ~`every` lines. */
export function realisticSource(r: Rng, lang: SourceLanguage, lines: number, every = 40): string {
  const out: string[] = [];
  while (out.length < lines) {
    const block = r.int(Math.floor(every / 2), every);
    for (let i = 0; i < block && out.length < lines; i++) out.push(fillerLine(r, lang));
    for (const l of genSource(r, lang, 1).split('\n')) out.push(l);
  }
  return out.slice(0, lines).join('\n') + '\n';
}

/** Languages of the mixed-language input (one file each). */
export const MIXED = ['python', 'c', 'cuda-cpp', 'rust', 'go', 'julia', 'typescript', 'java', 'lua', 'matlab'];

export interface LangFile { languageId: string; fileName: string; text: string }

/** `totalLines` lines split over one file per language of MIXED. */
export function mixedLanguageFiles(seed: number, totalLines: number): LangFile[] {
  const r = new Rng(seed);
  const langs = MIXED.map((id) => SOURCE_LANGUAGES.find((l) => l.languageId === id) as SourceLanguage);
  const per = Math.ceil(totalLines / langs.length);
  return langs.map((l) => ({ languageId: l.languageId, fileName: `mixed.${l.ext}`, text: realisticSource(r, l, per) }));
}

/** A tree of `files` files (nested folders) for the CLI; returns its root. */
export function writeTree(root: string, seed: number, files: number, linesPerFile: number): string {
  const r = new Rng(seed);
  fs.rmSync(root, { recursive: true, force: true });
  for (let i = 0; i < files; i++) {
    const lang = SOURCE_LANGUAGES[i % SOURCE_LANGUAGES.length] as SourceLanguage;
    const dir = path.join(root, `pkg${i % 10}`, `mod${Math.floor(i / 10) % 10}`);
    fs.mkdirSync(dir, { recursive: true });
    fs.writeFileSync(path.join(dir, `file${i}.${lang.ext}`), realisticSource(r, lang, linesPerFile));
  }
  return root;
}

/**
 * The cheapest pass that finds a file's comments: one scan, line comments, block comments and
 * string literals (so a `#` inside a string is not a comment). Returns the comment texts.
 */
export function bareCommentScan(text: string, line: string, block?: readonly [string, string]): string[] {
  const out: string[] = [];
  const n = text.length;
  let i = 0;
  while (i < n) {
    const ch = text.charCodeAt(i);
    if (ch === 34 || ch === 39) {
      // A string literal: skip to its end (or the end of the line).
      const q = ch;
      i++;
      while (i < n) {
        const c = text.charCodeAt(i);
        if (c === 92) { i += 2; continue; }
        if (c === q || c === 10) { i++; break; }
        i++;
      }
      continue;
    }
    if (block && text.startsWith(block[0], i)) {
      const end = text.indexOf(block[1], i + block[0].length);
      const stop = end < 0 ? n : end + block[1].length;
      out.push(text.slice(i, stop));
      i = stop;
      continue;
    }
    if (line && text.startsWith(line, i)) {
      let end = text.indexOf('\n', i);
      if (end < 0) end = n;
      out.push(text.slice(i, end));
      i = end;
      continue;
    }
    i++;
  }
  return out;
}

export function commentSyntax(languageId: string): { line: string; block?: readonly [string, string] } {
  const l = SOURCE_LANGUAGES.find((s) => s.languageId === languageId);
  if (!l) return { line: '#' };
  return l.block ? { line: l.line, block: l.block } : { line: l.line };
}
