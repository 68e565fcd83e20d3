/**
 * Input text → canonical Formula: bounds checked before parsing (length, nesting), notation read
 * (notation/), mathjs parse, whitelist, canonical rewrite (normalize.ts), then variable, parameters
 * and remarks. Nothing is evaluated.
 */
import type { MathNode } from 'mathjs';
import { SlopewiseError, isSlopewiseError } from '../errors';
import { LIMITS } from '../limits';
import { math } from '../math';
import type { Formula, Language, ParameterSource, ParseOptions } from '../types';
import { CATALOGUE } from './catalogue';
import { countNodes, freeSymbols, substitute, sym, tidy } from './nodes';
import { OMITTED, booleansAsNumbers, normalize } from './normalize';
import type { NormalizeContext } from './normalize';
import { mapBack } from './notation/text';
import { toCanonicalText } from './notation';
import { checkWhitelist } from './whitelist';
import type { Locator } from './whitelist';

/** Symbols that are constants, not parameters. */
export const CONSTANT_SYMBOLS = new Set(['pi', 'e', 'Infinity']);

/** Preferred variable names, in order, when the formula does not say. */
const VARIABLE_PREFERENCE = ['x', 'z', 't', 'u', 'v', 's', 'a', 'h', 'p', 'input', 'logits', 'logit', 'pre', 'y_pred', 'yhat', 'y_hat', 'pred', 'q'];

/** Bracket nesting of the raw text, checked before anything recursive runs. */
export function checkBounds(input: string, limits: { maxFormulaLength: number; maxNesting: number } = LIMITS): void {
  if (input.length > limits.maxFormulaLength) {
    throw new SlopewiseError('too-long', `Formula is ${input.length} characters long; the limit is ${limits.maxFormulaLength}`, limits.maxFormulaLength);
  }
  let depth = 0;
  for (let i = 0; i < input.length; i++) {
    const c = input.charCodeAt(i);
    if (c === 40 || c === 91 || c === 123) {
      depth++;
      if (depth > limits.maxNesting) throw new SlopewiseError('too-deep', `Brackets nested more than ${limits.maxNesting} levels deep`, i);
    } else if (c === 41 || c === 93 || c === 125) depth--;
  }
}

function mathjsParse(text: string, map: number[], inputLength: number): MathNode {
  try {
    return math.parse(text);
  } catch (e) {
    if (e instanceof RangeError) throw new SlopewiseError('too-deep', 'Formula is nested too deeply to read', undefined);
    const err = e as { message?: string; char?: number };
    const msg = (err.message ?? 'Cannot read the formula').replace(/ \(char \d+\)$/, '');
    const at = typeof err.char === 'number' ? mapBack(map, err.char - 1, inputLength) : undefined;
    throw new SlopewiseError('syntax', msg, at);
  }
}

let recognisers: { name: string; args: readonly string[]; node: MathNode }[] | null = null;

/** Catalogue activations at their defaults, for "the whole formula is softplus". */
function recognise(expression: MathNode, variable: string): string | undefined {
  if (recognisers === null) {
    recognisers = [];
    for (const e of CATALOGUE) {
      if (e.role === 'loss' || e.params.some((p) => p.default === undefined)) continue;
      try {
        const ctx: NormalizeContext = { locate: () => undefined, notes: new Set(), paramDefaults: new Map(), used: new Set(), prefixes: [] };
        const node = normalize(math.parse(`${e.name}(x)`), ctx);
        recognisers.push({ name: e.name, args: e.args, node });
      } catch {
        // An entry that cannot be expanded alone is not recognisable.
      }
    }
  }
  // The printed form of every recogniser, per variable name, built once: the checker parses every formula
  // of a file through here, and printing ~30 trees per formula was a fifth of a full check.
  let byText = recogniserTexts.get(variable);
  if (byText === undefined) {
    byText = new Map();
    for (const r of recognisers) {
      const node = variable === 'x' ? r.node : substitute(r.node, new Map([['x', sym(variable)]]));
      const text = node.toString();
      if (!byText.has(text)) byText.set(text, r.name);
    }
    if (recogniserTexts.size >= 64) recogniserTexts.clear();
    recogniserTexts.set(variable, byText);
  }
  return byText.get(expression.toString());
}
const recogniserTexts = new Map<string, Map<string, string>>();

