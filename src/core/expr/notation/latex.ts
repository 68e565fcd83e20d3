/**
 * The LaTeX subset → plain text: \frac{a}{b}, \sqrt{a}, \sqrt[n]{a}, \left( \right), \cdot, \times,
 * e^{…}, \exp \log \ln \tanh \max \min …, \operatorname{…}, \mathrm{…}, \sigma(…), Greek letters,
 * \le \ge \ne, spacing commands, $…$ delimiters. A single left-to-right scanner with explicit brace
 * matching; no regular expressions.
 */
import { SlopewiseError } from '../../errors';
import { LIMITS } from '../../limits';
import { MappedText, isIdentChar } from './text';

/** Commands that name a function (printed as the function name). */
const FUNCTIONS: Readonly<Record<string, string>> = {
  exp: 'exp', log: 'log', ln: 'log', lg: 'log10', tanh: 'tanh', sinh: 'sinh', cosh: 'cosh', sin: 'sin',
  cos: 'cos', tan: 'tan', arctan: 'atan', arcsinh: 'asinh', max: 'max', min: 'min', sech: 'sech', erf: 'erf',
  sgn: 'sign', sign: 'sign',
};

const GREEK = new Set([
  'alpha', 'beta', 'gamma', 'delta', 'epsilon', 'zeta', 'eta', 'theta', 'iota', 'kappa', 'lambda', 'mu',
  'nu', 'xi', 'rho', 'tau', 'upsilon', 'phi', 'chi', 'psi', 'omega', 'Gamma', 'Delta', 'Theta', 'Lambda',
  'Sigma', 'Psi', 'Omega',
]);

const OPERATORS: Readonly<Record<string, string>> = {
  cdot: '*', times: '*', ast: '*', div: '/', le: '<=', leq: '<=', leqslant: '<=', ge: '>=', geq: '>=',
  geqslant: '>=', ne: '!=', neq: '!=', lt: '<', gt: '>', pi: 'pi', infty: 'Infinity', land: ' and ',
  lor: ' or ', lnot: ' not ', pm: '', mp: '',
};

const SPACING = new Set([',', ';', '!', ':', ' ', 'quad', 'qquad', 'displaystyle', 'textstyle', 'big', 'Big', 'bigg', 'Bigg', 'bigl', 'bigr', 'Bigl', 'Bigr', 'limits']);

/** Heuristic: does this text use LaTeX? */
export function looksLikeLatex(text: string): boolean {
  for (let i = 0; i < text.length; i++) {
    const c = text[i];
    if (c === '\\' && i + 1 < text.length && isLetter(text.charAt(i + 1))) return true;
    if ((c === '^' || c === '_') && text[i + 1] === '{') return true;
  }
  return false;
}

function isLetter(c: string): boolean {
  return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z');
}

/** Pre-check: brace/paren nesting bounded before the recursive conversion. */
function checkNesting(text: string): void {
  let depth = 0;
  for (let i = 0; i < text.length; i++) {
    const c = text[i];
    if (c === '{' || c === '(' || c === '[') {
      depth++;
      if (depth > LIMITS.maxNesting) throw new SlopewiseError('too-deep', `Nested more than ${LIMITS.maxNesting} levels deep`, i);
    } else if (c === '}' || c === ')' || c === ']') {
      depth = Math.max(0, depth - 1);
    }
  }
}

class LatexReader {
  private readonly out = new MappedText();
  constructor(private readonly s: string) {}

  run(): { text: string; map: number[] } {
    this.convert(0, this.s.length);
    return this.out.finish();
  }

  /** Index of the `}` matching the `{` at `open`. */
  private matchBrace(open: number, end: number): number {
    let depth = 0;
    for (let i = open; i < end; i++) {
      const c = this.s[i];
      if (c === '\\') { i++; continue; }
      if (c === '{') depth++;
      else if (c === '}') {
        depth--;
        if (depth === 0) return i;
      }
    }
    throw new SlopewiseError('syntax', 'Unclosed { in LaTeX', open);
  }

