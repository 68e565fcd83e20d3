/**
 * Plain data shared between the core's stages and its adapters (editor, command line).
 * Everything here is serialisable except `MathNode` fields, which stay inside the core.
 *
 * Conventions
 * - Offsets are 0-based UTF-16 code-unit offsets into the text that was given (like JS strings and
 *   `vscode.TextDocument.offsetAt`). Adapters convert; the CLI prints 1-based lines and columns.
 * - "Canonical" expressions are stock mathjs syntax: evaluable by a plain `mathjs.evaluate` with only
 *   the variable and the parameters in scope. Conditionals are written `c ? a : b`. Named
 *   activations (sigmoid, gelu, …) are expanded to their definitions in canonical form; the display
 *   form collapses them back.
 */
import type { MathNode } from 'mathjs';

export type { MathNode };

export const FLOAT_TYPES = ['float16', 'bfloat16', 'float32'] as const;
export type FloatType = (typeof FLOAT_TYPES)[number];

/** Languages the core knows dialects of. `plain` = maths notation, `latex` = the LaTeX subset. */
export const LANGUAGES = [
  'plain', 'latex', 'python', 'c', 'cpp', 'cuda', 'rust', 'go', 'julia', 'r', 'matlab', 'fortran',
  'javascript', 'typescript', 'java', 'kotlin', 'lua',
] as const;
export type Language = (typeof LANGUAGES)[number];

export interface ParseOptions {
  /** The variable to differentiate by. Default: guessed (x, z, then the only free symbol). */
  variable?: string;
  /** Dialect of the text. Default: guessed from the text. */
  language?: Language;
  /** Parameter values given by the user (`--param a=1`), by the caller (call sites) or by defaults. */
  params?: Record<string, number>;
}

export type ParameterSource = 'given' | 'default';

export interface Formula {
  /** The text as written. */
  input: string;
  /** Canonical stock-mathjs text of `node`. */
  expression: string;
  /** Canonical tree: whitelisted node types only, named activations expanded. */
  node: MathNode;
  variable: string;
  language: Language;
  /** Bound parameter values (given or published defaults). */
  parameters: Record<string, number>;
  parameterSources: Record<string, ParameterSource>;
  /** Symbols other than the variable with no value. Analyses that need numbers are skipped. */
  unbound: string[];
  /** Human-readable remarks: which default or variant was assumed, e.g. "selu: constants from Klambauer et al. 2017". */
  notes: string[];
  /** Name of a recognised catalogue function when the whole formula is one (e.g. "sigmoid"). */
  recognised?: string;
  /** Name on the formula's left-hand side, when written (`gelu_fast = …`, `def softplus(x)`). */
  name?: string;
}

export interface Derivatives {
  /** f′ canonical (stock mathjs text) and tree. */
  first: string;
  firstNode: MathNode;
  /** f″ canonical (stock mathjs text) and tree. */
  second: string;
  secondNode: MathNode;
  /** Display forms: decimals kept, named functions collapsed back (σ(x)·(1 − σ(x))). */
  firstDisplay: string;
  secondDisplay: string;
  /** Set when simplification ran out of its budget and the unsimplified result is shown. */
  simplifyNote?: string;
}

/** A half-open or closed interval on the real line; `null` = runs to −∞ (from) or +∞ (to). */
export interface Interval {
  from: number | null;
  to: number | null;
}

export interface RangeInterval extends Interval {
  kind: string;
}

/** A compiled scalar function of the variable, parameters bound. Returns NaN outside its domain. */
export type ScalarFn = (x: number) => number;

/** 0-based offsets into a document. */
export interface Span {
  start: number;
  end: number;
}

export type FormulaRole = 'activation' | 'loss' | 'derivative';
export type FormulaOrigin = 'comment' | 'code';

/** What the detector found in a source file. */
export interface FoundFormula {
  span: Span;
  /** The formula text after comment markers and code dialect are stripped (engine input). */
  text: string;
  language: Language;
  origin: FormulaOrigin;
  role: FormulaRole;
  /** Function or symbol name when recognisable (`gelu_fast`, `dsigmoid`). */
  name?: string;
  /** Variable the formula is in (the function's parameter name, or the comment's variable). */
  variable?: string;
  /** For role `derivative`: what the argument is — the forward's input, or its saved output. */
  argument?: 'input' | 'output';
  /** For role `derivative`: the name of the forward it was paired with, if any. */
  forwardName?: string;
  /** Parameter values bound from defaults, constants, call sites. */
  params?: Record<string, number>;
}

export type Severity = 'error' | 'warning' | 'info';

export const RULES = ['derivative-mismatch', 'formula-mismatch', 'unstable-form', 'vanishing-pair'] as const;
export type RuleId = (typeof RULES)[number];

export interface Finding {
  rule: RuleId;
  severity: Severity;
  span: Span;
  message: string;
  /** Canonical expected expression (what the forward implies). */
  expected?: string;
  /** Canonical expression found. */
  found?: string;
  /** Numeric evidence: largest error and where. */
  evidence?: { x: number; expectedValue: number; foundValue: number; maxError: number; tolerance: number; points: number };
  /** Where the related forward lives. */
  related?: { span: Span; message: string };
  /** A replacement that fixes it: `text` replaces `span` in the same document. */
  fix?: { title: string; span: Span; text: string };
}
