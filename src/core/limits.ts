/**
 * Bounds on all work the core does on user text. Every stage checks the limit that applies to it
 * before doing the work, and says what it skipped and why. Adapters may lower (never raise) these
 * from settings or flags.
 */
export const LIMITS = {
  /** Characters in one formula given to the engine. */
  maxFormulaLength: 2_000,
  /** Bracket / call nesting depth of one formula (mathjs's own parser overflows near ~310). */
  maxNesting: 48,
  /** Nodes in a parsed tree before differentiation. */
  maxNodes: 600,
  /** Nodes in a derivative tree before simplification is skipped outright. */
  maxSimplifyNodes: 400,
  /** Wall-clock budget of one simplification (ms); beyond it the unsimplified form is used. */
  simplifyBudgetMs: 250,
  /** Time budget (ms) for polishing one derivative display (display only; over budget → as derived). */
  displayPolishBudgetMs: 120,
  /** Wall-clock budget for everything the engine and analysis do for one formula (ms). */
  formulaBudgetMs: 2_000,
  /** Bytes of one file the detector reads; larger files are skipped with a note. */
  maxFileBytes: 2_000_000,
  /** Characters of one line the detector looks at; longer lines are skipped. */
  maxLineLength: 4_000,
  /** Formulas reported per file. */
  maxFormulasPerFile: 500,
  /** Wall-clock budget for checking one file (ms). */
  fileBudgetMs: 20_000,
} as const;

export type Limits = { -readonly [K in keyof typeof LIMITS]: number };
