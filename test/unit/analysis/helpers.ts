/**
 * Builds a Formula and its Derivatives straight from mathjs (parse, and derivative for smooth
 * formulas; the derivative text is given for piecewise ones), so the analysis is tested on its own.
 */
import { create, derivativeDependencies } from 'mathjs/number';
import type { FactoryFunctionMap } from 'mathjs';
import { math, mathDependencies } from '../../../src/core/math';
import type { Derivatives, Formula } from '../../../src/core/types';

/** The core's mathjs instance plus mathjs's own derivative, which the core does not use. */
const withDerivative = create({ ...mathDependencies, derivativeDependencies } as unknown as FactoryFunctionMap, {});

export function formula(expression: string, opts: { variable?: string; params?: Record<string, number>; derivative?: string; recognised?: string } = {}): { formula: Formula; derivs: Derivatives } {
  const variable = opts.variable ?? 'x';
  const node = math.parse(expression);
  const firstNode = opts.derivative !== undefined ? math.parse(opts.derivative) : withDerivative.derivative(node, variable);
  const secondNode = opts.derivative !== undefined ? math.parse('0') : withDerivative.derivative(firstNode, variable);
  const f: Formula = {
    input: expression,
    expression: node.toString(),
    node,
    variable,
    language: 'plain',
    parameters: opts.params ?? {},
    parameterSources: Object.fromEntries(Object.keys(opts.params ?? {}).map((k) => [k, 'given' as const])),
    unbound: [],
    notes: [],
    ...(opts.recognised ? { recognised: opts.recognised } : {}),
  };
  const d: Derivatives = {
    first: firstNode.toString(),
    firstNode,
    second: secondNode.toString(),
    secondNode,
    firstDisplay: firstNode.toString(),
    secondDisplay: secondNode.toString(),
  };
  return { formula: f, derivs: d };
}

export const SIGMOID = '1 / (1 + exp(-x))';
export const RELU = { f: 'max(x, 0)', d: 'x > 0 ? 1 : 0' };
export const ELU = { f: 'x > 0 ? x : alpha * (exp(x) - 1)', d: 'x > 0 ? 1 : alpha * exp(x)' };
/** SELU with the constants of Klambauer et al. 2017 (λ ≈ 1.0507, α ≈ 1.67326). */
export const SELU = {
  f: 'lambda * (x > 0 ? x : alpha * (exp(x) - 1))',
  d: 'lambda * (x > 0 ? 1 : alpha * exp(x))',
  params: { lambda: 1.0507009873554804934193349852946, alpha: 1.6732632423543772848170429916717 },
};
export const SOFTSIGN = { f: 'x / (1 + abs(x))', d: '1 / (1 + abs(x)) ^ 2' };
export const HARDTANH = { f: 'max(-1, min(1, x))', d: 'x > -1 and x < 1 ? 1 : 0' };
export const SOFTPLUS = 'log(1 + exp(x))';
export const GELU_TANH = '0.5 * x * (1 + tanh(sqrt(2 / pi) * (x + 0.044715 * x ^ 3)))';
export const SWISH = 'x / (1 + exp(-x))';
