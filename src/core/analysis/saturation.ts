/**
 * Saturating and dead intervals: where |f′| < threshold (kind `saturating`) and where f′ is
 * identically 0 (kind `dead`).
 *
 * How: every point of the behaviour grid is classified (dead when the active branch of f′ is
 * structurally zero — see `zeroIndicator` —, saturating when |f′| < t, otherwise active); runs of
 * one class become intervals whose ends are refined by bisection. An interval that reaches the
 * grid's tail (±1e9) runs to ±∞ and its end is null. Points where f′ is NaN (outside the domain)
 * break runs but are not reported.
 */
import { snapToBreak, type Prepared } from './prepare';
import { bisectBoundary, tidy, DENSE_HALF_WIDTH } from './numeric';

export type SaturationKind = 'saturating' | 'dead';

export interface SaturationInterval {
  from: number | null;
  to: number | null;
  kind: SaturationKind;
}

type Cls = 'dead' | 'saturating' | 'active' | 'undefined';

/** Longest list reported (a periodic function saturates near every extremum). */
export const MAX_SATURATION_INTERVALS = 40;

export function saturationIntervals(p: Prepared, threshold: number): { intervals: SaturationInterval[]; truncated: boolean; oscillating: boolean } {
  const classify = (x: number): Cls => {
    if (p.dead(x)) return 'dead';
    const d = p.df(x);
    if (Number.isNaN(d)) return 'undefined';
    return Math.abs(d) < threshold ? 'saturating' : 'active';
  };
  const { grid } = p;
  const n = grid.length;
  const cls: Cls[] = new Array(n);
  for (let i = 0; i < n; i++) {
    const d = p.dfs[i] as number;
    cls[i] = p.deads[i] === 1 ? 'dead' : Number.isNaN(d) ? 'undefined' : Math.abs(d) < threshold ? 'saturating' : 'active';
  }
  const out: SaturationInterval[] = [];
  let i = 0;
  let truncated = false;
  while (i < n) {
    const c = cls[i] as Cls;
    let j = i;
    while (j + 1 < n && cls[j + 1] === c) j++;
    if (c === 'dead' || c === 'saturating') {
      if (out.length >= MAX_SATURATION_INTERVALS) {
        truncated = true;
        break;
      }
      const from = i === 0 ? null : tidy(bisectBoundary(classify, grid[i] as number, grid[i - 1] as number, c));
      const to = j === n - 1 ? null : tidy(bisectBoundary(classify, grid[j] as number, grid[j + 1] as number, c));
      const iv = { from: snapToBreak(p, from), to: snapToBreak(p, to), kind: c };
      // A single point (f′ = 0 exactly at a break point, where the derivative as written picks a
      // branch) is not an interval.
      if (iv.from === null || iv.to === null || iv.to > iv.from) out.push(iv);
    }
    i = j + 1;
  }
  // On the sparse tail (|x| > 20, factor 1.25 apart) an f′ that keeps changing sign or class is not
  // resolved (sin, cos): keep only what the dense part saw and say so.
  const changes = (side: number): number => {
    let c = 0;
    let prev: Cls | undefined;
    let prevSign = 0;
    for (let k = 0; k < n; k++) {
      const x = grid[k] as number;
      if (side * x <= DENSE_HALF_WIDTH) continue;
      const cur = cls[k] as Cls;
      const d = p.dfs[k] as number;
      const sg = d > 0 ? 1 : d < 0 ? -1 : 0;
      if (prev !== undefined && cur !== prev) c++;
      if (prevSign !== 0 && sg !== 0 && sg !== prevSign) c++;
      prev = cur;
      if (sg !== 0) prevSign = sg;
    }
    return c;
  };
  const oscLeft = changes(-1) > 2;
  const oscRight = changes(1) > 2;
  if (oscLeft || oscRight) {
    const kept = out.filter((iv) => !(oscLeft && (iv.from === null || iv.from < -DENSE_HALF_WIDTH)) && !(oscRight && (iv.to === null || iv.to > DENSE_HALF_WIDTH)));
    return { intervals: kept, truncated, oscillating: true };
  }
  return { intervals: out, truncated, oscillating: false };
}
