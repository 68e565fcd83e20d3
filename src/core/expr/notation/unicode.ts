/**
 * Unicode maths notation → ASCII mathjs-friendly text: σ(…) → sigmoid(…), π → pi, √ → sqrt, · × → *,
 * − → -, superscripts (x² → x^(2)), subscripts (x₀ → x_0), Greek letters → ASCII names (α → alpha).
 * One pass over the characters, no regular expressions. Display restores Greek names (see display.ts).
 */
import { SlopewiseError } from '../../errors';
import { MappedText, isDigit, isIdentChar } from './text';

/** Greek letters → the ASCII symbol names used in canonical form (mathjs toTex maps these back to \alpha…). */
export const GREEK_TO_ASCII: Readonly<Record<string, string>> = {
  α: 'alpha', β: 'beta', γ: 'gamma', δ: 'delta', ε: 'epsilon', ϵ: 'epsilon', ζ: 'zeta', η: 'eta',
  θ: 'theta', ι: 'iota', κ: 'kappa', λ: 'lambda', μ: 'mu', ν: 'nu', ξ: 'xi', ρ: 'rho', σ: 'sigma',
  τ: 'tau', υ: 'upsilon', φ: 'phi', ϕ: 'phi', χ: 'chi', ψ: 'psi', ω: 'omega', Γ: 'Gamma', Δ: 'Delta',
  Θ: 'Theta', Λ: 'Lambda', Σ: 'Sigma', Φ: 'Phi', Ψ: 'Psi', Ω: 'Omega',
};

/** ASCII names → Greek letters, for display. */
export const ASCII_TO_GREEK: Readonly<Record<string, string>> = Object.fromEntries(
  Object.entries(GREEK_TO_ASCII).filter(([g]) => g !== 'ϵ' && g !== 'ϕ').map(([g, a]) => [a, g]),
);

/** Greek letters that name a function when called: σ(x) is the logistic sigmoid, Φ(x) the normal CDF. */
const GREEK_FUNCTIONS: Readonly<Record<string, string>> = { σ: 'sigmoid', Φ: 'normal_cdf', φ: 'normal_pdf' };

const SIMPLE: Readonly<Record<string, string>> = {
  '·': '*', '⋅': '*', '×': '*', '∗': '*', '∙': '*', '•': '*',
  '−': '-', '–': '-', '‐': '-', '﹣': '-', '－': '-',
  '÷': '/', '∕': '/', '⁄': '/',
  '≤': '<=', '⩽': '<=', '≥': '>=', '⩾': '>=', '≠': '!=',
  '∞': ' Infinity ', 'π': ' pi ', 'ℯ': ' e ', '∧': ' and ', '∨': ' or ', '¬': ' not ',
  'ˆ': '^', '′': '_d', '″': '_dd', '\u00a0': ' ', '\u2009': ' ', '\u2002': ' ', '\u2003': ' ',
  '\u202f': ' ', '\u200b': '',
};

const SUPERSCRIPTS: Readonly<Record<string, string>> = {
  '⁰': '0', '¹': '1', '²': '2', '³': '3', '⁴': '4', '⁵': '5', '⁶': '6', '⁷': '7', '⁸': '8', '⁹': '9',
  '⁺': '+', '⁻': '-', '⁽': '(', '⁾': ')', 'ⁿ': 'n', 'ˣ': 'x', 'ᶻ': 'z', 'ⁱ': 'i',
};

const SUBSCRIPTS: Readonly<Record<string, string>> = {
  '₀': '0', '₁': '1', '₂': '2', '₃': '3', '₄': '4', '₅': '5', '₆': '6', '₇': '7', '₈': '8', '₉': '9',
  'ₓ': 'x', 'ᵢ': 'i', 'ⱼ': 'j', 'ₙ': 'n',
};

/** True when the text has any character this module rewrites. */
export function hasUnicodeMath(text: string): boolean {
  for (const c of text) {
    if (c.charCodeAt(0) > 127) return true;
  }
  return false;
}

function nextNonSpace(text: string, i: number): number {
  let j = i;
  while (j < text.length && text[j] === ' ') j++;
  return j;
}

/**
 * Rewrites Unicode notation. Characters are taken one UTF-16 unit at a time (every character we know
 * is in the BMP); anything else non-ASCII is an error at its position.
 */
export function unicodeToAscii(text: string, origin: readonly number[] | null = null): { text: string; map: number[] } {
  const out = new MappedText();
  const at = (i: number): number => (origin ? (origin[i] ?? i) : i);
  let i = 0;
  while (i < text.length) {
    const c = text.charAt(i);
    if (c.charCodeAt(0) < 128) {
      out.push(c, at(i));
      i++;
      continue;
    }
    const fn = GREEK_FUNCTIONS[c];
    if (fn !== undefined) {
      const j = nextNonSpace(text, i + 1);
      const calls = text[j] === '(' || (text[j] === '.' && text[j + 1] === '(');
      if (calls) {
        if (isIdentChar(out.lastChar())) out.push(' ', at(i));
        out.push(fn, at(i));
        i++;
        continue;
      }
    }
    const greek = GREEK_TO_ASCII[c];
    if (greek !== undefined) {
      if (isIdentChar(out.lastChar())) out.push(' ', at(i));
      out.push(greek, at(i));
      const next = text.charAt(i + 1);
      // α2 and α_1 stay one name; αx is α times x.
      if (next !== '' && isIdentChar(next) && !isDigit(next) && next !== '_') out.push(' ', at(i));
      i++;
      continue;
    }
    const simple = SIMPLE[c];
    if (simple !== undefined) {
      out.push(simple, at(i));
      i++;
      continue;
    }
    if (SUPERSCRIPTS[c] !== undefined) {
      out.push('^(', at(i));
      while (i < text.length && SUPERSCRIPTS[text.charAt(i)] !== undefined) {
        out.push(SUPERSCRIPTS[text.charAt(i)] ?? '', at(i));
        i++;
      }
      out.push(')', at(i - 1));
      continue;
    }
    if (SUBSCRIPTS[c] !== undefined) {
      out.push('_', at(i));
      while (i < text.length && SUBSCRIPTS[text.charAt(i)] !== undefined) {
        out.push(SUBSCRIPTS[text.charAt(i)] ?? '', at(i));
        i++;
      }
      continue;
    }
    if (c === '√' || c === '∛') {
      const name = c === '√' ? 'sqrt' : 'cbrt';
      if (isIdentChar(out.lastChar())) out.push(' ', at(i));
      const j = nextNonSpace(text, i + 1);
      if (text[j] === '(') {
        out.push(name, at(i));
        i++;
        continue;
      }
      // √x, √2, √α: the radicand is the next name or number.
      let k = j;
      while (k < text.length && (isIdentChar(text.charAt(k)) || text[k] === '.' || GREEK_TO_ASCII[text.charAt(k)] !== undefined)) k++;
      if (k === j) throw new SlopewiseError('syntax', `${c} needs something after it to take the root of`, at(i));
      out.push(`${name}(`, at(i));
      for (let m = j; m < k; m++) {
        const g = GREEK_TO_ASCII[text.charAt(m)];
        out.push(g ?? text.charAt(m), at(m));
      }
      out.push(')', at(k - 1));
      i = k;
      continue;
    }
    throw new SlopewiseError('syntax', `Unexpected character '${c}'`, at(i));
  }
  return out.finish();
}
