/** VS Code language ids → the core's dialect names. The only place the two vocabularies meet. */
import type { Language } from '../core/types';

const BY_ID: Record<string, Language> = {
  python: 'python',
  c: 'c',
  cpp: 'cpp',
  'cuda-cpp': 'cuda',
  rust: 'rust',
  go: 'go',
  julia: 'julia',
  r: 'r',
  matlab: 'matlab',
  octave: 'matlab',
  fortran: 'fortran',
  'fortran-modern': 'fortran',
  FortranFreeForm: 'fortran',
  javascript: 'javascript',
  javascriptreact: 'javascript',
  typescript: 'typescript',
  typescriptreact: 'typescript',
  java: 'java',
  kotlin: 'kotlin',
  lua: 'lua',
  latex: 'latex',
  tex: 'latex',
  plaintext: 'plain',
  markdown: 'plain',
};

export function coreLanguage(languageId: string): Language | undefined {
  return BY_ID[languageId];
}
