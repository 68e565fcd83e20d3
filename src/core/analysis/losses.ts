/**
 * Losses composed with an activation: for L(p, y) with p = f(z), the gradient dL/dz = L_p(f(z), y)·f′(z),
 * simplified by computation into a form in p and y when one exists (σ with binary cross-entropy:
 * p − y), and a warning when the pairing starves the gradient where the loss is large (σ with squared
 * error: dL/dz = 2(p − y)·p(1 − p) → 0 as p → 0 for target 1).
 *
 * Loss definitions (common practice), in stock mathjs with prediction p and target y:
 *   binary-cross-entropy  −(y·log(p) + (1 − y)·log(1 − p))   L_p = (p − y) / (p·(1 − p))
 *   squared-error         (p − y)^2                           L_p = 2·(p − y)
 *   absolute-error        abs(p − y)                          L_p = sign(p − y)
 *   huber (δ = 1)         |p − y| ≤ 1 ? (p − y)²/2 : |p − y| − 1/2
 *   cross-entropy         −Σ y_i log p_i with p = softmax(z)  (vector; ∂L/∂z = p − y, see vector.ts)
 *
 * Simplification: dL/dz is sampled on z ∈ [−8, 8] and targets spread over the activation's range;
 * the forms tried are (p − y)·q(p) with q a polynomial of degree ≤ 2, then polynomials in p of
 * degree ≤ 3 times (1, y); coefficients snapped to small rationals, and accepted only if they
 * reproduce every sample to 1e-9 relative to the largest value.
 * Starvation: for each target at an end of the activation's range, z ∈ [−30, 30] (step 0.01) is
 * scanned for points where the loss is at least its value at the range's midpoint (the prediction
 * is on the wrong side) while |dL/dz| is below 1% of its largest value for that target.
 */
import type { MathNode } from 'mathjs';
import { compileMulti, compileScalar } from '../expr/compile';
import { math } from '../math';
import { differentiate } from '../expr/differentiate';
import { lookupFunction } from '../expr/catalogue';
import type { Derivatives, Formula } from '../types';
import { SlopewiseError } from '../errors';
import { bisectBoundary, goldenMax, leastSquares, tidy } from './numeric';
import { polynomialText } from './outputForm';
import { substitute } from './tree';
import { crossEntropyGradient, softmax } from './vector';
import { range, monotonicity } from './shape';
import { prepare } from './prepare';

export interface LossDefinition {
  name: string;
  aliases: readonly string[];
  /** L(p, y), stock mathjs. */
  expression: string;
  /** ∂L/∂p, stock mathjs. */
  gradient: string;
}

export const LOSSES: readonly LossDefinition[] = [
  {
    name: 'binary-cross-entropy',
    aliases: ['bce', 'binary_cross_entropy', 'log-loss', 'log_loss', 'logistic-loss', 'binary_crossentropy'],
    expression: '-(y * log(p) + (1 - y) * log(1 - p))',
    gradient: '(p - y) / (p * (1 - p))',
  },
  {
    name: 'squared-error',
    aliases: ['mse', 'l2', 'squared_error', 'mean_squared_error', 'mse_loss'],
    expression: '(p - y) ^ 2',
    gradient: '2 * (p - y)',
  },
  {
    name: 'absolute-error',
    aliases: ['mae', 'l1', 'absolute_error', 'mean_absolute_error', 'l1_loss'],
    expression: 'abs(p - y)',
    gradient: 'sign(p - y)',
  },
  {
    name: 'huber',
    aliases: ['huber_loss', 'smooth_l1', 'smooth-l1'],
    expression: 'abs(p - y) <= 1 ? (p - y) ^ 2 / 2 : abs(p - y) - 1 / 2',
    gradient: 'abs(p - y) <= 1 ? p - y : sign(p - y)',
  },
  {
    name: 'cross-entropy',
    aliases: ['ce', 'cross_entropy', 'categorical_cross_entropy', 'categorical_crossentropy', 'nll'],
    expression: '-sum_i y_i * log(p_i)',
    gradient: '-y_i / p_i',
  },
];

