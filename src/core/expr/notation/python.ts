/**
 * Python and its array libraries: `a if c else b` → `(c) ? (a) : (b)`; keyword arguments
 * (`clamp(x, min=0)`, `leaky_relu(x, negative_slope=0.2)`, `gelu(x, approximate='tanh')`) mapped to
 * positions; `lambda x:` and `def f(x): return` heads.
 */
import { SlopewiseError } from '../../errors';
import type { Group, Item } from './tree';
import type { Token } from './lexer';
import { firstStart, isGroup, isId, isOp, isParenGroup, joinCommas, paren, splitCommas, synth } from './tree';

/** A braced block used as a value (Rust/Kotlin `if` arms) → a bracketed group. */
function asValue(items: Item[]): Item[] {
  if (items.length === 1 && isGroup(items[0]) && items[0].open.text === '{') return [paren((items[0] as Group).items, (items[0] as Group).open.start)];
  return items;
}

/**
 * Prefix conditionals: Kotlin/Scala `if (C) A else B`, Rust `if C { A } else { B }`, chained with
 * `else if`. Both become `(C) ? (A) : (B)`.
 */
function prefixIf(items: Item[]): Item[] {
  const ifTok = items[0] as Token;
  let k = 1;
  let cond: Item[];
  let a: Item[];
  const elseAt = items.findIndex((it, j) => j > 1 && isId(it, 'else'));
  if (elseAt < 0) throw new SlopewiseError('syntax', "'if' without 'else'", ifTok.start);
  const braceAt = items.findIndex((it, j) => j > 1 && j < elseAt && isGroup(it) && it.open.text === '{');
  if (braceAt > 0) {
    cond = items.slice(1, braceAt);
    a = asValue(items.slice(braceAt, elseAt));
  } else {
    if (!isParenGroup(items[k])) throw new SlopewiseError('syntax', "'if' needs (condition) or a { } block", ifTok.start);
    cond = [items[k] as Item];
    k++;
    a = items.slice(k, elseAt);
  }
  const rest = items.slice(elseAt + 1);
  const b = isId(rest[0], 'if') ? prefixIf(rest) : asValue(rest);
  if (cond.length === 0 || a.length === 0 || b.length === 0) throw new SlopewiseError('syntax', "Incomplete 'if … else …'", ifTok.start);
  const at = (items[elseAt] as Token).start;
  return [paren(cond, ifTok.start), synth('op', '?', ifTok.start), paren(a, ifTok.start), synth('op', ':', at), paren(b, at)];
}

/** `A if C else B` at one comma-separated level (right-associative, lowest precedence). */
export function pythonTernary(items: Item[]): Item[] {
  const parts = splitCommas(items);
  if (parts.length > 1) return joinCommas(parts.map((p) => pythonTernary(p)), firstStart(items[0] as Item));
  const ifAt = items.findIndex((it) => isId(it, 'if'));
  if (ifAt < 0) return items;
  if (ifAt === 0) return prefixIf(items);
  const elseAt = items.findIndex((it, k) => k > ifAt && isId(it, 'else'));
  const ifTok = items[ifAt] as Token;
  if (ifAt === 0) throw new SlopewiseError('syntax', "Nothing before 'if'", ifTok.start);
  if (elseAt < 0) throw new SlopewiseError('syntax', "'if' without 'else'", ifTok.start);
  const a = items.slice(0, ifAt);
  const c = items.slice(ifAt + 1, elseAt);
  const b = pythonTernary(items.slice(elseAt + 1));
  if (c.length === 0 || b.length === 0) throw new SlopewiseError('syntax', "Incomplete 'a if c else b'", ifTok.start);
  const elseTok = items[elseAt] as Token;
  return [paren(c, ifTok.start), synth('op', '?', ifTok.start), paren(a, firstStart(a[0] as Item)), synth('op', ':', elseTok.start), paren(b, elseTok.start)];
}

/** Positional parameter names by function (after alias resolution the names are canonical). */
const KEYWORDS: Readonly<Record<string, readonly (readonly string[])[]>> = {
  clamp: [['input', 'x', 'a'], ['min', 'a_min', 'lower', 'clip_value_min', 'lo'], ['max', 'a_max', 'upper', 'clip_value_max', 'hi']],
  clip: [['input', 'x', 'a'], ['min', 'a_min', 'lower', 'clip_value_min', 'lo'], ['max', 'a_max', 'upper', 'clip_value_max', 'hi']],
  clip_by_value: [['t', 'x'], ['clip_value_min'], ['clip_value_max']],
  leaky_relu: [['input', 'x', 'features'], ['negative_slope', 'alpha', 'slope', 'a']],
  elu: [['input', 'x', 'features'], ['alpha']],
  celu: [['input', 'x'], ['alpha']],
  selu: [['input', 'x', 'features']],
  softplus: [['input', 'x', 'features'], ['beta'], ['threshold']],
  silu: [['input', 'x', 'features'], ['beta']],
  swish: [['input', 'x', 'features'], ['beta']],
  hardtanh: [['input', 'x'], ['min_val', 'min'], ['max_val', 'max']],
  heaviside: [['input', 'x', 'x1'], ['values', 'x2']],
  gelu: [['input', 'x', 'features'], ['approximate']],
  relu: [['input', 'x', 'features']], relu6: [['input', 'x', 'features']], sigmoid: [['input', 'x']],
  tanh: [['input', 'x']], exp: [['input', 'x']], log: [['input', 'x']], log1p: [['input', 'x']],
  expm1: [['input', 'x']], erf: [['input', 'x']], abs: [['input', 'x']], sqrt: [['input', 'x']],
  where: [['condition'], ['input', 'x'], ['other', 'y']],
  maximum: [['input', 'x1', 'x'], ['other', 'x2', 'y']], minimum: [['input', 'x1', 'x'], ['other', 'x2', 'y']],
  pow: [['input', 'x1', 'x'], ['exponent', 'x2', 'y']],
  huber: [['input', 'p'], ['target', 'y'], ['delta']],
  smooth_l1: [['input', 'p'], ['target', 'y'], ['beta']],
};

