/**
 * Kinks (f continuous, left and right derivatives differ) and discontinuities (f jumps or has a
 * pole), tested at the candidate break points only: roots of conditions, of abs/sign arguments, of
 * max/min argument differences and of denominators. A candidate is only a candidate: softsign
 * (abs) and ELU with α = 1 (a conditional) are differentiable everywhere.
 *
 * How, at a candidate c with s = max(1, |c|):
 * - jump J(h) = |f(c + h) − f(c − h)|. Discontinuous when J(1e-10·s) > 1e-8·(1 + |f(c)|) and
 *   J does not shrink with h (J(1e-10·s) ≥ ½·J(1e-8·s)); a continuous f has J ≈ 2h|f′|.
 * - kink when continuous and |f′(c − h) − f′(c + h)| > 1e-6·(1 + |f′(c − h)| + |f′(c + h)|) at
 *   h = 1e-9·s, with f′ from the derivative tree (one-sided, so a NaN at c itself does not matter).
 * Limits: a kink with a jump in f′ smaller than ~1e-6 relative is missed; break points are found by
 * sign changes on the behaviour grid, so a double root (x² in a denominator) is not a candidate.
 */
import type { Prepared } from './prepare';
import { tidy } from './numeric';

export interface Pole {
  x: number;
  /** Sign of f just left and right of the pole (−1 → −∞, +1 → +∞). */
  left: number;
  right: number;
}

export interface Jump {
  x: number;
  /** f(c + h) − f(c − h) for a small h: > 0 jumps up. */
  size: number;
}

export interface KinkResult {
  kinks: number[];
  discontinuities: number[];
  /** Discontinuities where |f| grows without bound (1/x at 0). */
  poles: Pole[];
  jumps: Jump[];
}

export function kinksAndJumps(p: Prepared): KinkResult {
  const kinks: number[] = [];
  const discontinuities: number[] = [];
  const poles: Pole[] = [];
  const jumps: Jump[] = [];
  for (const c of p.breaks) {
    const s = Math.max(1, Math.abs(c));
    const jump = (h: number): number => Math.abs(p.f(c + h) - p.f(c - h));
    const fc = p.f(c);
    const j1 = jump(1e-10 * s);
    const j2 = jump(1e-8 * s);
    const scaleF = 1 + (Number.isFinite(fc) ? Math.abs(fc) : Math.abs(p.f(c + 1e-10 * s)));
    if (Number.isNaN(j1)) continue; // one side outside the domain
    if (j1 === Infinity || (j1 > 1e-8 * scaleF && j1 >= 0.5 * j2)) {
      discontinuities.push(tidy(c));
      // A pole: |f| keeps growing as c is approached (×10 or more over two decades of h).
      const near = Math.max(Math.abs(p.f(c - 1e-12 * s)), Math.abs(p.f(c + 1e-12 * s)));
      const far = Math.max(Math.abs(p.f(c - 1e-8 * s)), Math.abs(p.f(c + 1e-8 * s)));
      if (near === Infinity || near > 10 * far) poles.push({ x: tidy(c), left: Math.sign(p.f(c - 1e-12 * s)), right: Math.sign(p.f(c + 1e-12 * s)) });
      else jumps.push({ x: tidy(c), size: p.f(c + 1e-10 * s) - p.f(c - 1e-10 * s) });
      continue;
    }
    const h = 1e-9 * s;
    const dl = p.df(c - h);
    const dr = p.df(c + h);
    if (!Number.isFinite(dl) || !Number.isFinite(dr)) continue;
    if (Math.abs(dl - dr) > 1e-6 * (1 + Math.abs(dl) + Math.abs(dr))) kinks.push(tidy(c));
  }
  return { kinks, discontinuities, poles, jumps };
}