/**
 * A loss by name: one of `LOSSES`, else a loss of the engine's catalogue written in (p, y), with its
 * published defaults bound and ∂L/∂p from the engine's differentiator.
 */
export function lookupLoss(name: string): LossDefinition | undefined {
  const k = name.trim().toLowerCase();
  const own = LOSSES.find((l) => l.name === k || l.aliases.includes(k));
  if (own) return own;
  const entry = lookupFunction(k);
  if (!entry || entry.role !== 'loss' || entry.args.length !== 2 || entry.args[0] !== 'p' || entry.args[1] !== 'y') return undefined;
  let node = math.parse(entry.definition);
  for (const prm of entry.params) {
    if (prm.default === undefined) return undefined;
    node = substitute(node, prm.name, new math.ConstantNode(prm.default));
  }
  return { name: entry.name, aliases: entry.aliases, expression: node.toString(), gradient: differentiate(node, 'p').toString() };
}

export interface StarvedInterval {
  target: number;
  from: number | null;
  to: number | null;
}

export interface PairingAnalysis {
  activation: string;
  loss: string;
  /** dL/dz in z (stock mathjs), before simplification; for softmax a documented vector form. */
  gradient: string;
  /** dL/dz in terms of p = f(z) and the target y (stock mathjs), or null when none was found. */
  gradientInOutput: string | null;
  starves: boolean;
  starved: StarvedInterval[];
  message?: string;
  /** For the vector case: largest |analytic − central difference| of ∂L/∂z. */
  check?: { maxError: number; points: number };
}

const STARVE_FRACTION = 0.01;
/** Where a starved run at the scan's edge is checked to go on (far enough, but before e^z overflows double). */
const FAR_Z = 60;

function softmaxCrossEntropy(): PairingAnalysis {
  let err = 0;
  let pts = 0;
  let s = 7;
  const r = (): number => {
    s = (s * 1103515245 + 12345) % 2147483648;
    return s / 2147483648;
  };
  for (let n = 2; n <= 6; n++) {
    for (let k = 0; k < 4; k++) {
      const z = Array.from({ length: n }, () => (r() - 0.5) * 8);
      const yRaw = Array.from({ length: n }, () => r());
      const ys = yRaw.reduce((a, b) => a + b, 0);
      const y = yRaw.map((v) => v / ys);
      const L = (zz: number[]): number => -softmax(zz).reduce((a, p, i) => a + (y[i] as number) * Math.log(p), 0);
      const g = crossEntropyGradient(z, y);
      for (let j = 0; j < n; j++) {
        const h = 1e-6;
        const zp = z.slice();
        const zm = z.slice();
        zp[j] = (zp[j] as number) + h;
        zm[j] = (zm[j] as number) - h;
        err = Math.max(err, Math.abs((L(zp) - L(zm)) / (2 * h) - (g[j] as number)));
      }
      pts++;
    }
  }
  return {
    activation: 'softmax',
    loss: 'cross-entropy',
    gradient: 'dL/dz_j = p_j - y_j (p = softmax(z), sum_i y_i = 1)',
    gradientInOutput: 'p - y',
    starves: false,
    starved: [],
    check: { maxError: err, points: pts },
  };
}