function chooseVariable(free: string[], hint: string | undefined, given: string | undefined, params: Record<string, number>): string {
  if (given !== undefined) {
    if (!/^[A-Za-z_][A-Za-z0-9_]*$/.test(given)) throw new SlopewiseError('bad-argument', `'${given}' is not a valid variable name`);
    return given;
  }
  if (hint !== undefined && free.includes(hint)) return hint;
  const candidates = free.filter((s) => !(s in params));
  for (const v of VARIABLE_PREFERENCE) if (candidates.includes(v)) return v;
  if (candidates.length === 1) return candidates[0] as string;
  if (candidates.length === 0) return hint ?? 'x';
  throw new SlopewiseError('no-variable', `Cannot tell which symbol is the variable (${candidates.join(', ')}); name it with --var`, undefined);
}

/** Reads a formula in any supported notation into its canonical form. */
export function parseFormula(input: string, opts: ParseOptions = {}): Formula {
  checkBounds(input);
  const notation = toCanonicalText(input, opts.language);
  const locate: Locator = (name, call) => {
    const exact = notation.names.find((n) => n.name === name && n.call === call) ?? notation.names.find((n) => n.name === name);
    return exact?.at;
  };
  const parsed = mathjsParse(notation.text, notation.map, input.length);
  checkWhitelist(parsed, locate);
  if (countNodes(parsed, LIMITS.maxNodes + 1) > LIMITS.maxNodes) {
    throw new SlopewiseError('too-long', `Formula has more than ${LIMITS.maxNodes} terms and operations`, undefined);
  }
  const ctx: NormalizeContext = { locate, notes: new Set(notation.notes), paramDefaults: new Map(), used: new Set(), prefixes: notation.prefixes };
  let node: MathNode;
  try {
    node = booleansAsNumbers(tidy(normalize(parsed, ctx)));
  } catch (e) {
    if (isSlopewiseError(e) || !(e instanceof RangeError)) throw e;
    throw new SlopewiseError('too-deep', 'Formula is nested too deeply to read', undefined);
  }
  if (countNodes(node, LIMITS.maxNodes * 4 + 1) > LIMITS.maxNodes * 4) {
    throw new SlopewiseError('too-long', 'Formula is too large once named functions are expanded', undefined);
  }
  const free = freeSymbols(node).filter((s) => !CONSTANT_SYMBOLS.has(s));
  if (free.includes(OMITTED)) throw new SlopewiseError('bad-argument', 'An argument was left out where it is needed', undefined);
  const given = opts.params ?? {};
  const variable = chooseVariable(free, notation.variableHint, opts.variable, given);
  const parameters: Record<string, number> = {};
  const parameterSources: Record<string, ParameterSource> = {};
  const notes = [...ctx.notes];
  const unbound: string[] = [];
  for (const s of free) {
    if (s === variable) continue;
    const g = given[s];
    if (g !== undefined) {
      parameters[s] = g;
      parameterSources[s] = 'given';
      continue;
    }
    const d = ctx.paramDefaults.get(s);
    if (d) {
      parameters[s] = d.value;
      parameterSources[s] = 'default';
      notes.push(`${s} = ${d.value} (${d.source})`);
      continue;
    }
    unbound.push(s);
  }
  if (!free.includes(variable)) notes.push(`The formula does not depend on ${variable}`);
  const language: Language = notation.language;
  const formula: Formula = {
    input,
    expression: node.toString(),
    node,
    variable,
    language,
    parameters,
    parameterSources,
    unbound,
    notes,
  };
  const rec = recognise(node, variable);
  if (rec !== undefined) formula.recognised = rec;
  if (notation.name !== undefined) formula.name = notation.name;
  return formula;
}
