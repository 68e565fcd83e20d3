/**
 * Which lexical family a source file belongs to, from the editor's language id or the file name.
 *
 * A family fixes the comment markers and string-literal forms the lexer must know (so that a `#`
 * inside a string is not a comment, and a `'` in MATLAB can be a transpose), and which statement
 * parser reads function bodies. Unknown files get the `generic` family: `#`, `//`, `/* *\/` comments
 * and plain quoted strings, which covers most configuration and script formats well enough to find
 * formulas in their comments.
 */
import type { Language } from '../types';

export type Family =
  | 'python'
  | 'c' // C, C++, CUDA, Java, C#, Swift, Scala, Dart, Kotlin, JS/TS, Go, Rust: `//` and `/* */`
  | 'julia'
  | 'r'
  | 'matlab'
  | 'fortran'
  | 'lua'
  | 'dashdash' // Haskell, SQL, Ada, Elm: `--` line comments
  | 'semicolon' // Lisp, assembly, ini: `;`
  | 'hash' // shell, Ruby, Perl, YAML, TOML, Makefile, Nim: `#`
  | 'percent' // LaTeX, Erlang, Prolog: `%`
  | 'markdown'
  | 'generic';

export interface LanguageInfo {
  family: Family;
  /** Engine dialect for code in this file (`plain` when the engine has none). */
  language: Language;
  /** The language as the user knows it (for output). */
  label: string;
  /** Fortran fixed form: `c`, `C`, `*` in column 1 start a comment. */
  fixedForm?: boolean;
}

const BY_ID: Record<string, LanguageInfo> = {
  python: { family: 'python', language: 'python', label: 'python' },
  c: { family: 'c', language: 'c', label: 'c' },
  cpp: { family: 'c', language: 'cpp', label: 'cpp' },
  'cuda-cpp': { family: 'c', language: 'cuda', label: 'cuda' },
  cuda: { family: 'c', language: 'cuda', label: 'cuda' },
  rust: { family: 'c', language: 'rust', label: 'rust' },
  go: { family: 'c', language: 'go', label: 'go' },
  julia: { family: 'julia', language: 'julia', label: 'julia' },
  r: { family: 'r', language: 'r', label: 'r' },
  matlab: { family: 'matlab', language: 'matlab', label: 'matlab' },
  octave: { family: 'matlab', language: 'matlab', label: 'octave' },
  fortran: { family: 'fortran', language: 'fortran', label: 'fortran' },
  'fortran-modern': { family: 'fortran', language: 'fortran', label: 'fortran' },
  FortranFreeForm: { family: 'fortran', language: 'fortran', label: 'fortran' },
  'fortran_fixed-form': { family: 'fortran', language: 'fortran', label: 'fortran', fixedForm: true },
  javascript: { family: 'c', language: 'javascript', label: 'javascript' },
  javascriptreact: { family: 'c', language: 'javascript', label: 'javascript' },
  typescript: { family: 'c', language: 'typescript', label: 'typescript' },
  typescriptreact: { family: 'c', language: 'typescript', label: 'typescript' },
  java: { family: 'c', language: 'java', label: 'java' },
  kotlin: { family: 'c', language: 'kotlin', label: 'kotlin' },
  lua: { family: 'lua', language: 'lua', label: 'lua' },
  csharp: { family: 'c', language: 'plain', label: 'csharp' },
  swift: { family: 'c', language: 'plain', label: 'swift' },
  scala: { family: 'c', language: 'plain', label: 'scala' },
  dart: { family: 'c', language: 'plain', label: 'dart' },
  haskell: { family: 'dashdash', language: 'plain', label: 'haskell' },
  sql: { family: 'dashdash', language: 'plain', label: 'sql' },
  ada: { family: 'dashdash', language: 'plain', label: 'ada' },
  elm: { family: 'dashdash', language: 'plain', label: 'elm' },
  lisp: { family: 'semicolon', language: 'plain', label: 'lisp' },
  clojure: { family: 'semicolon', language: 'plain', label: 'clojure' },
  scheme: { family: 'semicolon', language: 'plain', label: 'scheme' },
  ini: { family: 'semicolon', language: 'plain', label: 'ini' },
  asm: { family: 'semicolon', language: 'plain', label: 'asm' },
  shellscript: { family: 'hash', language: 'plain', label: 'shell' },
  ruby: { family: 'hash', language: 'plain', label: 'ruby' },
  perl: { family: 'hash', language: 'plain', label: 'perl' },
  yaml: { family: 'hash', language: 'plain', label: 'yaml' },
  toml: { family: 'hash', language: 'plain', label: 'toml' },
  makefile: { family: 'hash', language: 'plain', label: 'makefile' },
  nim: { family: 'hash', language: 'plain', label: 'nim' },
  latex: { family: 'percent', language: 'latex', label: 'latex' },
  tex: { family: 'percent', language: 'latex', label: 'latex' },
  erlang: { family: 'percent', language: 'plain', label: 'erlang' },
  prolog: { family: 'percent', language: 'plain', label: 'prolog' },
  markdown: { family: 'markdown', language: 'plain', label: 'markdown' },
  plaintext: { family: 'markdown', language: 'plain', label: 'plaintext' },
};

