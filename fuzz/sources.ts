/**
 * Random source files for the detection and checking stages: functions with formulas in code and in
 * comments, hand-written derivatives (right and wrong), prose and lookalikes (dates, versions, shapes),
 * in every language family the detector knows. Seed files (test/fixtures/**, demo/**) are mutated
 * separately (mutate.ts).
 */
import { genTree, render, type Dialect, type Tree } from './grammar';
import type { Rng } from './rng';

export interface SourceLanguage {
  languageId: string;
  ext: string;
  dialect: Dialect;
  line: string;
  block?: [string, string];
  fn: (name: string, v: string, body: string, r: Rng) => string;
}

export const SOURCE_LANGUAGES: readonly SourceLanguage[] = [
  { languageId: 'python', ext: 'py', dialect: 'python-numpy', line: '#', block: ['"""', '"""'], fn: (n, v, b, r) => (r.bool(0.2) ? `${n} = lambda ${v}: ${b}` : `def ${n}(${v}):\n    ${r.bool(0.3) ? `"""${n}: f(${v}) = ${b}"""\n    ` : ''}return ${b}`) },
  { languageId: 'python', ext: 'py', dialect: 'python-torch', line: '#', block: ["'''", "'''"], fn: (n, v, b) => `class ${n.toUpperCase()}(torch.autograd.Function):\n    @staticmethod\n    def forward(ctx, ${v}):\n        return ${b}\n` },
  { languageId: 'c', ext: 'c', dialect: 'c', line: '//', block: ['/*', '*/'], fn: (n, v, b) => `static inline float ${n}(float ${v}) {\n    return ${b};\n}` },
  { languageId: 'cpp', ext: 'cpp', dialect: 'cpp', line: '//', block: ['/*', '*/'], fn: (n, v, b, r) => (r.bool(0.3) ? `auto ${n} = [](double ${v}) { return ${b}; };` : `template <typename T>\nT ${n}(T ${v}) {\n  const T t = ${b};\n  return t;\n}`) },
  { languageId: 'cuda-cpp', ext: 'cu', dialect: 'cuda', line: '//', block: ['/*', '*/'], fn: (n, v, b) => `__device__ __forceinline__ float ${n}(float ${v}) { return ${b}; }` },
  { languageId: 'rust', ext: 'rs', dialect: 'rust', line: '//', block: ['/*', '*/'], fn: (n, v, b, r) => `${r.bool(0.3) ? `/// ${n}(${v}) = ${b}\n` : ''}pub fn ${n}(${v}: f64) -> f64 {\n    ${b}\n}` },
  { languageId: 'go', ext: 'go', dialect: 'go', line: '//', block: ['/*', '*/'], fn: (n, v, b) => `func ${n}(${v} float64) float64 {\n\treturn ${b}\n}` },
  { languageId: 'julia', ext: 'jl', dialect: 'julia', line: '#', block: ['#=', '=#'], fn: (n, v, b, r) => (r.bool(0.5) ? `${n}(${v}) = ${b}` : `function ${n}(${v})\n    return ${b}\nend`) },
  { languageId: 'r', ext: 'R', dialect: 'r', line: '#', fn: (n, v, b) => `${n} <- function(${v}) {\n  ${b}\n}` },
  { languageId: 'matlab', ext: 'm', dialect: 'matlab', line: '%', block: ['%{', '%}'], fn: (n, v, b) => `function y = ${n}(${v})\n  y = ${b};\nend` },
  { languageId: 'fortran', ext: 'f90', dialect: 'fortran', line: '!', fn: (n, v, b) => `pure function ${n}(${v}) result(y)\n  real(8), intent(in) :: ${v}\n  real(8) :: y\n  y = ${b}\nend function ${n}` },
  { languageId: 'javascript', ext: 'js', dialect: 'javascript', line: '//', block: ['/*', '*/'], fn: (n, v, b, r) => (r.bool(0.4) ? `const ${n} = (${v}) => ${b};` : `function ${n}(${v}) {\n  return ${b};\n}`) },
  { languageId: 'typescript', ext: 'ts', dialect: 'typescript', line: '//', block: ['/**', '*/'], fn: (n, v, b) => `export function ${n}(${v}: number): number {\n  return ${b};\n}` },
  { languageId: 'java', ext: 'java', dialect: 'java', line: '//', block: ['/*', '*/'], fn: (n, v, b) => `  static double ${n}(double ${v}) {\n    return ${b};\n  }` },
  { languageId: 'kotlin', ext: 'kt', dialect: 'kotlin', line: '//', block: ['/*', '*/'], fn: (n, v, b) => `fun ${n}(${v}: Double): Double = ${b}` },
  { languageId: 'lua', ext: 'lua', dialect: 'lua', line: '--', block: ['--[[', ']]'], fn: (n, v, b) => `local function ${n}(${v})\n  return ${b}\nend` },
  { languageId: 'plaintext', ext: 'txt', dialect: 'unicode', line: '', fn: (n, v, b) => `${n}(${v}) = ${b}` },
  { languageId: 'markdown', ext: 'md', dialect: 'latex', line: '', fn: (n, v, b) => `$$ ${n}(${v}) = ${b} $$` },
  { languageId: 'latex', ext: 'tex', dialect: 'latex', line: '%', fn: (n, v, b) => `\\begin{equation}\n  ${n}(${v}) = ${b}\n\\end{equation}` },
];

const NAMES = ['sigmoid', 'act', 'gelu_fast', 'softplus', 'swish', 'my_elu', 'smooth', 'squash', 'bump', 'f'];
const DERIV_FORMS = (n: string): string[] => [`${n}_grad`, `d${n}`, `${n}_prime`, `grad_${n}`, `${n}_backward`, `${n}_deriv`, `d_${n}`];
const LOOKALIKES = [
  'Released 2023-04-01, see v1.2.3', 'shape (B, T, C) -> (B, C)', 'See section 3.2.1', 'https://example.org/a?b=c&d=1',
  'i = i + 1', 'TODO: fix this (x - 1) later', '+-----+-----+', '| a | b |', 'x[i, j] = y[j - 1]', '----', '====',
  'ratio 3/4 of the batch', 'f(x) = ', 'd/dx', "f'(x) =", '∂L/∂p =', 'grad = ', 'y = σ(', '((((((((', '$$ \\frac{', '"""',
];

/** A random source file with `count` functions (and their derivatives, comments, noise). */
export function genSource(r: Rng, lang: SourceLanguage, count: number): string {
  const out: string[] = [];
  const comment = (text: string): string => {
    if (lang.block && r.bool(0.3)) return `${lang.block[0]} ${text} ${lang.block[1]}`;
    return lang.line ? `${lang.line} ${text}` : text;
  };
  for (let i = 0; i < count; i++) {
    const v = r.pick(['x', 'z', 'x', 'u', 'logits']);
    const tree: Tree = genTree(r, { maxDepth: r.int(1, 4), params: r.bool(0.15), cond: r.bool(0.3) });
    const name = r.pick(NAMES) + (r.bool(0.3) ? String(i) : '');
    const body = render(tree, lang.dialect, v, r);
    if (r.bool(0.5)) out.push(comment(`${name}(${v}) = ${render(tree, r.pick(['plain', 'unicode', 'latex'] as const), v, r)}`));
    out.push(lang.fn(name, v, body, r));
    if (r.bool(0.5)) {
      // A derivative: sometimes right-looking (same tree differentiated by hand is not attempted), often a random one.
      const d = genTree(r, { maxDepth: r.int(1, 3), params: false, cond: r.bool(0.2) });
      const dn = r.pick(DERIV_FORMS(name));
      if (r.bool(0.3)) out.push(comment(`d/d${v} ${name} = ${render(d, 'plain', v, r)}`));
      out.push(lang.fn(dn, r.bool(0.3) ? 'y' : v, render(d, lang.dialect, r.bool(0.3) ? 'y' : v, r), r));
    }
    if (r.bool(0.3)) out.push(comment(r.pick(LOOKALIKES)));
    out.push('');
  }
  return out.join(r.bool(0.1) ? '\r\n' : '\n');
}
