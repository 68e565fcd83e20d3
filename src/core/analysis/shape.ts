/**
 * Shape of f over ℝ from the behaviour grid (uniform on [−20, 20], geometric out to ±1e9):
 * range (inf/sup, attained or only approached), monotonicity, Lipschitz bound sup|f′|.
 *
 * Approximate by nature: behaviour beyond ±1e9 is read from the tail of the grid, interior extrema
 * are refined by golden-section search between grid neighbours.
 */
import type { Prepared } from './prepare';
import { goldenMax, tidy, FAR } from './numeric';

export interface RangeResult {
  /** Infimum; null = −∞. */
  inf: number | null;
  /** Supremum; null = +∞. */
  sup: number | null;
  infAttained: boolean;
  supAttained: boolean;
}

export type Monotonicity = 'increasing' | 'decreasing' | 'non-decreasing' | 'non-increasing' | 'constant' | 'none';

/** True when values at the far tail keep growing (by decades) instead of settling. */
function growsWithoutBound(h: (x: number) => number, sign: 1 | -1, dir: 1 | -1): boolean {
  // h grows unboundedly toward dir·∞ in the direction of `sign` (sup: +1, inf: −1).
  const v = (x: number): number => sign * h(dir * x);
  const a = v(1e5);
  const b = v(1e7);
  const c = v(FAR);
  if (c === Infinity || b === Infinity) return true;
  if (!Number.isFinite(a) || !Number.isFinite(b) || !Number.isFinite(c)) return false;
  const d1 = b - a;
  const d2 = c - b;
  // Settling functions approach their limit like 1/x or faster: increments shrink ~100× per two
  // decades. Unbounded ones (x, log x, √x) keep increments at least comparable.
  return d2 > 0 && d1 > 0 && d2 >= 0.3 * d1 && d2 > 1e-12 * Math.max(1, Math.abs(c));
}

function extremum(p: Prepared, sign: 1 | -1): { value: number | null; attained: boolean; at: number | null } {
  const { grid, fs, deads, f } = p;
  if (growsWithoutBound(f, sign, 1) || growsWithoutBound(f, sign, -1)) return { value: null, attained: false, at: null };
  let best = -Infinity;
  let bi = -1;
  for (let i = 0; i < grid.length; i++) {
    const v = sign * (fs[i] as number);
    if (Number.isNaN(v)) continue;
    if (v > best) {
      best = v;
      bi = i;
    }
  }
  if (bi < 0) return { value: null, attained: false, at: null };
  if (best === Infinity) return { value: null, attained: false, at: null };
  const n = grid.length;
  const x = grid[bi] as number;
  const left = bi > 0 ? sign * (fs[bi - 1] as number) : NaN;
  const right = bi + 1 < n ? sign * (fs[bi + 1] as number) : NaN;
  // Interior strict extremum between grid neighbours: refine.
  if (left < best && right < best) {
    const [xm, vm] = goldenMax((t) => sign * f(t), grid[bi - 1] as number, grid[bi + 1] as number);
    return { value: sign * Math.max(vm, best), attained: true, at: vm >= best ? xm : x };
  }
  // A plateau or an end of the grid: attained only where f′ is structurally 0 (a flat branch, as in
  // ReLU6) or where the extremum is reached at a point with smaller values on both sides. Otherwise
  // the grid value is the limit at ±∞ that double precision reached by rounding (σ(40) = 1).
  const firstEqual = (() => {
    let i = bi;
    while (i > 0 && sign * (fs[i - 1] as number) === best) i--;
    return i;
  })();
  for (let i = firstEqual; i < n && sign * (fs[i] as number) === best; i++) {
    if (deads[i] === 1 && Math.abs(grid[i] as number) < FAR) return { value: sign * best, attained: true, at: grid[i] as number };
  }
  if (Math.abs(x) < FAR) {
    // At the edge of the formula's domain (√x at 0): attained there.
    if (left < best && Number.isNaN(right)) return { value: sign * best, attained: true, at: x };
    if (right < best && Number.isNaN(left)) return { value: sign * best, attained: true, at: x };
  }
  if (Math.abs(x) >= FAR) {
    // Still creeping at ±1e9 (softsign: 1 − 1/(1 + x)): extrapolate the limit with Aitken's Δ².
    const dir = x > 0 ? 1 : -1;
    const a = sign * f(dir * 1e5);
    const b = sign * f(dir * 1e7);
    const c = best;
    const den = c - b - (b - a);
    const L = den !== 0 && Number.isFinite(den) ? c - ((c - b) * (c - b)) / den : c;
    const value = L !== c ? Number(L.toPrecision(8)) : c;
    return { value: sign * value, attained: false, at: null };
  }
  return { value: sign * best, attained: false, at: null };
}

export function range(p: Prepared): RangeResult {
  const hi = extremum(p, 1);
  const lo = extremum(p, -1);
  return {
    inf: lo.value === null ? null : tidy(lo.value),
    sup: hi.value === null ? null : tidy(hi.value),
    infAttained: lo.attained,
    supAttained: hi.attained,
  };
}

