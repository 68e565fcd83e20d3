/**
 * What every analysis part needs, computed once per formula: compiled f, f′ (and f″ when there is
 * one), the candidate break points, the behaviour grid with f and f′ sampled on it, and the
 * structural-zero indicator of f′.
 */
import type { MathNode } from 'mathjs';
import { compileScalar } from '../expr/compile';
import type { ScalarFn } from '../types';
import { behaviourGrid, dedupe, roots, FAR } from './numeric';
import { breakExpressions, zeroIndicator } from './tree';

export interface Prepared {
  variable: string;
  params: Record<string, number>;
  node: MathNode;
  dnode: MathNode;
  f: ScalarFn;
  df: ScalarFn;
  /** 1 where the active branch of f′ is structurally 0. */
  dead: ScalarFn;
  /** Roots of the break expressions (conditions, abs/sign/max/min arguments, denominators), sorted. */
  breaks: number[];
  grid: number[];
  fs: Float64Array;
  dfs: Float64Array;
  deads: Uint8Array;
}

/** Largest number of break points kept (a periodic function could have very many). */
const MAX_BREAKS = 200;

export function prepare(node: MathNode, dnode: MathNode, variable: string, params: Record<string, number>): Prepared {
  const f = compileScalar(node, variable, params);
  const df = compileScalar(dnode, variable, params);
  const dead = compileScalar(zeroIndicator(dnode, params), variable, params);
  const coarse = behaviourGrid();
  let breaks: number[] = [];
  for (const e of breakExpressions(node)) {
    let g: ScalarFn;
    try {
      g = compileScalar(e, variable, params);
    } catch {
      continue;
    }
    breaks.push(...roots(g, coarse).filter((r) => Math.abs(r) < FAR));
    if (breaks.length > MAX_BREAKS) break;
  }
  breaks = dedupe(breaks.sort((a, b) => a - b)).filter((v, i, arr) => i === 0 || Math.abs(v - (arr[i - 1] as number)) > 1e-9 * Math.max(1, Math.abs(v)));
  breaks = breaks.slice(0, MAX_BREAKS).map((b) => (Math.abs(b) < 1e-12 ? 0 : b));
  const grid = behaviourGrid(breaks);
  const fs = new Float64Array(grid.length);
  const dfs = new Float64Array(grid.length);
  const deads = new Uint8Array(grid.length);
  for (let i = 0; i < grid.length; i++) {
    const x = grid[i] as number;
    fs[i] = f(x);
    // Outside f's domain (log x for x < 0) f′ means nothing, whatever its tree evaluates to.
    dfs[i] = Number.isNaN(fs[i] as number) ? NaN : df(x);
    deads[i] = dead(x) ? 1 : 0;
  }
  // Where f′ is NaN but f is finite, double precision overflowed inside the derivative as written
  // (σ′ = e^(−x)/(1 + e^(−x))² is inf/inf beyond x ≈ −709): carry the value from the side nearer
  // the origin, so that tails are read as what they tend to, not as holes.
  let centre = 0;
  while (centre < grid.length && (grid[centre] as number) < 0) centre++;
  const carry = (i: number, from: number): void => {
    if (Number.isNaN(dfs[i] as number) && !Number.isNaN(fs[i] as number) && Number.isFinite(dfs[from] as number)) {
      dfs[i] = dfs[from] as number;
      deads[i] = deads[from] as number;
    }
  };
  for (let i = centre - 1; i >= 0; i--) if (i + 1 < grid.length) carry(i, i + 1);
  for (let i = centre + 1; i < grid.length; i++) carry(i, i - 1);
  return { variable, params, node, dnode, f, df, dead, breaks, grid, fs, dfs, deads };
}

/** A refined boundary within 1e-9 of a break point is that break point (bisection noise). */
export function snapToBreak(p: Prepared, x: number | null): number | null {
  if (x === null) return null;
  for (const b of p.breaks) if (Math.abs(b - x) <= 1e-9 * Math.max(1, Math.abs(b))) return b;
  return x;
}
