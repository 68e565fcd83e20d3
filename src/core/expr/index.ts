/**
 * The expression engine: notation → canonical mathjs tree → exact f′ and f″ → display forms.
 * Pipeline: parse.ts (bounds, notation/, mathjs parse, whitelist.ts, normalize.ts + catalogue.ts)
 * → differentiate.ts (own rules + mathjs chain rule) → simplify.ts (budgeted) → display.ts.
 */
export { parseFormula, checkBounds, CONSTANT_SYMBOLS } from './parse';
export { differentiate, differentiateMarked, liftConditionals } from './differentiate';
export { simplifyWithinBudget, measureSimplifyWorstCase, lightClean } from './simplify';
export type { SimplifyResult } from './simplify';
export { derive } from './derive';
export type { DeriveOptions } from './derive';
export { displayForm, latexForm, formatNumber } from './display';
export type { DisplayOptions } from './display';
export { CATALOGUE, lookupFunction, catalogueNames } from './catalogue';
export type { CatalogueEntry, CatalogueParam } from './catalogue';
export { toCanonicalText, guessLanguage } from './notation';
export type { NotationResult } from './notation';
export { mark, unmark } from './markers';
// Bench- and test-only modules (hand-written reference functions, adversarial inputs) are not
// re-exported here, so they stay out of the extension bundles: import them by path,
// './catalogue-js' and './adversarial'.