  private skipSpaces(i: number, end: number): number {
    let j = i;
    while (j < end && this.s[j] === ' ') j++;
    return j;
  }

  /** Reads a command name at `i` (just after the backslash). */
  private commandName(i: number, end: number): string {
    let j = i;
    while (j < end && isLetter(this.s.charAt(j))) j++;
    if (j === i) return this.s.charAt(i);
    return this.s.slice(i, j);
  }

  /** Emits one argument: a brace group (converted), or a single token (\cmd, letter, digit run). Returns next index. */
  private argument(i: number, end: number, wrap: boolean): number {
    const j = this.skipSpaces(i, end);
    if (j >= end) throw new SlopewiseError('syntax', 'Missing argument in LaTeX', Math.max(0, j - 1));
    if (this.s[j] === '{') {
      const close = this.matchBrace(j, end);
      if (wrap) this.out.push('(', j);
      this.convert(j + 1, close);
      if (wrap) this.out.push(')', close);
      return close + 1;
    }
    if (wrap) this.out.push('(', j);
    let k = j;
    if (this.s[j] === '\\') {
      const name = this.commandName(j + 1, end);
      k = j + 1 + name.length;
      this.convert(j, k);
    } else {
      // A digit run or one letter, as TeX reads a single-token argument.
      if (this.s.charAt(j) >= '0' && this.s.charAt(j) <= '9') {
        while (k < end && ((this.s.charAt(k) >= '0' && this.s.charAt(k) <= '9') || this.s[k] === '.')) k++;
      } else k = j + 1;
      this.out.push(this.s.slice(j, k), j, true);
    }
    if (wrap) this.out.push(')', k - 1);
    return k;
  }

  private space(at: number): void {
    if (isIdentChar(this.out.lastChar())) this.out.push(' ', at);
  }

  /** A function command: \exp{x}, \exp(x), \exp x, \ln\left(…\right). */
  private functionCall(name: string, start: number, i: number, end: number): number {
    this.space(start);
    this.out.push(name, start);
    let j = this.skipSpaces(i, end);
    // \exp^{2}(x) style powers of functions are not in the subset.
    if (this.s[j] === '(' || (this.s[j] === '\\' && this.s.startsWith('left', j + 1))) return j;
    if (this.s[j] === '\\' && this.s.startsWith('{', j + 1)) return j;
    if (this.s[j] === '{') {
      const close = this.matchBrace(j, end);
      this.out.push('(', j);
      this.convert(j + 1, close);
      this.out.push(')', close);
      return close + 1;
    }
    // \ln x, \tanh 2x: the argument runs to the next operator or space at this level.
    this.out.push('(', j);
    const startArg = j;
    while (j < end) {
      const c = this.s.charAt(j);
      if (c === ' ' || c === '+' || c === '-' || c === '=' || c === ',' || c === ')' || c === '}' || c === '<' || c === '>') break;
      if (c === '\\') {
        const cmd = this.commandName(j + 1, end);
        if (OPERATORS[cmd] !== undefined || SPACING.has(cmd) || cmd === 'right') break;
        j += 1 + cmd.length;
        continue;
      }
      if (c === '{') { j = this.matchBrace(j, end) + 1; continue; }
      if (c === '(') {
        // Balanced (…) belongs to the argument, e.g. \exp 2(x).
        let d = 0;
        let k = j;
        for (; k < end; k++) {
          if (this.s[k] === '(') d++;
          else if (this.s[k] === ')') { d--; if (d === 0) break; }
        }
        j = k + 1;
        continue;
      }
      j++;
    }
    if (j === startArg) throw new SlopewiseError('syntax', `\\${name} needs an argument`, start);
    this.convert(startArg, j);
    this.out.push(')', j - 1);
    return j;
  }

