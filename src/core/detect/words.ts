/**
 * Vocabulary the detector uses to tell formulas from prose and to give formulas roles and names.
 * Plain sets, looked up in O(1); no pattern here is a regular expression over user text.
 */

/** Function names and namespaces that may appear in a formula (any dialect). */
export const MATH_WORDS = new Set([
  'exp', 'log', 'ln', 'log1p', 'expm1', 'log2', 'log10', 'sqrt', 'cbrt', 'abs', 'fabs', 'sign', 'sgn', 'max', 'min',
  'tanh', 'sinh', 'cosh', 'sech', 'sin', 'cos', 'tan', 'atan', 'arctan', 'asinh', 'erf', 'erfc', 'pow', 'clip', 'clamp',
  'where', 'maximum', 'minimum', 'heaviside', 'sigmoid', 'logistic', 'relu', 'relu6', 'leaky_relu', 'leakyrelu',
  'elu', 'selu', 'celu', 'gelu', 'silu', 'swish', 'softplus', 'softsign', 'mish', 'logsigmoid', 'log_sigmoid',
  'hardtanh', 'hard_tanh', 'hardsigmoid', 'hard_sigmoid', 'hardswish', 'hard_swish', 'softmax', 'log_softmax',
  'expit', 'mean', 'sum', 'ifelse', 'pmax', 'pmin', 'merge', 'fmax', 'fmin', 'fmaxf', 'fminf', 'expf', 'logf',
  'tanhf', 'sqrtf', 'erff', 'log1pf', 'expm1f', 'fabsf', 'powf', 'np', 'numpy', 'torch', 'math', 'jnp', 'jax', 'nn',
  'tf', 'std', 'Math', 'kotlin', 'special', 'scipy', 'cmath', 'mathf', 'if', 'else', 'otherwise', 'and', 'or', 'not',
  'for', 'when', 'pi', 'frac', 'cdot', 'times', 'left', 'right', 'operatorname', 'text', 'mathrm', 'begin', 'end',
  'cases', 'sigma', 'alpha', 'beta', 'gamma', 'lambda', 'lam', 'theta', 'tau', 'kappa', 'delta', 'epsilon', 'eps',
  'slope', 'negative_slope', 'scale', 'phi', 'Phi', 'inf', 'Inf', 'float', 'double', 'real', 'where_', 'dx', 'dy',
  'dz', 'grad', 'huber', 'mse', 'bce', 'nll', 'loss', 'pred', 'target', 'label', 'logits', 'prob', 'input', 'output',
  'out', 'yhat', 'y_hat', 'elsewhere', 'exp2', 'square', 'tf', 'sigm', 'sig', 'ymax', 'threshold', 'limit', 'cutoff',
  'mu', 'rho', 'nu', 'omega', 'zeta', 'xi', 'chi', 'psi', 'eta',
]);

/** Words that separate pieces of a piecewise definition. */
export const PIECE_WORDS = new Set(['if', 'for', 'when', 'otherwise', 'else', 'elsewhere']);

/** Names that denote the saved output of an activation when a derivative takes them as its argument. */
export const OUTPUT_NAMES = new Set([
  'y', 'out', 'output', 'outputs', 's', 'sig', 'sigm', 'sigma', 'σ', 'a', 'act', 'activation', 'activated', 'fx',
  'f_x', 'res', 'result', 'h', 'th', 'tanh_out', 'sig_out', 'sigmoid_out', 'sigmoid_output', 'tanh_output', 'y_out',
  'saved_output', 'fwd_out', 'forward_out', 'o', 'act_out', 'activations',
]);

/** Parameter names of an upstream gradient a backward pass multiplies by. */
export const UPSTREAM_NAMES = new Set([
  'grad', 'grads', 'grad_output', 'grad_out', 'gradout', 'grad_outputs', 'g', 'gy', 'dy', 'dout', 'd_out', 'upstream',
  'upstream_grad', 'delta', 'dl_dy', 'dldy', 'dL_dy', 'dLdy', 'top_diff', 'dY', 'gradient', 'incoming', 'grad_y',
  'grad_in', 'ddy', 'cotangent', 'ct', 'g_out', 'gout', 'dz_up', 'grad_up', 'dLdout', 'dL_dout', 'output_grad',
  'out_grad', 'gradOutput', 'gradOut', 'dOut', 'dy_',
]);

/** Names that mark a loss. */
export const LOSS_WORDS = [
  'loss', 'mse', 'mae', 'bce', 'nll', 'crossentropy', 'cross_entropy', 'xent', 'huber', 'hinge', 'logcosh',
  'log_cosh', 'kl', 'focal', 'l1', 'l2', 'cost', 'smooth_l1', 'squared_error', 'sqerr', 'error',
];

/** Symbols that name a loss in maths (`L(p, y) = …`, `ℓ = …`, `J = …`). */
export const LOSS_SYMBOLS = new Set(['L', 'ℓ', 'J', 'E', 'loss', 'Loss']);

/** Target names of a loss (the second argument, not the variable). */
export const TARGET_NAMES = new Set([
  'y', 't', 'target', 'targets', 'label', 'labels', 'y_true', 'ytrue', 'truth', 'gt', 'expected', 'actual',
  'y_target', 'yt', 'tgt', 'true', 'lbl',
]);

/** Index-like names: arithmetic made only of these is index arithmetic, not a formula. */
export const INDEX_NAMES = new Set([
  'i', 'j', 'k', 'n', 'm', 'idx', 'index', 'len', 'length', 'size', 'N', 'M', 'T', 'B', 'C', 'H', 'W',
  'D', 'K', 'count', 'offset', 'stride', 'dim', 'num', 'batch', 'pos', 'start', 'stop', 'begin', 'end', 'row',
  'col', 'tid', 'gid', 'ix', 'iy', 'jj', 'ii', 'kk', 'nx', 'ny', 'lo', 'hi', 'mid', 'step', 'width', 'height',
]);

/** Common variable names of ML code, accepted in formulas though they are words. */
export const VARIABLE_WORDS = new Set([
  'pred', 'preds', 'prediction', 'predictions', 'target', 'targets', 'label', 'labels', 'logits', 'logit', 'prob',
  'probs', 'input', 'inputs', 'output', 'outputs', 'out', 'weight', 'weights', 'bias', 'grad', 'diff', 'err',
  'error', 'residual', 'score', 'scores', 'act', 'alpha', 'beta', 'gamma', 'lambda', 'slope', 'scale', 'eps',
  'epsilon', 'delta', 'margin', 'temperature', 'temp', 'theta', 'sigma', 'tau', 'kappa', 'mu',
]);
