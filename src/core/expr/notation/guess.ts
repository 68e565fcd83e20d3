/**
 * Guesses the dialect of a formula from marks only one dialect makes. Only used for reporting and
 * for the few rules that differ (`//` floor division vs comment, `%` comment vs modulo, `^` as XOR).
 * Every rewrite that is unambiguous runs whatever the guess.
 */
import type { Language } from '../../types';
import { looksLikeLatex } from './latex';
import { isIdentChar } from './text';

function has(text: string, s: string): boolean {
  return text.includes(s);
}

/** A C float literal: a digit, then f/F, then no further name character (1.0f, 2e-3F). */
function hasFloatSuffix(text: string): boolean {
  for (let i = 1; i < text.length; i++) {
    const c = text.charAt(i);
    if ((c === 'f' || c === 'F') && text.charAt(i - 1) >= '0' && text.charAt(i - 1) <= '9') {
      const next = text.charAt(i + 1);
      if (!isIdentChar(next)) {
        // Not part of a name such as x2f.
        let k = i - 1;
        while (k >= 0 && ((text.charAt(k) >= '0' && text.charAt(k) <= '9') || text[k] === '.' || text[k] === '-' || text[k] === 'e')) k--;
        if (k < 0 || !isIdentChar(text.charAt(k))) return true;
      }
    }
  }
  return false;
}

export function guessLanguage(text: string): Language {
  if (looksLikeLatex(text)) return 'latex';
  if (has(text, '__expf') || has(text, '__logf') || has(text, '__tanhf') || has(text, '__half') || has(text, '__device__')) return 'cuda';
  if (has(text, 'kotlin.math')) return 'kotlin';
  if (has(text, 'std::') || has(text, 'static_cast')) return 'cpp';
  if (has(text, 'f32::') || has(text, 'f64::') || has(text, '_f32') || has(text, '.powi(') || has(text, '.powf(') || has(text, '.ln(') || has(text, ' as f32') || has(text, ' as f64')) return 'rust';
  if (has(text, 'math.Exp') || has(text, 'math.Max') || has(text, 'math.Tanh') || has(text, 'math.Log') || has(text, 'math.Min') || has(text, 'math.Abs') || has(text, 'math.Erf') || has(text, 'math.Pow') || has(text, ':=')) return 'go';
  if (has(text, 'Math.')) return 'javascript';
  if (has(text, 'np.') || has(text, 'numpy.') || has(text, 'torch.') || has(text, 'F.') || has(text, 'jnp.') || has(text, 'jax.') || has(text, 'tf.') || has(text, 'lambda ') || has(text, 'def ') || has(text, '**') && !has(text, 'd0') || (has(text, ' if ') && has(text, ' else '))) return 'python';
  if (has(text, 'exp.(') || has(text, 'σ.(') || has(text, '.(x)')) return 'julia';
  if (has(text, 'pmax') || has(text, 'pmin') || has(text, 'ifelse') || has(text, '<-')) return 'r';
  if (has(text, 'd0') && !has(text, 'x0') || has(text, 'merge(') || has(text, '.and.') || has(text, '.gt.')) return 'fortran';
  if (has(text, '.^') || has(text, './') || has(text, '.*') || has(text, '@(') || text.trimEnd().endsWith(';') && !has(text, 'f;') && !has(text, 'return')) return 'matlab';
  if (has(text, 'math.exp') || has(text, 'math.tanh') || has(text, 'math.log')) return has(text, '~=') || has(text, 'local ') ? 'lua' : 'python';
  if (hasFloatSuffix(text)) return 'c';
  if (has(text, 'expf') || has(text, 'tanhf') || has(text, 'fmaxf') || has(text, 'fminf') || has(text, 'logf') || has(text, 'fabs') || has(text, 'f)') || has(text, '?')) return 'c';
  if (has(text, '.exp()') || has(text, '.tanh()') || has(text, '.max(') || has(text, '.abs()')) return 'rust';
  return 'plain';
}
