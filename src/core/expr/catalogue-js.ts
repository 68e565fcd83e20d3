/**
 * Hand-written JavaScript f, f′ and f″ of every catalogue entry: the baseline the bench compares the
 * generated code against, and an independent second derivation the tests compare the engine with.
 * Derivatives are by hand (formulas in the comments); kinks take the engine's convention (the value
 * of the branch the definition's condition selects). Losses are functions of their first argument
 * with the target `y` (and δ/β) as parameters.
 */
import { CATALOGUE } from './catalogue';

export type Params = Readonly<Record<string, number>>;

export interface CatalogueJs {
  f(x: number, p: Params): number;
  d1(x: number, p: Params): number;
  d2(x: number, p: Params): number;
}

const SQRT2 = Math.SQRT2;
const SQRT_2_OVER_PI = Math.sqrt(2 / Math.PI);
const INV_SQRT_2PI = 1 / Math.sqrt(2 * Math.PI);
/** SELU constants (Klambauer et al. 2017). */
export const SELU_LAMBDA = 1.0507009873554805;
export const SELU_ALPHA = 1.6732632423543772;
/** GELU tanh-approximation constant (Hendrycks & Gimpel 2016). */
export const GELU_TANH_C = 0.044715;
/** GELU sigmoid-approximation constant (Hendrycks & Gimpel 2016). */
export const GELU_SIGMOID_K = 1.702;

/**
 * erf(x): Maclaurin series for |x| < 3 (A&S 7.1.5), continued fraction of erfc for |x| ≥ 3
 * (A&S 7.1.14), evaluated with the modified Lentz method. ~1e-15 absolute.
 */
export function erf(x: number): number {
  if (Number.isNaN(x)) return NaN;
  const ax = Math.abs(x);
  if (ax < 3) {
    // erf x = 2/√π Σ (−1)ⁿ x^(2n+1) / (n! (2n+1))
    let term = ax;
    let sum = ax;
    const x2 = ax * ax;
    for (let n = 1; n < 200; n++) {
      term *= -x2 / n;
      const add = term / (2 * n + 1);
      sum += add;
      if (Math.abs(add) < 1e-17 * Math.abs(sum)) break;
    }
    const r = (2 / Math.sqrt(Math.PI)) * sum;
    return x < 0 ? -r : r;
  }
  return x < 0 ? -(1 - erfcLarge(ax)) : 1 - erfcLarge(ax);
}

/** erfc(x) for x ≥ 3: e^(−x²)/√π · 1/(x + 1/2/(x + 1/(x + 3/2/(x + …)))) */
function erfcLarge(x: number): number {
  const tiny = 1e-300;
  let f = x;
  let c = x;
  let d = 0;
  for (let n = 1; n < 300; n++) {
    const an = n / 2;
    d = x + an * d;
    d = d === 0 ? tiny : d;
    c = x + an / c;
    c = c === 0 ? tiny : c;
    d = 1 / d;
    const delta = c * d;
    f *= delta;
    if (Math.abs(delta - 1) < 1e-16) break;
  }
  return Math.exp(-x * x) / Math.sqrt(Math.PI) / f;
}

function sigmoid(x: number): number {
  if (x >= 0) return 1 / (1 + Math.exp(-x));
  const e = Math.exp(x);
  return e / (1 + e);
}

/** log(1 + e^x) without overflow. */
function softplus(x: number): number {
  return Math.max(x, 0) + Math.log1p(Math.exp(-Math.abs(x)));
}

const phi = (x: number): number => INV_SQRT_2PI * Math.exp(-0.5 * x * x);
const Phi = (x: number): number => 0.5 * (1 + erf(x / SQRT2));
const num = (p: Params, name: string, fallback: number): number => p[name] ?? fallback;