  /** Splits [from, to) at top-level (brace depth 0) occurrences of `sep`. */
  private splitTop(from: number, to: number, sep: string): [number, number][] {
    const parts: [number, number][] = [];
    let depth = 0;
    let start = from;
    for (let k = from; k < to; k++) {
      const c = this.s[k];
      if (c === '{') depth++;
      else if (c === '}') depth--;
      else if (depth === 0 && this.s.startsWith(sep, k)) {
        parts.push([start, k]);
        k += sep.length - 1;
        start = k + 1;
        continue;
      } else if (c === '\\' && sep !== '\\\\') k++;
    }
    parts.push([start, to]);
    return parts;
  }

  /** Reads a leading \text{word} (or a bare word) of a condition cell: 'if' is skipped, 'otherwise' ends it. */
  private conditionWord(from: number, to: number): { kind: 'otherwise' | 'condition'; at: number } {
    let j = this.skipSpaces(from, to);
    while (j < to && (this.s[j] === ',' || this.s.startsWith('\\quad', j) || this.s.startsWith('\\,', j) || this.s.startsWith('\\;', j) || this.s[j] === ' ')) {
      j += this.s[j] === ',' || this.s[j] === ' ' ? 1 : this.s.startsWith('\\quad', j) ? 5 : 2;
    }
    let word = '';
    let after = j;
    for (const cmd of ['\\text{', '\\mathrm{', '\\mbox{', '\\textrm{', '\\textup{']) {
      if (this.s.startsWith(cmd, j)) {
        const open = j + cmd.length - 1;
        const close = this.matchBrace(open, to);
        word = this.s.slice(open + 1, close).trim().toLowerCase();
        after = close + 1;
        break;
      }
    }
    if (word === '') {
      let k = j;
      while (k < to && isLetter(this.s.charAt(k))) k++;
      const w = this.s.slice(j, k).toLowerCase();
      if (w === 'if' || w === 'otherwise' || w === 'else' || w === 'for' || w === 'when') { word = w; after = k; }
    }
    if (word === 'otherwise' || word === 'else' || word === 'sonst') return { kind: 'otherwise', at: after };
    if (word === 'if' || word === 'for' || word === 'when' || word === 'if ' ) return { kind: 'condition', at: after };
    return { kind: 'condition', at: j };
  }

  /** \begin{cases} v₁ & c₁ \\ v₂ & c₂ … \end{cases} → (c₁) ? (v₁) : ((c₂) ? (v₂) : (vₙ)). */
  private cases(start: number, i: number, to: number): number {
    const env = '{cases}';
    if (!this.s.startsWith(env, i)) throw new SlopewiseError('syntax', 'Only the cases environment is supported after \\begin', start);
    const bodyStart = i + env.length;
    const endAt = this.s.indexOf('\\end{cases}', bodyStart);
    if (endAt < 0 || endAt >= to) throw new SlopewiseError('syntax', 'Missing \\end{cases}', start);
    const rows = this.splitTop(bodyStart, endAt, '\\\\').filter(([a, b]) => this.s.slice(a, b).trim() !== '');
    if (rows.length < 2) throw new SlopewiseError('syntax', 'A cases environment needs at least two rows', start);
    let open = 0;
    rows.forEach(([a, b], r) => {
      const cells = this.splitTop(a, b, '&');
      if (cells.length !== 2) throw new SlopewiseError('syntax', 'Each row of cases needs one & between value and condition', a);
      const [value, cond] = cells as [[number, number], [number, number]];
      // "x, & if …": the comma belongs to the prose, not the value.
      while (value[1] > value[0] && (this.s[value[1] - 1] === ',' || this.s[value[1] - 1] === ' ')) value[1]--;
      const last = r === rows.length - 1;
      const w = this.conditionWord(cond[0], cond[1]);
      if (last) {
        this.out.push('(', value[0]);
        this.convert(value[0], value[1]);
        this.out.push(')', value[1]);
        return;
      }
      if (w.kind === 'otherwise') throw new SlopewiseError('syntax', "'otherwise' must be the last row of cases", cond[0]);
      this.out.push('((', cond[0]);
      this.convert(w.at, cond[1]);
      this.out.push(') ? (', cond[0]);
      this.convert(value[0], value[1]);
      this.out.push(') : ', value[1]);
      open++;
    });
    for (let k = 0; k < open; k++) this.out.push(')', endAt);
    return endAt + '\\end{cases}'.length;
  }