/** Keywords that change nothing about the mathematics and are dropped. */
const IGNORED = new Set(['inplace', 'out', 'name', 'dtype', 'dim', 'axis', 'keepdim', 'where_', 'reduction']);

export const OMITTED = '__omitted';

/**
 * Maps keyword arguments of a call `name(group)` to positions. Missing slots before a given one are
 * filled with the marker symbol `__omitted` (catalogue defaults replace it later). `approximate`
 * selects the GELU variant; `threshold` of softplus is PyTorch's switch to the identity for large
 * inputs and is noted, not modelled.
 */
export function keywordArguments(items: Item[], notes: Set<string>): Item[] {
  const out: Item[] = [];
  for (let i = 0; i < items.length; i++) {
    const it = items[i] as Item;
    const args = items[i + 1];
    if (!isId(it) || !isParenGroup(args)) { out.push(it); continue; }
    const parts = splitCommas(args.items);
    const hasKeyword = parts.some((p) => isId(p[0]) && isOp(p[1], '=') && p.length >= 3);
    if (!hasKeyword) { out.push(it); continue; }
    let name = it.text;
    const slots = KEYWORDS[name];
    if (slots === undefined) {
      const kw = parts.find((p) => isId(p[0]) && isOp(p[1], '='))?.[0] as Token;
      throw new SlopewiseError('bad-argument', `Keyword argument '${kw.text}' of ${name}() is not understood`, kw.start);
    }
    const positional: (Item[] | null)[] = [];
    let seenKeyword = false;
    for (const p of parts) {
      if (isId(p[0]) && isOp(p[1], '=') && p.length >= 3) {
        seenKeyword = true;
        const kw = p[0];
        const value = p.slice(2);
        if (IGNORED.has(kw.text)) { notes.add(`Ignored the keyword argument ${kw.text}= of ${name}()`); continue; }
        if (name === 'gelu' && kw.text === 'approximate') {
          const v = value[0] as Token;
          const word = v.kind === 'str' || v.kind === 'id' ? v.text : '';
          const tanh = word === 'tanh' || word === 'True' || word === 'true';
          const none = word === 'none' || word === 'False' || word === 'false';
          if (value.length !== 1 || (!tanh && !none)) throw new SlopewiseError('bad-argument', "gelu(approximate=…) must be 'tanh', 'none', True or False", kw.start);
          name = tanh ? 'gelu_tanh' : 'gelu_exact';
          continue;
        }
        if (name === 'softplus' && kw.text === 'threshold') {
          notes.add('softplus threshold= (switch to the identity for large inputs) is not modelled; the smooth formula is used');
          continue;
        }
        const slot = slots.findIndex((names) => names.includes(kw.text));
        if (slot < 0) throw new SlopewiseError('bad-argument', `${name}() has no keyword argument '${kw.text}'`, kw.start);
        if (positional[slot]) throw new SlopewiseError('bad-argument', `${name}() got '${kw.text}' twice`, kw.start);
        positional[slot] = value;
      } else {
        if (seenKeyword) throw new SlopewiseError('syntax', 'Positional argument after a keyword argument', firstStart(p[0] as Item));
        positional.push(p);
      }
    }
    while (positional.length > 0 && positional[positional.length - 1] == null) positional.pop();
    const filled: Item[][] = [];
    for (let k = 0; k < positional.length; k++) filled.push(positional[k] ?? [synth('id', OMITTED, args.open.start)]);
    out.push({ ...it, text: name }, { ...args, items: joinCommas(filled, args.open.start) });
    i++;
  }
  return out;
}

/** `lambda x: body`, `def f(x): return body` → variable hint + body. */
export function pythonHead(tokens: Token[]): { tokens: Token[]; variable?: string } {
  if (tokens[0]?.text === 'lambda' && tokens[1]?.kind === 'id') {
    const colon = tokens.findIndex((t) => t.text === ':');
    if (colon > 0) return { tokens: tokens.slice(colon + 1), variable: tokens[1].text };
  }
  if (tokens[0]?.text === 'def' && tokens[1]?.kind === 'id' && tokens[2]?.text === '(') {
    const variable = tokens[3]?.kind === 'id' ? tokens[3].text : undefined;
    // The body starts after the first ':' at depth 0 following the parameter list.
    let depth = 0;
    for (let k = 2; k < tokens.length; k++) {
      const t = tokens[k] as Token;
      if (t.text === '(' || t.text === '[') depth++;
      else if (t.text === ')' || t.text === ']') depth--;
      else if (t.text === ':' && depth === 0) {
        let body = tokens.slice(k + 1);
        if (body[0]?.text === 'return') body = body.slice(1);
        return variable === undefined ? { tokens: body } : { tokens: body, variable };
      }
    }
  }
  return { tokens };
}