/** Scale-aware sign of f′ samples; dead (structurally 0) points count as flat. */
export function monotonicity(p: Prepared): Monotonicity {
  let maxAbs = 0;
  for (const d of p.dfs) if (Number.isFinite(d)) maxAbs = Math.max(maxAbs, Math.abs(d));
  const eps = 1e-12 * maxAbs;
  let pos = false;
  let neg = false;
  let flat = false;
  for (let i = 0; i < p.dfs.length; i++) {
    const d = p.dfs[i] as number;
    if (p.deads[i] === 1) {
      // flat on an interval (two neighbouring samples), not at a single break point
      if (p.deads[i - 1] === 1 || p.deads[i + 1] === 1) flat = true;
      continue;
    }
    if (!Number.isFinite(d)) continue;
    if (d > eps) pos = true;
    else if (d < -eps) neg = true;
  }
  if (pos && neg) return 'none';
  if (pos) return flat ? 'non-decreasing' : 'increasing';
  if (neg) return flat ? 'non-increasing' : 'decreasing';
  return 'constant';
}

export interface LipschitzResult {
  /** sup |f′| over ℝ; null when unbounded. */
  value: number | null;
  /** Where it is reached; '+inf'/'-inf' when only approached as x → ±∞; null when unbounded or the same everywhere. */
  at: number | '+inf' | '-inf' | null;
}

/** A location found by golden-section search, to 1e-7 absolute (its accuracy for a smooth extremum). */
function roundPlace(x: number): number {
  const r = Math.round(x * 1e7) / 1e7;
  return r === 0 ? 0 : r;
}

export function lipschitz(p: Prepared): LipschitzResult {
  const absd = (x: number): number => Math.abs(p.df(x));
  // |f′| blowing up at a break point (√|x|, x·sin(1/x) at 0): no finite bound. A bounded f′ near a
  // kink settles to its one-sided limits instead.
  for (const c of p.breaks) {
    const s = Math.max(1, Math.abs(c));
    const near = Math.max(absd(c - 1e-10 * s), absd(c + 1e-10 * s));
    const far = Math.max(absd(c - 1e-7 * s), absd(c + 1e-7 * s));
    if (Number.isFinite(far) && (near === Infinity || near > 10 * Math.max(far, 1e-300))) return { value: null, at: null };
  }
  const grows = (dir: 1 | -1): boolean => {
    const a = absd(dir * 1e5);
    const b = absd(dir * 1e7);
    const c = absd(dir * FAR);
    return c === Infinity || (Number.isFinite(c) && c > b && b > a && c - b >= 0.3 * (b - a) && c > 1e-9);
  };
  if (grows(1) || grows(-1)) return { value: null, at: null };
  let best = -1;
  let bi = -1;
  for (let i = 0; i < p.grid.length; i++) {
    const v = Math.abs(p.dfs[i] as number);
    if (!Number.isFinite(v)) {
      if (v === Infinity) return { value: null, at: null };
      continue;
    }
    if (v > best) {
      best = v;
      bi = i;
    }
  }
  if (bi < 0) return { value: null, at: null };
  const n = p.grid.length;
  const l = bi > 0 ? Math.abs(p.dfs[bi - 1] as number) : -1;
  const r = bi + 1 < n ? Math.abs(p.dfs[bi + 1] as number) : -1;
  const x = p.grid[bi] as number;
  if (l < best && r < best && bi > 0 && bi + 1 < n) {
    const [xm, vm] = goldenMax(absd, p.grid[bi - 1] as number, p.grid[bi + 1] as number);
    // A maximum at a kink (|f′| jumps) stays at the grid value.
    // Golden-section locates a smooth maximum to ~√ε relative: report the place to 1e-7.
    return vm >= best ? { value: tidy(vm), at: roundPlace(xm) } : { value: tidy(best), at: tidy(x) };
  }
  // Plateau of |f′| (equal values): reached on a whole interval (ReLU: x > 0) or only the rounding
  // of an asymptote (softplus′ = σ rounds to 1 beyond x ≈ 37). The second creeps up to the plateau
  // (relative gap < 1e-10 just before it); the first jumps or bends onto it.
  let first = bi;
  while (first > 0 && Math.abs(p.dfs[first - 1] as number) === best) first--;
  let last = bi;
  while (last + 1 < n && Math.abs(p.dfs[last + 1] as number) === best) last++;
  const xFirst = p.grid[first] as number;
  const xLast = p.grid[last] as number;
  const gap = (j: number): number => (j < 0 || j >= n ? 1 : (best - Math.abs(p.dfs[j] as number)) / best);
  if (xLast >= 1e6 && xFirst > 0 && gap(first - 1) < 1e-10) return { value: tidy(best), at: '+inf' };
  if (xFirst <= -1e6 && xLast < 0 && gap(last + 1) < 1e-10) return { value: tidy(best), at: '-inf' };
  if (xFirst <= -1e6 && xLast >= 1e6) return { value: tidy(best), at: null }; // the same everywhere
  let at = xFirst <= -1e6 ? xLast : xFirst;
  // The grid samples break points at b ± 1e-7·max(1, |b|): report the break point itself.
  for (const b of p.breaks) if (Math.abs(b - at) <= 2e-7 * Math.max(1, Math.abs(b))) at = b;
  return { value: tidy(best), at: tidy(at) };
}
