/**
 * The one mathjs instance the whole core uses.
 *
 * Built with `create` from `mathjs/number` (plain JS numbers, no BigNumber/Complex), which keeps the
 * host bundle small and makes `log(-1)` NaN like `Math.log` instead of a Complex value. Only the
 * functions the canonical form needs, plus what parse/simplify depend on internally. No `derivative`:
 * the core differentiates with its own rules (src/core/expr/differentiate.ts).
 *
 * Nothing here ever evaluates user text: the core parses with `math.parse`, checks the tree against
 * a whitelist (see `whitelist.ts`) and compiles only trees it generated or checked.
 */
import {
  create,
  parseDependencies,
  simplifyDependencies,
  simplifyCoreDependencies,
  simplifyConstantDependencies,
  addDependencies,
  subtractDependencies,
  multiplyDependencies,
  divideDependencies,
  powDependencies,
  unaryMinusDependencies,
  unaryPlusDependencies,
  expDependencies,
  logDependencies,
  log1pDependencies,
  expm1Dependencies,
  sqrtDependencies,
  cbrtDependencies,
  absDependencies,
  signDependencies,
  sinDependencies,
  cosDependencies,
  tanDependencies,
  sinhDependencies,
  coshDependencies,
  tanhDependencies,
  sechDependencies,
  asinhDependencies,
  atanDependencies,
  erfDependencies,
  maxDependencies,
  minDependencies,
  smallerDependencies,
  smallerEqDependencies,
  largerDependencies,
  largerEqDependencies,
  equalDependencies,
  unequalDependencies,
  andDependencies,
  orDependencies,
  notDependencies,
  modDependencies,
  piDependencies,
  eDependencies,
} from 'mathjs/number';
import type { FactoryFunctionMap } from 'mathjs';

/**
 * Functions only mathjs's own evaluation of trees (`node.evaluate`, `node.compile`) calls: the tests,
 * the bench and the CLI evaluate with them. The core never does (it compiles checked trees itself,
 * compile.ts), and simplify never evaluates a function either: it sees layers of operators only
 * (simplify.ts abstracts every call). The extension-host bundles, which trim mathjs's evaluation
 * (scripts/lib/host-mathjs.mjs), define SLOPEWISE_HOST_BUNDLE and so leave these out.
 */
declare const SLOPEWISE_HOST_BUNDLE: boolean | undefined;
const evaluationOnly = typeof SLOPEWISE_HOST_BUNDLE !== 'undefined' && SLOPEWISE_HOST_BUNDLE ? {} : {
  expDependencies,
  logDependencies,
  log1pDependencies,
  expm1Dependencies,
  sqrtDependencies,
  cbrtDependencies,
  absDependencies,
  signDependencies,
  sinDependencies,
  cosDependencies,
  tanDependencies,
  sinhDependencies,
  coshDependencies,
  tanhDependencies,
  sechDependencies,
  asinhDependencies,
  atanDependencies,
  maxDependencies,
  minDependencies,
  modDependencies,
  piDependencies,
  eDependencies,
};

/**
 * The factories of `math`, also for tests that need an instance like it with more (mathjs's
 * derivative, as an outside reference). The mathjs typings declare every `*Dependencies` export as
 * possibly undefined; they are all present in mathjs/number, hence the cast.
 */
export const mathDependencies = {
  ...evaluationOnly,
  parseDependencies,
  simplifyDependencies,
  simplifyCoreDependencies,
  simplifyConstantDependencies,
  addDependencies,
  subtractDependencies,
  multiplyDependencies,
  divideDependencies,
  powDependencies,
  unaryMinusDependencies,
  unaryPlusDependencies,
  erfDependencies, // compile.ts calls mathjs's erf implementation
  smallerDependencies,
  smallerEqDependencies,
  largerDependencies,
  largerEqDependencies,
  equalDependencies,
  unequalDependencies,
  andDependencies,
  orDependencies,
  notDependencies,
  // No `evaluate`: the core never evaluates text. Tests that check our output is stock-mathjs
  // evaluable use the full `mathjs` package; trees are evaluated with `node.evaluate` or compile.ts.
} as unknown as FactoryFunctionMap;

export const math = create(mathDependencies, {});
