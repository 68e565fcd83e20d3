/**
 * Vector functions: softmax and log-softmax, their Jacobians and vector–Jacobian products (what a
 * backward pass computes), as documented expressions and as plain functions, each checked against
 * central differences of the definition.
 *
 * p = softmax(x):       p_i = exp(x_i − m) / Σ_j exp(x_j − m),  m = max_j x_j (shift: no overflow)
 *   Jacobian            ∂p_i/∂x_j = p_i (δ_ij − p_j)            (J = diag(p) − p pᵀ)
 *   VJP                 (gᵀJ)_j = p_j (g_j − Σ_i g_i p_i)
 * log-softmax(x):       ℓ_i = x_i − m − log Σ_j exp(x_j − m)
 *   Jacobian            ∂ℓ_i/∂x_j = δ_ij − p_j                  (J = I − 1 pᵀ)
 *   VJP                 (gᵀJ)_j = g_j − p_j Σ_i g_i
 * With cross-entropy L = −Σ y_i log p_i and Σ y_i = 1, ∂L/∂x = p − y.
 */

export type VectorName = 'softmax' | 'log-softmax';

export interface VectorForms {
  name: VectorName;
  definition: string;
  stable: string;
  jacobian: string;
  vjp: string;
  /** Largest |analytic − central difference| over the checked points (Jacobian entries and VJPs). */
  check: { jacobianMaxError: number; vjpMaxError: number; points: number };
}

export function softmax(x: readonly number[]): number[] {
  const m = Math.max(...x);
  const e = x.map((v) => Math.exp(v - m));
  const s = e.reduce((a, b) => a + b, 0);
  return e.map((v) => v / s);
}

export function logSoftmax(x: readonly number[]): number[] {
  const m = Math.max(...x);
  const lse = m + Math.log(x.reduce((a, v) => a + Math.exp(v - m), 0));
  return x.map((v) => v - lse);
}

export function softmaxJacobian(x: readonly number[]): number[][] {
  const p = softmax(x);
  return p.map((pi, i) => p.map((pj, j) => pi * ((i === j ? 1 : 0) - pj)));
}

export function logSoftmaxJacobian(x: readonly number[]): number[][] {
  const p = softmax(x);
  return p.map((_, i) => p.map((pj, j) => (i === j ? 1 : 0) - pj));
}

export function softmaxVjp(x: readonly number[], g: readonly number[]): number[] {
  const p = softmax(x);
  const dot = p.reduce((s, pi, i) => s + pi * (g[i] as number), 0);
  return p.map((pj, j) => pj * ((g[j] as number) - dot));
}

export function logSoftmaxVjp(x: readonly number[], g: readonly number[]): number[] {
  const p = softmax(x);
  const sum = g.reduce((a, b) => a + b, 0);
  return p.map((pj, j) => (g[j] as number) - pj * sum);
}

/** ∂/∂x of −Σ y_i log softmax(x)_i: p − y (Σ y = 1). */
export function crossEntropyGradient(x: readonly number[], y: readonly number[]): number[] {
  return softmax(x).map((pi, i) => pi - (y[i] as number));
}

/** Numerical Jacobian of a vector function by central differences. */
export function numericJacobian(fn: (x: number[]) => number[], x: readonly number[], h = 6e-6): number[][] {
  const n = x.length;
  const cols: number[][] = [];
  for (let j = 0; j < n; j++) {
    const xp = x.slice();
    const xm = x.slice();
    // step ∝ ∛(ε·|x|) balances truncation against rounding (x − lse cancels for large logits)
    const step = h * Math.cbrt(Math.max(1, Math.abs(x[j] as number)));
    xp[j] = (xp[j] as number) + step;
    xm[j] = (xm[j] as number) - step;
    const fp = fn(xp);
    const fm = fn(xm);
    // divide by the step actually taken (x ± step is rounded)
    const width = (xp[j] as number) - (xm[j] as number);
    cols.push(fp.map((v, i) => (v - (fm[i] as number)) / width));
  }
  // cols[j][i] = ∂f_i/∂x_j → J[i][j]
  return x.map((_, i) => cols.map((c) => c[i] as number));
}

/** Deterministic points for the checks. */
function points(): Array<{ x: number[]; g: number[] }> {
  let s = 12345;
  const r = (): number => {
    s = (s * 1103515245 + 12345) % 2147483648;
    return s / 2147483648;
  };
  const out: Array<{ x: number[]; g: number[] }> = [];
  for (let n = 2; n <= 6; n++) {
    for (let k = 0; k < 4; k++) {
      out.push({ x: Array.from({ length: n }, () => (r() - 0.5) * 8), g: Array.from({ length: n }, () => r() - 0.5) });
    }
  }
  // Large logits: the shifted forms must not overflow.
  out.push({ x: [1000, 999, 990], g: [0.3, -0.2, 0.5] });
  return out;
}

export function vectorForms(name: VectorName): VectorForms {
  const fn = name === 'softmax' ? softmax : logSoftmax;
  const jac = name === 'softmax' ? softmaxJacobian : logSoftmaxJacobian;
  const vjp = name === 'softmax' ? softmaxVjp : logSoftmaxVjp;
  let jErr = 0;
  let vErr = 0;
  const pts = points();
  for (const { x, g } of pts) {
    const J = jac(x);
    const N = numericJacobian(fn, x);
    J.forEach((row, i) => row.forEach((v, j) => (jErr = Math.max(jErr, Math.abs(v - ((N[i] as number[])[j] as number))))));
    const v = vjp(x, g);
    // gᵀJ from the numerical Jacobian
    const ref = x.map((_, j) => N.reduce((s, row, i) => s + (g[i] as number) * (row[j] as number), 0));
    v.forEach((val, j) => (vErr = Math.max(vErr, Math.abs(val - (ref[j] as number)))));
  }
  const check = { jacobianMaxError: jErr, vjpMaxError: vErr, points: pts.length };
  if (name === 'softmax') {
    return {
      name,
      definition: 'p_i = exp(x_i) / sum_j exp(x_j)',
      stable: 'p_i = exp(x_i - m) / sum_j exp(x_j - m), m = max_j x_j',
      jacobian: 'J_ij = p_i * (delta_ij - p_j)  (J = diag(p) - p p^T)',
      vjp: 'v_j = p_j * (g_j - sum_i g_i p_i)',
      check,
    };
  }
  return {
    name,
    definition: 'l_i = x_i - log(sum_j exp(x_j))',
    stable: 'l_i = x_i - m - log(sum_j exp(x_j - m)), m = max_j x_j',
    jacobian: 'J_ij = delta_ij - p_j  (J = I - 1 p^T, p = softmax(x))',
    vjp: 'v_j = g_j - p_j * sum_i g_i',
    check,
  };
}
