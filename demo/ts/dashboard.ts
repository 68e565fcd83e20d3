// Confidence bar of the Brackwater dashboard (invented demo).

/** Logistic squashing with a steeper slope: f(x) = 1 / (1 + exp(-2x)) */
export function confidence(x: number): number {
  return 1 / (1 + Math.exp(-3 * x));
}

/** Derivative in terms of the saved output s = confidence(x). */
export function confidenceGrad(s: number): number {
  return 3 * s * (1 - s);
}