  private convert(from: number, to: number): void {
    let i = from;
    const s = this.s;
    while (i < to) {
      const c = s.charAt(i);
      if (c === '$') { i++; continue; }
      if (c === '{') {
        const close = this.matchBrace(i, to);
        this.out.push('(', i);
        this.convert(i + 1, close);
        this.out.push(')', close);
        i = close + 1;
        continue;
      }
      if (c === '}') throw new SlopewiseError('syntax', 'Unmatched } in LaTeX', i);
      if (c === '&') throw new SlopewiseError('not-allowed', 'LaTeX alignment (&) is not part of the supported subset', i);
      if (c === '~') { this.out.push(' ', i); i++; continue; }
      if (c === '^') {
        this.out.push('^', i);
        i = this.argument(i + 1, to, true);
        continue;
      }
      if (c === '_') {
        // Subscripts are part of a name: x_{0} → x_0, \beta_1 → beta_1.
        const j = this.skipSpaces(i + 1, to);
        this.out.push('_', i);
        if (s[j] === '{') {
          const close = this.matchBrace(j, to);
          for (let k = j + 1; k < close; k++) {
            const ch = s.charAt(k);
            if (isIdentChar(ch)) this.out.push(ch, k);
            else if (ch === '\\') {
              const name = this.commandName(k + 1, close);
              if (!GREEK.has(name)) throw new SlopewiseError('syntax', `Unsupported subscript \\${name}`, k);
              this.out.push(name, k);
              k += name.length;
            } else if (ch !== ' ') throw new SlopewiseError('syntax', `Unsupported character '${ch}' in a subscript`, k);
          }
          i = close + 1;
        } else {
          this.out.push(s.charAt(j), j);
          i = j + 1;
        }
        continue;
      }
      if (c !== '\\') {
        this.out.push(c, i);
        i++;
        continue;
      }
      // A command.
      const start = i;
      const name = this.commandName(i + 1, to);
      i = i + 1 + name.length;
      if (name === '\\') throw new SlopewiseError('not-allowed', 'LaTeX line breaks (\\\\) are not part of the supported subset', start);
      if (SPACING.has(name)) { this.out.push(' ', start); continue; }
      if (name === '(' || name === ')' || name === '[' || name === ']') { this.out.push(' ', start); continue; }
      if (name === '{') { this.out.push('(', start); continue; }
      if (name === '}') { this.out.push(')', start); continue; }
      if (name === '|') { this.out.push('|', start); continue; }
      if (name === 'left' || name === 'right' || name === 'bigl' || name === 'bigr') {
        const j = this.skipSpaces(i, to);
        const d = s.charAt(j);
        if (d === '.') { i = j + 1; continue; }
        if (d === '(' || d === '[') this.out.push('(', j);
        else if (d === ')' || d === ']') this.out.push(')', j);
        else if (d === '|') this.out.push(name === 'left' ? 'abs(' : ')', j);
        else if (d === '\\') {
          const inner = this.commandName(j + 1, to);
          if (inner === '{') this.out.push('(', j);
          else if (inner === '}') this.out.push(')', j);
          else if (inner === 'lvert' || inner === 'vert') this.out.push(name === 'left' ? 'abs(' : ')', j);
          else if (inner === 'rvert') this.out.push(')', j);
          else throw new SlopewiseError('syntax', `Unsupported delimiter after \\${name}`, j);
          i = j + 1 + inner.length;
          continue;
        } else throw new SlopewiseError('syntax', `Unsupported delimiter after \\${name}`, j);
        i = j + 1;
        continue;
      }
      if (name === 'begin') {
        i = this.cases(start, i, to);
        continue;
      }
      if (name === 'lvert') { this.space(start); this.out.push('abs(', start); continue; }
      if (name === 'rvert') { this.out.push(')', start); continue; }
      if (name === 'frac' || name === 'dfrac' || name === 'tfrac') {
        this.space(start);
        this.out.push('(', start);
        i = this.argument(i, to, true);
        this.out.push('/', start);
        i = this.argument(i, to, true);
        this.out.push(')', i - 1);
        continue;
      }
      if (name === 'sqrt') {
        this.space(start);
        let j = this.skipSpaces(i, to);
        if (s[j] === '[') {
          let k = j + 1;
          while (k < to && s[k] !== ']') k++;
          if (k >= to) throw new SlopewiseError('syntax', 'Unclosed [ after \\sqrt', j);
          this.out.push('(', start);
          j = this.argument(k + 1, to, true);
          this.out.push('^(1/(', start);
          this.convert(this.skipSpaces(i, to) + 1, k);
          this.out.push(')))', j - 1);
          i = j;
          continue;
        }
        this.out.push('sqrt', start);
        i = this.argument(i, to, true);
        continue;
      }
      if (name === 'operatorname' || name === 'mathrm' || name === 'text' || name === 'mathit' || name === 'textrm' || name === 'mathbf') {
        const j = this.skipSpaces(i, to);
        if (s[j] !== '{') throw new SlopewiseError('syntax', `\\${name} needs {…}`, start);
        const close = this.matchBrace(j, to);
        const inner = s.slice(j + 1, close).trim();
        let ok = inner.length > 0;
        for (const ch of inner) if (!isIdentChar(ch)) ok = false;
        if (!ok) throw new SlopewiseError('syntax', `\\${name}{…} must contain a plain name`, j + 1);
        const k = this.skipSpaces(close + 1, to);
        const called = s[k] === '(' || s[k] === '{' || (s[k] === '\\' && s.startsWith('left', k + 1));
        if (called) {
          i = this.functionCall(inner, start, close + 1, to);
        } else {
          this.space(start);
          this.out.push(inner, j + 1);
          i = close + 1;
        }
        continue;
      }
      const fn = FUNCTIONS[name];
      if (fn !== undefined) { i = this.functionCall(fn, start, i, to); continue; }
      if (name === 'sigma' || name === 'Phi') {
        const j = this.skipSpaces(i, to);
        const called = s[j] === '(' || (s[j] === '\\' && s.startsWith('left', j + 1));
        this.space(start);
        this.out.push(called ? (name === 'sigma' ? 'sigmoid' : 'normal_cdf') : name, start);
        continue;
      }
      if (GREEK.has(name) || name === 'varepsilon' || name === 'epsilon' || name === 'varphi') {
        this.space(start);
        this.out.push(name === 'varepsilon' ? 'epsilon' : name === 'varphi' ? 'phi' : name, start);
        const next = s.charAt(i);
        if (isIdentChar(next) && !(next >= '0' && next <= '9')) this.out.push(' ', start);
        continue;
      }
      const op = OPERATORS[name];
      if (op !== undefined) {
        if (op === '' ) throw new SlopewiseError('not-allowed', `\\${name} (±) has no single value`, start);
        this.out.push(op === 'pi' || op === 'Infinity' ? ` ${op} ` : op, start);
        continue;
      }
      throw new SlopewiseError('syntax', `Unsupported LaTeX command \\${name}`, start);
    }
  }
}

/** Converts the LaTeX subset to plain text with a map back into `text`. */
export function latexToPlain(text: string): { text: string; map: number[] } {
  checkNesting(text);
  return new LatexReader(text).run();
}
