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
import { bisectBoundary, tidy } from './numeric';

export type SaturationKind = 'saturating' | 'dead';

export interface SaturationInterval {
  from: number | null;
  to: number | null;
  kind: SaturationKind;
}

type Cls = 'dead' | 'saturating' | 'active' | 'undefined';

/** Longest list reported (a periodic function saturates near every extremum). */
export const MAX_SATURATION_INTERVALS = 40;

export function saturationIntervals(p: Prepared, threshold: number): { intervals: SaturationInterval[]; truncated: boolean } {
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
      out.push({ from: snapToBreak(p, from), to: snapToBreak(p, to), kind: c });
    }
    i = j + 1;
  }
  return { intervals: out, truncated };
}