export const CATALOGUE_JS: Readonly<Record<string, CatalogueJs>> = {
  // σ′ = σ(1 − σ); σ″ = σ(1 − σ)(1 − 2σ)
  sigmoid: {
    f: (x) => sigmoid(x),
    d1: (x) => { const s = sigmoid(x); return s * (1 - s); },
    d2: (x) => { const s = sigmoid(x); return s * (1 - s) * (1 - 2 * s); },
  },
  // tanh′ = 1 − t²; tanh″ = −2t(1 − t²)
  tanh: {
    f: (x) => Math.tanh(x),
    d1: (x) => { const t = Math.tanh(x); return 1 - t * t; },
    d2: (x) => { const t = Math.tanh(x); return -2 * t * (1 - t * t); },
  },
  relu: { f: (x) => Math.max(x, 0), d1: (x) => (x > 0 ? 1 : 0), d2: () => 0 },
  relu6: { f: (x) => Math.min(Math.max(x, 0), 6), d1: (x) => (x > 0 && x < 6 ? 1 : 0), d2: () => 0 },
  leaky_relu: {
    f: (x, p) => (x >= 0 ? x : num(p, 'slope', 0.01) * x),
    d1: (x, p) => (x >= 0 ? 1 : num(p, 'slope', 0.01)),
    d2: () => 0,
  },
  // ELU′ = αeˣ (x ≤ 0); ELU″ = αeˣ (x ≤ 0)
  elu: {
    f: (x, p) => (x > 0 ? x : num(p, 'alpha', 1) * Math.expm1(x)),
    d1: (x, p) => (x > 0 ? 1 : num(p, 'alpha', 1) * Math.exp(x)),
    d2: (x, p) => (x > 0 ? 0 : num(p, 'alpha', 1) * Math.exp(x)),
  },
  // CELU′ = e^(x/α) (x ≤ 0); CELU″ = e^(x/α)/α
  celu: {
    f: (x, p) => { const a = num(p, 'alpha', 1); return Math.max(x, 0) + Math.min(0, a * Math.expm1(x / a)); },
    d1: (x, p) => (x > 0 ? 1 : Math.exp(x / num(p, 'alpha', 1))),
    d2: (x, p) => { const a = num(p, 'alpha', 1); return x > 0 ? 0 : Math.exp(x / a) / a; },
  },
  selu: {
    f: (x) => SELU_LAMBDA * (x > 0 ? x : SELU_ALPHA * Math.expm1(x)),
    d1: (x) => (x > 0 ? SELU_LAMBDA : SELU_LAMBDA * SELU_ALPHA * Math.exp(x)),
    d2: (x) => (x > 0 ? 0 : SELU_LAMBDA * SELU_ALPHA * Math.exp(x)),
  },
  // GELU = xΦ(x); GELU′ = Φ + xφ; GELU″ = φ(2 − x²)
  gelu: {
    f: (x) => x * Phi(x),
    d1: (x) => Phi(x) + x * phi(x),
    d2: (x) => phi(x) * (2 - x * x),
  },
  // u = c(x + 0.044715x³); f = ½x(1 + tanh u); f′ = ½(1 + t) + ½x(1 − t²)u′;
  // f″ = (1 − t²)u′ + ½x[(1 − t²)u″ − 2t(1 − t²)u′²]
  gelu_tanh: {
    f: (x) => 0.5 * x * (1 + Math.tanh(SQRT_2_OVER_PI * (x + GELU_TANH_C * x ** 3))),
    d1: (x) => {
      const t = Math.tanh(SQRT_2_OVER_PI * (x + GELU_TANH_C * x ** 3));
      const du = SQRT_2_OVER_PI * (1 + 3 * GELU_TANH_C * x * x);
      return 0.5 * (1 + t) + 0.5 * x * (1 - t * t) * du;
    },
    d2: (x) => {
      const t = Math.tanh(SQRT_2_OVER_PI * (x + GELU_TANH_C * x ** 3));
      const du = SQRT_2_OVER_PI * (1 + 3 * GELU_TANH_C * x * x);
      const ddu = SQRT_2_OVER_PI * 6 * GELU_TANH_C * x;
      const s2 = 1 - t * t;
      return s2 * du + 0.5 * x * (s2 * ddu - 2 * t * s2 * du * du);
    },
  },
  // f = xσ(kx); f′ = σ + kxσ(1 − σ); f″ = 2kσ(1 − σ) + k²xσ(1 − σ)(1 − 2σ)
  gelu_sigmoid: swishLike(() => GELU_SIGMOID_K),
  silu: swishLike((p) => num(p, 'beta', 1)),
  // softplus_β = log(1 + e^(βx))/β; ′ = σ(βx); ″ = βσ(βx)(1 − σ(βx))
  softplus: {
    f: (x, p) => { const b = num(p, 'beta', 1); return softplus(b * x) / b; },
    d1: (x, p) => sigmoid(num(p, 'beta', 1) * x),
    d2: (x, p) => { const b = num(p, 'beta', 1); const s = sigmoid(b * x); return b * s * (1 - s); },
  },
  // softsign′ = 1/(1 + |x|)²; ″ = −2 sign(x)/(1 + |x|)³
  softsign: {
    f: (x) => x / (1 + Math.abs(x)),
    d1: (x) => 1 / (1 + Math.abs(x)) ** 2,
    d2: (x) => (-2 * Math.sign(x)) / (1 + Math.abs(x)) ** 3,
  },
  // mish = x·tanh(sp); t = tanh(sp), sp′ = σ: f′ = t + x(1 − t²)σ;
  // f″ = 2(1 − t²)σ + x[(1 − t²)σ(1 − σ) − 2t(1 − t²)σ²]
  mish: {
    f: (x) => x * Math.tanh(softplus(x)),
    d1: (x) => { const t = Math.tanh(softplus(x)); return t + x * (1 - t * t) * sigmoid(x); },
    d2: (x) => {
      const t = Math.tanh(softplus(x));
      const s = sigmoid(x);
      const s2 = 1 - t * t;
      return 2 * s2 * s + x * (s2 * s * (1 - s) - 2 * t * s2 * s * s);
    },
  },
  // log σ(x) = −softplus(−x); ′ = 1 − σ(x); ″ = −σ(1 − σ)
  logsigmoid: {
    f: (x) => -softplus(-x),
    d1: (x) => sigmoid(-x),
    d2: (x) => { const s = sigmoid(x); return -s * (1 - s); },
  },
  hardtanh: {
    f: (x, p) => Math.min(Math.max(x, num(p, 'min_val', -1)), num(p, 'max_val', 1)),
    d1: (x, p) => (x > num(p, 'min_val', -1) && x < num(p, 'max_val', 1) ? 1 : 0),
    d2: () => 0,
  },
  hardsigmoid: { f: (x) => Math.min(Math.max(x + 3, 0), 6) / 6, d1: (x) => (x > -3 && x < 3 ? 1 / 6 : 0), d2: () => 0 },
  hardsigmoid_02: { f: (x) => Math.min(Math.max(0.2 * x + 0.5, 0), 1), d1: (x) => (x > -2.5 && x < 2.5 ? 0.2 : 0), d2: () => 0 },
  // hardswish = x(x + 3)/6 on (−3, 3): ′ = (2x + 3)/6, ″ = 1/3; 0 below −3; x above 3
  hardswish: {
    f: (x) => (x * Math.min(Math.max(x + 3, 0), 6)) / 6,
    d1: (x) => (x <= -3 ? 0 : x >= 3 ? 1 : (2 * x + 3) / 6),
    d2: (x) => (x <= -3 || x >= 3 ? 0 : 1 / 3),
  },
  // x − tanh x: ′ = t²; ″ = 2t(1 − t²)
  tanhshrink: {
    f: (x) => x - Math.tanh(x),
    d1: (x) => Math.tanh(x) ** 2,
    d2: (x) => { const t = Math.tanh(x); return 2 * t * (1 - t * t); },
  },
  sign: { f: (x) => Math.sign(x), d1: () => 0, d2: () => 0 },
  abs: { f: (x) => Math.abs(x), d1: (x) => Math.sign(x), d2: () => 0 },
  heaviside: { f: (x, p) => (x > 0 ? 1 : x < 0 ? 0 : num(p, 'h0', 0.5)), d1: () => 0, d2: () => 0 },
  // Φ′ = φ; Φ″ = −xφ
  normal_cdf: { f: (x) => Phi(x), d1: (x) => phi(x), d2: (x) => -x * phi(x) },
  // φ′ = −xφ; φ″ = (x² − 1)φ
  normal_pdf: { f: (x) => phi(x), d1: (x) => -x * phi(x), d2: (x) => (x * x - 1) * phi(x) },
  // BCE(p) = −(y ln p + (1 − y) ln(1 − p)); ′ = −y/p + (1 − y)/(1 − p); ″ = y/p² + (1 − y)/(1 − p)²
  bce: {
    f: (x, p) => { const y = num(p, 'y', 1); return -(y * Math.log(x) + (1 - y) * Math.log(1 - x)); },
    d1: (x, p) => { const y = num(p, 'y', 1); return -y / x + (1 - y) / (1 - x); },
    d2: (x, p) => { const y = num(p, 'y', 1); return y / (x * x) + (1 - y) / ((1 - x) * (1 - x)); },
  },
  // BCE∘σ in logits: ′ = σ(z) − y; ″ = σ(1 − σ)
  bce_logits: {
    f: (x, p) => Math.max(x, 0) - x * num(p, 'y', 1) + Math.log1p(Math.exp(-Math.abs(x))),
    d1: (x, p) => sigmoid(x) - num(p, 'y', 1),
    d2: (x) => { const s = sigmoid(x); return s * (1 - s); },
  },
  mse: { f: (x, p) => (x - num(p, 'y', 0)) ** 2, d1: (x, p) => 2 * (x - num(p, 'y', 0)), d2: () => 2 },
  mae: { f: (x, p) => Math.abs(x - num(p, 'y', 0)), d1: (x, p) => Math.sign(x - num(p, 'y', 0)), d2: () => 0 },
  huber: {
    f: (x, p) => { const d = x - num(p, 'y', 0); const k = num(p, 'delta', 1); return Math.abs(d) <= k ? 0.5 * d * d : k * (Math.abs(d) - 0.5 * k); },
    d1: (x, p) => { const d = x - num(p, 'y', 0); const k = num(p, 'delta', 1); return Math.abs(d) <= k ? d : k * Math.sign(d); },
    d2: (x, p) => (Math.abs(x - num(p, 'y', 0)) <= num(p, 'delta', 1) ? 1 : 0),
  },
  smooth_l1: {
    f: (x, p) => { const d = x - num(p, 'y', 0); const b = num(p, 'beta', 1); return Math.abs(d) < b ? (0.5 * d * d) / b : Math.abs(d) - 0.5 * b; },
    d1: (x, p) => { const d = x - num(p, 'y', 0); const b = num(p, 'beta', 1); return Math.abs(d) < b ? d / b : Math.sign(d); },
    d2: (x, p) => { const b = num(p, 'beta', 1); return Math.abs(x - num(p, 'y', 0)) < b ? 1 / b : 0; },
  },
  // log cosh d: ′ = tanh d; ″ = 1 − tanh² d
  log_cosh: {
    f: (x, p) => Math.log(Math.cosh(x - num(p, 'y', 0))),
    d1: (x, p) => Math.tanh(x - num(p, 'y', 0)),
    d2: (x, p) => 1 - Math.tanh(x - num(p, 'y', 0)) ** 2,
  },
  hinge: {
    f: (x, p) => Math.max(0, 1 - num(p, 'y', 1) * x),
    d1: (x, p) => { const y = num(p, 'y', 1); return 1 - y * x > 0 ? -y : 0; },
    d2: () => 0,
  },
  // m = max(0, 1 − yp): (m²)′ = −2ym; ″ = 2y² where m > 0
  squared_hinge: {
    f: (x, p) => Math.max(0, 1 - num(p, 'y', 1) * x) ** 2,
    d1: (x, p) => { const y = num(p, 'y', 1); return -2 * y * Math.max(0, 1 - y * x); },
    d2: (x, p) => { const y = num(p, 'y', 1); return 1 - y * x > 0 ? 2 * y * y : 0; },
  },
};

function swishLike(k: (p: Params) => number): CatalogueJs {
  return {
    f: (x, p) => x * sigmoid(k(p) * x),
    d1: (x, p) => { const b = k(p); const s = sigmoid(b * x); return s + b * x * s * (1 - s); },
    d2: (x, p) => { const b = k(p); const s = sigmoid(b * x); const ds = s * (1 - s); return 2 * b * ds + b * b * x * ds * (1 - 2 * s); },
  };
}

/** The default parameter values of an entry (for calling CATALOGUE_JS with the published defaults). */
export function defaultParams(name: string): Record<string, number> {
  const e = CATALOGUE.find((c) => c.name === name);
  const out: Record<string, number> = {};
  for (const p of e?.params ?? []) if (p.default !== undefined) out[p.name] = p.default;
  return out;
}
