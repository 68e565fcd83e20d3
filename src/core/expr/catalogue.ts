/**
 * Named activations and losses. Each entry's definition is stock mathjs text in its arguments and
 * parameters; a call such as `leaky_relu(x, 0.2)` or `F.elu(z)` expands to the definition, so the
 * canonical form only contains stock functions. Defaults: the value in the paper that introduced the
 * function where one exists, else the common default of the main libraries ("common practice").
 */
import type { FormulaRole } from '../types';

export interface CatalogueParam {
  name: string;
  /** Published or conventional default; absent = the argument is required. */
  default?: number;
  /** Where the default comes from. */
  source?: string;
}

export interface CatalogueEntry {
  name: string;
  aliases: readonly string[];
  role: Extract<FormulaRole, 'activation' | 'loss'> | 'helper';
  /** Variable arguments: ['x'] for activations, ['p', 'y'] (prediction, target) for losses. */
  args: readonly string[];
  params: readonly CatalogueParam[];
  /** Stock-mathjs definition in `args` and `params`. */
  definition: string;
  /** One line for people. */
  summary: string;
  /** Which variant this is, when several go by the same name. */
  variant?: string;
}

const COMMON = 'common practice (PyTorch/TensorFlow default)';

export const CATALOGUE: readonly CatalogueEntry[] = [
  { name: 'sigmoid', aliases: ['logistic', 'expit', 'sigm', 'sigma', 'sigma_fn', 'logistic_sigmoid'], role: 'activation', args: ['x'], params: [], definition: '1 / (1 + exp(-x))', summary: 'logistic sigmoid σ(x) = 1/(1 + e^(−x))' },
  { name: 'tanh', aliases: [], role: 'activation', args: ['x'], params: [], definition: 'tanh(x)', summary: 'hyperbolic tangent' },
  { name: 'relu', aliases: ['rectifier', 'relu_'], role: 'activation', args: ['x'], params: [], definition: 'max(x, 0)', summary: 'rectified linear unit max(x, 0)' },
  { name: 'relu6', aliases: [], role: 'activation', args: ['x'], params: [], definition: 'min(max(x, 0), 6)', summary: 'ReLU capped at 6 (Howard et al. 2017, MobileNets)' },
  { name: 'leaky_relu', aliases: ['leakyrelu', 'lrelu', 'leaky_relu_'], role: 'activation', args: ['x'], params: [{ name: 'slope', default: 0.01, source: COMMON + ': negative_slope = 0.01 (tf.nn.leaky_relu uses 0.2)' }], definition: 'x >= 0 ? x : slope * x', summary: 'leaky ReLU: x for x ≥ 0, slope·x below' },
  { name: 'elu', aliases: ['elu_'], role: 'activation', args: ['x'], params: [{ name: 'alpha', default: 1, source: 'α = 1 as in Clevert et al. 2016 (ELU paper) and ' + COMMON }], definition: 'x > 0 ? x : alpha * (exp(x) - 1)', summary: 'exponential linear unit' },
  { name: 'celu', aliases: [], role: 'activation', args: ['x'], params: [{ name: 'alpha', default: 1, source: 'α = 1, ' + COMMON }], definition: 'max(x, 0) + min(0, alpha * (exp(x / alpha) - 1))', summary: 'continuously differentiable ELU (Barron 2017)' },
  { name: 'selu', aliases: [], role: 'activation', args: ['x'], params: [], definition: '1.0507009873554805 * (x > 0 ? x : 1.6732632423543772 * (exp(x) - 1))', summary: 'scaled ELU, λ ≈ 1.0507009873554805, α ≈ 1.6732632423543772 (Klambauer et al. 2017)', variant: 'constants from Klambauer et al. 2017' },
  { name: 'gelu', aliases: ['gelu_exact', 'gelu_erf'], role: 'activation', args: ['x'], params: [], definition: '0.5 * x * (1 + erf(x / sqrt(2)))', summary: 'Gaussian error linear unit x·Φ(x) (Hendrycks & Gimpel 2016)', variant: 'exact (erf) form' },
  { name: 'gelu_tanh', aliases: ['gelu_new', 'gelu_approx', 'approx_gelu', 'gelu_pytorch_tanh', 'gelu_fast', 'fast_gelu'], role: 'activation', args: ['x'], params: [], definition: '0.5 * x * (1 + tanh(sqrt(2 / pi) * (x + 0.044715 * x ^ 3)))', summary: 'GELU, tanh approximation with √(2/π) and 0.044715 (Hendrycks & Gimpel 2016)', variant: 'tanh approximation' },
  { name: 'gelu_sigmoid', aliases: ['quick_gelu', 'quickgelu', 'gelu_quick'], role: 'activation', args: ['x'], params: [], definition: 'x / (1 + exp(-1.702 * x))', summary: 'GELU, sigmoid approximation x·σ(1.702x) (Hendrycks & Gimpel 2016)', variant: 'sigmoid approximation, 1.702' },
  { name: 'silu', aliases: ['swish', 'swish1', 'silu_'], role: 'activation', args: ['x'], params: [{ name: 'beta', default: 1, source: 'β = 1 (SiLU, Elfwing et al. 2018; Swish-1 in Ramachandran et al. 2017)' }], definition: 'x / (1 + exp(-beta * x))', summary: 'x·σ(βx)' },
  { name: 'softplus', aliases: ['soft_plus', 'smooth_relu'], role: 'activation', args: ['x'], params: [{ name: 'beta', default: 1, source: 'β = 1, ' + COMMON }], definition: 'log(1 + exp(beta * x)) / beta', summary: 'log(1 + e^(βx))/β' },
  { name: 'softsign', aliases: [], role: 'activation', args: ['x'], params: [], definition: 'x / (1 + abs(x))', summary: 'x/(1 + |x|)' },
  { name: 'mish', aliases: [], role: 'activation', args: ['x'], params: [], definition: 'x * tanh(log(1 + exp(x)))', summary: 'x·tanh(softplus(x)) (Misra 2019)' },
  { name: 'logsigmoid', aliases: ['log_sigmoid', 'loglogistic'], role: 'activation', args: ['x'], params: [], definition: '-log(1 + exp(-x))', summary: 'log σ(x) = −softplus(−x)' },
  { name: 'hardtanh', aliases: ['hard_tanh'], role: 'activation', args: ['x'], params: [{ name: 'min_val', default: -1, source: COMMON }, { name: 'max_val', default: 1, source: COMMON }], definition: 'min(max(x, min_val), max_val)', summary: 'clip(x, −1, 1)' },
  { name: 'hardsigmoid', aliases: ['hard_sigmoid'], role: 'activation', args: ['x'], params: [], definition: 'min(max(x + 3, 0), 6) / 6', summary: 'relu6(x + 3)/6', variant: 'relu6(x + 3)/6 (PyTorch, MobileNetV3); the other variant clip(0.2x + 0.5, 0, 1) is hardsigmoid_02' },
  { name: 'hardsigmoid_02', aliases: ['hard_sigmoid_02'], role: 'activation', args: ['x'], params: [], definition: 'min(max(0.2 * x + 0.5, 0), 1)', summary: 'clip(0.2x + 0.5, 0, 1)', variant: 'slope 0.2 variant (older Keras/Theano)' },
  { name: 'hardswish', aliases: ['hard_swish', 'hswish'], role: 'activation', args: ['x'], params: [], definition: 'x * min(max(x + 3, 0), 6) / 6', summary: 'x·relu6(x + 3)/6 (Howard et al. 2019, MobileNetV3)' },
  { name: 'tanhshrink', aliases: [], role: 'activation', args: ['x'], params: [], definition: 'x - tanh(x)', summary: 'x − tanh(x)' },
  { name: 'sign', aliases: ['sgn', 'signum'], role: 'activation', args: ['x'], params: [], definition: 'sign(x)', summary: 'sign function' },
  { name: 'abs', aliases: ['absolute', 'fabs'], role: 'activation', args: ['x'], params: [], definition: 'abs(x)', summary: 'absolute value' },
  { name: 'heaviside', aliases: ['step', 'unit_step', 'heaviside_step'], role: 'activation', args: ['x'], params: [{ name: 'h0', default: 0.5, source: 'H(0) = 1/2, the half-maximum convention (common practice)' }], definition: 'x > 0 ? 1 : (x < 0 ? 0 : h0)', summary: 'step function, H(0) = h0' },
  { name: 'normal_cdf', aliases: ['phi_cdf', 'norm_cdf', 'ndtr', 'normcdf'], role: 'helper', args: ['x'], params: [], definition: '0.5 * (1 + erf(x / sqrt(2)))', summary: 'standard normal CDF Φ(x)' },
  { name: 'normal_pdf', aliases: ['norm_pdf', 'normpdf'], role: 'helper', args: ['x'], params: [], definition: 'exp(-x ^ 2 / 2) / sqrt(2 * pi)', summary: 'standard normal density φ(x)' },
  // Losses: L(p, y) with p the prediction (or logit) and y the target.
  { name: 'bce', aliases: ['binary_cross_entropy', 'log_loss', 'logloss', 'binary_crossentropy'], role: 'loss', args: ['p', 'y'], params: [], definition: '-(y * log(p) + (1 - y) * log(1 - p))', summary: 'binary cross-entropy of a probability p against y' },
  { name: 'bce_logits', aliases: ['binary_cross_entropy_with_logits', 'sigmoid_cross_entropy_with_logits', 'bce_with_logits'], role: 'loss', args: ['z', 'y'], params: [], definition: 'max(z, 0) - z * y + log(1 + exp(-abs(z)))', summary: 'binary cross-entropy of σ(z), written in the stable form' },
  { name: 'mse', aliases: ['squared_error', 'mse_loss', 'square_loss'], role: 'loss', args: ['p', 'y'], params: [], definition: '(p - y) ^ 2', summary: 'squared error' },
  { name: 'mae', aliases: ['l1_loss', 'absolute_error'], role: 'loss', args: ['p', 'y'], params: [], definition: 'abs(p - y)', summary: 'absolute error' },
  { name: 'huber', aliases: ['huber_loss'], role: 'loss', args: ['p', 'y'], params: [{ name: 'delta', default: 1, source: 'δ = 1, ' + COMMON }], definition: 'abs(p - y) <= delta ? 0.5 * (p - y) ^ 2 : delta * (abs(p - y) - 0.5 * delta)', summary: 'Huber loss (Huber 1964)' },
  { name: 'smooth_l1', aliases: ['smooth_l1_loss'], role: 'loss', args: ['p', 'y'], params: [{ name: 'beta', default: 1, source: 'β = 1, ' + COMMON }], definition: 'abs(p - y) < beta ? 0.5 * (p - y) ^ 2 / beta : abs(p - y) - 0.5 * beta', summary: 'smooth L1 (Huber divided by β)' },
  { name: 'log_cosh', aliases: ['logcosh'], role: 'loss', args: ['p', 'y'], params: [], definition: 'log(cosh(p - y))', summary: 'log-cosh loss' },
  { name: 'hinge', aliases: ['hinge_loss'], role: 'loss', args: ['p', 'y'], params: [], definition: 'max(0, 1 - y * p)', summary: 'hinge loss, y ∈ {−1, 1}' },
  { name: 'squared_hinge', aliases: [], role: 'loss', args: ['p', 'y'], params: [], definition: 'max(0, 1 - y * p) ^ 2', summary: 'squared hinge loss, y ∈ {−1, 1}' },
];

const BY_NAME = new Map<string, CatalogueEntry>();
for (const e of CATALOGUE) {
  BY_NAME.set(e.name.toLowerCase(), e);
  for (const a of e.aliases) BY_NAME.set(a.toLowerCase(), e);
}

/** Finds an entry by name or alias, case-insensitively (`ReLU`, `SiLU`, `GELU`, `Sigmoid`). */
export function lookupFunction(name: string): CatalogueEntry | undefined {
  return BY_NAME.get(name.toLowerCase());
}

/** Every name and alias, for suggestions. */
export function catalogueNames(): string[] {
  return [...BY_NAME.keys()];
}