/** Fit dL/dz samples by (p − y)·q(p), then by Σ c_ij p^i y^j; return text or null. */
function fitInOutput(samples: Array<{ p: number; y: number; g: number }>): string | null {
  let scale = 1e-300;
  for (const s of samples) scale = Math.max(scale, Math.abs(s.g));
  const ok = (fn: (p: number, y: number) => number): boolean => samples.every((s) => Math.abs(fn(s.p, s.y) - s.g) <= 1e-9 * scale);
  const snapC = (c: number): number => {
    for (let d = 1; d <= 12; d++) {
      const k = Math.round(c * d);
      if (Math.abs(k / d - c) <= 1e-9 * Math.max(1, Math.abs(c))) return k / d;
    }
    return c;
  };
  // (p − y)·q(p)
  for (let deg = 0; deg <= 2; deg++) {
    const rows = samples.map((s) => Array.from({ length: deg + 1 }, (_, i) => (s.p - s.y) * s.p ** i));
    const c = leastSquares(rows, samples.map((s) => s.g));
    if (!c) continue;
    const cs = c.map(snapC);
    const q = (p: number): number => cs.reduce((a, ci, i) => a + ci * p ** i, 0);
    if (ok((p, y) => (p - y) * q(p))) {
      if (cs.every((v, i) => (i === 0 ? v === 1 : v === 0))) return 'p - y';
      const qt = polynomialText(cs, 'p');
      const m = /^(-?\d+(?:\.\d+)?) \* (.+)$/.exec(qt);
      if (m && m[1] !== undefined && m[2] !== undefined) return `${m[1]} * (p - y) * ${m[2]}`;
      if (cs.length === 1) return `${qt} * (p - y)`;
      return `(p - y) * ${/[+-]/.test(qt.replace(/^-/, '')) && !qt.includes('* (') ? `(${qt})` : qt}`;
    }
  }
  // Σ c_ij p^i y^j, i ≤ 3, j ≤ 1
  const terms: Array<[number, number]> = [];
  for (let j = 0; j <= 1; j++) for (let i = 0; i <= 3; i++) terms.push([i, j]);
  const rows = samples.map((s) => terms.map(([i, j]) => s.p ** i * s.y ** j));
  const c = leastSquares(rows, samples.map((s) => s.g));
  if (!c) return null;
  const cs = c.map(snapC);
  if (!ok((p, y) => terms.reduce((a, [i, j], k) => a + (cs[k] as number) * p ** i * y ** j, 0))) return null;
  const inY = polynomialText(cs.slice(4), 'p');
  const free = polynomialText(cs.slice(0, 4), 'p');
  if (inY === '0') return free;
  if (free === '0') return `y * (${inY})`;
  return `${free} + y * (${inY})`;
}