const BY_EXT: Record<string, string> = {
  py: 'python', pyi: 'python', pyx: 'python', ipy: 'python',
  c: 'c', h: 'c',
  cc: 'cpp', cpp: 'cpp', cxx: 'cpp', hpp: 'cpp', hh: 'cpp', hxx: 'cpp', 'c++': 'cpp',
  cu: 'cuda', cuh: 'cuda',
  rs: 'rust', go: 'go', jl: 'julia', r: 'r', R: 'r',
  m: 'matlab', mat: 'matlab',
  f90: 'fortran', f95: 'fortran', f03: 'fortran', f08: 'fortran',
  f: 'fortran_fixed-form', for: 'fortran_fixed-form', f77: 'fortran_fixed-form', ftn: 'fortran_fixed-form',
  js: 'javascript', mjs: 'javascript', cjs: 'javascript', jsx: 'javascript',
  ts: 'typescript', mts: 'typescript', cts: 'typescript', tsx: 'typescript',
  java: 'java', kt: 'kotlin', kts: 'kotlin', lua: 'lua',
  cs: 'csharp', swift: 'swift', scala: 'scala', dart: 'dart',
  hs: 'haskell', sql: 'sql', adb: 'ada', ads: 'ada', elm: 'elm',
  lisp: 'lisp', el: 'lisp', clj: 'clojure', scm: 'scheme', ini: 'ini', asm: 'asm', s: 'asm',
  sh: 'shellscript', bash: 'shellscript', zsh: 'shellscript', rb: 'ruby', pl: 'perl',
  yml: 'yaml', yaml: 'yaml', toml: 'toml', mk: 'makefile', nim: 'nim',
  tex: 'latex', sty: 'latex', erl: 'erlang',
  md: 'markdown', markdown: 'markdown', txt: 'plaintext', rst: 'plaintext',
};

const GENERIC: LanguageInfo = { family: 'generic', language: 'plain', label: 'text' };

/** Resolve the family from a language id first, then the file name's extension. */
export function languageInfo(languageId?: string, fileName?: string): LanguageInfo {
  if (languageId && BY_ID[languageId]) return BY_ID[languageId]!;
  if (fileName) {
    const base = fileName.slice(Math.max(fileName.lastIndexOf('/'), fileName.lastIndexOf('\\')) + 1);
    if (base === 'Makefile') return BY_ID.makefile!;
    const dot = base.lastIndexOf('.');
    if (dot > 0) {
      const ext = base.slice(dot + 1);
      const id = BY_EXT[ext] ?? BY_EXT[ext.toLowerCase()];
      if (id && BY_ID[id]) return BY_ID[id]!;
    }
  }
  return GENERIC;
}