export function analyzePairing(activation: Formula | 'softmax', lossName: string, derivs?: Derivatives): PairingAnalysis {
  const loss = lookupLoss(lossName);
  if (!loss) throw new SlopewiseError('bad-argument', `unknown loss ${lossName}: known are ${LOSSES.map((l) => l.name).join(', ')} and the losses in (p, y) of the catalogue`);
  if (activation === 'softmax') {
    if (loss.name !== 'cross-entropy') throw new SlopewiseError('bad-argument', `softmax pairs with cross-entropy here, not ${loss.name}`);
    return softmaxCrossEntropy();
  }
  if (loss.name === 'cross-entropy') throw new SlopewiseError('bad-argument', 'cross-entropy is a vector loss: pair it with softmax');
  if (activation.unbound.length > 0) throw new SlopewiseError('bad-argument', `no value for ${activation.unbound.join(', ')}`);
  const z = activation.variable;
  const params = activation.parameters;
  const dnode: MathNode = derivs?.firstNode ?? differentiate(activation.node, z);
  const f = compileScalar(activation.node, z, params);
  const df = compileScalar(dnode, z, params);
  const L = compileMulti(math.parse(loss.expression), ['p', 'y']);
  const Lp = compileMulti(math.parse(loss.gradient), ['p', 'y']);
  const grad = (zz: number, y: number): number => Lp(f(zz), y) * df(zz);
  // dL/dz as a tree in z: L_p(p = f(z), y) · f′(z).
  const gradNode = new math.OperatorNode('*', 'multiply', [
    new math.ParenthesisNode(substitute(math.parse(loss.gradient), 'p', activation.node)),
    new math.ParenthesisNode(dnode.cloneDeep()),
  ]);
  const prepared = prepare(activation.node, dnode, z, params);
  const r = range(prepared);
  const bounded = r.inf !== null && r.sup !== null;
  const lo = bounded ? (r.inf as number) : -1;
  const hi = bounded ? (r.sup as number) : 1;
  const targets = [lo, lo + 0.25 * (hi - lo), lo + 0.5 * (hi - lo), hi];
  const samples: Array<{ p: number; y: number; g: number }> = [];
  for (let zz = -8; zz <= 8; zz += 0.1) {
    for (const y of targets) {
      const p = f(zz);
      const g = grad(zz, y);
      if (Number.isFinite(p) && Number.isFinite(g)) samples.push({ p, y, g });
    }
  }
  const gradientInOutput = samples.length > 20 && monotonicity(prepared) !== 'none' ? fitInOutput(samples) : null;

  const starved: StarvedInterval[] = [];
  if (bounded) {
    const mid = 0.5 * (lo + hi);
    for (const target of [lo, hi]) {
      const Lmid = L(mid, target);
      // a loss undefined at the midpoint does not fit this activation's range (BCE on tanh)
      if (!Number.isFinite(Lmid)) continue;
      let gmax = 0;
      const zs: number[] = [];
      for (let i = 0; i <= 6000; i++) zs.push(-30 + i * 0.01);
      let at = 0;
      for (const zz of zs) {
        const g = Math.abs(grad(zz, target));
        if (Number.isFinite(g) && g > gmax) {
          gmax = g;
          at = zz;
        }
      }
      // the peak between grid points, by golden-section search
      gmax = Math.max(gmax, goldenMax((t) => {
        const g = Math.abs(grad(t, target));
        return Number.isFinite(g) ? g : 0;
      }, at - 0.01, at + 0.01)[1]);
      if (!(gmax > 0)) continue;
      const starving = (zz: number): boolean => {
        const l = L(f(zz), target);
        const g = Math.abs(grad(zz, target));
        return l >= Lmid && Number.isFinite(g) && g < STARVE_FRACTION * gmax;
      };
      let i = 0;
      while (i < zs.length) {
        if (!starving(zs[i] as number)) {
          i++;
          continue;
        }
        let j = i;
        while (j + 1 < zs.length && starving(zs[j + 1] as number)) j++;
        const from = i === 0 ? (starving(-FAR_Z) ? null : -30) : tidy(bisectBoundary(starving, zs[i] as number, zs[i - 1] as number, true));
        const to = j === zs.length - 1 ? (starving(FAR_Z) ? null : 30) : tidy(bisectBoundary(starving, zs[j] as number, zs[j + 1] as number, true));
        starved.push({ target, from, to });
        i = j + 1;
      }
    }
  }
  const name = activation.recognised ?? activation.expression;
  const result: PairingAnalysis = {
    activation: name,
    loss: loss.name,
    gradient: gradNode.toString(),
    gradientInOutput,
    starves: starved.length > 0,
    starved,
  };
  if (starved.length > 0) {
    const where = starved
      .map((s) => `target ${s.target}: z ${s.from === null ? '< ' + String(s.to) : s.to === null ? '> ' + String(s.from) : `in [${s.from}, ${s.to}]`}`)
      .join('; ');
    result.message = `${name} with ${loss.name} starves the gradient where the loss is large: |dL/dz| < ${STARVE_FRACTION * 100}% of its peak while the prediction is on the wrong side (${where})`;
  }
  return result;
}

/** Exposed for tests: the loss as a compiled function of (p, y). */
export function compileLoss(name: string): { L: (p: number, y: number) => number; Lp: (p: number, y: number) => number } {
  const loss = lookupLoss(name);
  if (!loss || loss.name === 'cross-entropy') throw new SlopewiseError('bad-argument', `not a scalar loss: ${name}`);
  return { L: compileMulti(math.parse(loss.expression), ['p', 'y']), Lp: compileMulti(math.parse(loss.gradient), ['p', 'y']) };
}

