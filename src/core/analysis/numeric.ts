/**
 * Small numeric tools the analyses share: sampling grids, bisection on a classification, golden-section
 * search, Gauss–Legendre quadrature and a least-squares solver. Plain functions of numbers.
 */

/** Half-width of the dense part of the behaviour grid. */
export const DENSE_HALF_WIDTH = 20;
/** Step of the dense part of the behaviour grid. */
export const DENSE_STEP = 0.02;
/** Farthest point of the geometric tail (behaviour "as x → ±∞" is read from here). */
export const FAR = 1e9;
const TAIL_FACTOR = 1.25;

/**
 * Sorted sample points for behaviour over ℝ: uniform on [−20, 20] (step 0.02), then geometric out to
 * ±1e9 (factor 1.25), plus any extra points given (break points, so that both sides are sampled).
 */
let plainGrid: readonly number[] | null = null;

export function behaviourGrid(extra: readonly number[] = []): number[] {
  if (extra.length === 0) {
    plainGrid ??= Object.freeze(buildGrid([]));
    return plainGrid.slice();
  }
  return buildGrid(extra);
}

function buildGrid(extra: readonly number[]): number[] {
  const pts: number[] = [];
  const n = Math.round((2 * DENSE_HALF_WIDTH) / DENSE_STEP);
  for (let i = 0; i <= n; i++) pts.push(-DENSE_HALF_WIDTH + i * DENSE_STEP);
  for (let v = DENSE_HALF_WIDTH * TAIL_FACTOR; v < FAR; v *= TAIL_FACTOR) {
    pts.push(v, -v);
  }
  pts.push(FAR, -FAR);
  for (const e of extra) {
    if (!Number.isFinite(e)) continue;
    const h = 1e-7 * Math.max(1, Math.abs(e));
    pts.push(e - h, e + h);
  }
  pts.sort((a, b) => a - b);
  // Round the dense part's accumulated steps so that 0 is exactly 0 etc.
  return dedupe(pts.map((p) => (Math.abs(p) <= DENSE_HALF_WIDTH ? Math.round(p * 1e9) / 1e9 : p)));
}

/** Uniform grid over [a, b] with n intervals (n + 1 points). */
export function uniformGrid(a: number, b: number, n: number): number[] {
  const out: number[] = [];
  for (let i = 0; i <= n; i++) out.push(a + ((b - a) * i) / n);
  return out;
}

export function dedupe(sorted: number[]): number[] {
  const out: number[] = [];
  for (const v of sorted) if (out.length === 0 || v !== out[out.length - 1]) out.push(v);
  return out;
}

/**
 * Finds the boundary between a point classified `ca` at `a` and one classified differently at `b`,
 * by bisection until the bracket is below ~1e-12 relative (or 60 steps). Returns the midpoint of the
 * final bracket.
 */
export function bisectBoundary<T>(classify: (x: number) => T, a: number, b: number, ca: T): number {
  let lo = a;
  let hi = b;
  for (let i = 0; i < 60; i++) {
    const mid = 0.5 * (lo + hi);
    if (mid === lo || mid === hi) break;
    if (Math.abs(hi - lo) <= 1e-12 * Math.max(1, Math.abs(mid))) break;
    if (classify(mid) === ca) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}

/** Sign changes (and exact zeros) of g on a sorted grid, each refined by bisection. */
export function roots(g: (x: number) => number, grid: readonly number[]): number[] {
  const out: number[] = [];
  let px = grid[0] as number;
  let pv = g(px);
  if (pv === 0) out.push(px);
  for (let i = 1; i < grid.length; i++) {
    const x = grid[i] as number;
    const v = g(x);
    if (v === 0) out.push(x);
    else if (Number.isFinite(v) && Number.isFinite(pv) && pv !== 0 && (v > 0) !== (pv > 0)) {
      const sa = pv > 0;
      out.push(bisectBoundary((t) => g(t) > 0, px, x, sa));
    }
    px = x;
    pv = v;
  }
  return out;
}

/** Maximum of h on [a, b] by golden-section search (h unimodal there); returns [x, h(x)]. */
export function goldenMax(h: (x: number) => number, a: number, b: number, iterations = 80): [number, number] {
  const g = (Math.sqrt(5) - 1) / 2;
  let lo = a;
  let hi = b;
  let x1 = hi - g * (hi - lo);
  let x2 = lo + g * (hi - lo);
  let f1 = h(x1);
  let f2 = h(x2);
  for (let i = 0; i < iterations && hi - lo > 1e-13 * Math.max(1, Math.abs(lo)); i++) {
    if (f1 < f2) {
      lo = x1;
      x1 = x2;
      f1 = f2;
      x2 = lo + g * (hi - lo);
      f2 = h(x2);
    } else {
      hi = x2;
      x2 = x1;
      f2 = f1;
      x1 = hi - g * (hi - lo);
      f1 = h(x1);
    }
  }
  const cands: Array<[number, number]> = [[x1, f1], [x2, f2], [a, h(a)], [b, h(b)]];
  let best = cands[0] as [number, number];
  for (const c of cands) if (c[1] > best[1]) best = c;
  return best;
}

/**
 * 10-point Gauss–Legendre nodes and weights on [−1, 1] (from memory, as in Abramowitz & Stegun
 * table 25.4; the moment tests check the rule reproduces known integrals to ~1e-14).
 */
const GL_NODES = [
  0.1488743389816312, 0.4333953941292472, 0.6794095682990244, 0.8650633666889845, 0.9739065285171717,
];
const GL_WEIGHTS = [
  0.2955242247147529, 0.2692667193099963, 0.219086362515982, 0.1494513491505806, 0.0666713443086881,
];

/**
 * ∫ h over [a, b], split at the given break points (kinks, jumps) and into panels no wider than
 * `maxPanel`, 10-point Gauss–Legendre on each panel. Exact for polynomials of degree ≤ 19 per panel,
 * so a piecewise-smooth integrand split at its kinks converges fast.
 */
export function integrate(h: (x: number) => number, a: number, b: number, breaks: readonly number[] = [], maxPanel = 0.5): number {
  const cuts = [a, ...breaks.filter((c) => c > a && c < b).sort((p, q) => p - q), b];
  let sum = 0;
  for (let i = 0; i + 1 < cuts.length; i++) {
    const lo = cuts[i] as number;
    const hi = cuts[i + 1] as number;
    const panels = Math.max(1, Math.ceil((hi - lo) / maxPanel));
    const w = (hi - lo) / panels;
    for (let k = 0; k < panels; k++) {
      const mid = lo + (k + 0.5) * w;
      const half = w / 2;
      let s = 0;
      for (let j = 0; j < GL_NODES.length; j++) {
        const t = (GL_NODES[j] as number) * half;
        s += (GL_WEIGHTS[j] as number) * (h(mid - t) + h(mid + t));
      }
      sum += s * half;
    }
  }
  return sum;
}

/**
 * Least squares: coefficients c minimising ‖A c − b‖₂ for a tall matrix A given by rows, by
 * modified Gram–Schmidt QR (stable enough for the ≤ 8 columns used here). Returns null when the
 * columns are (numerically) dependent.
 */
export function leastSquares(rows: readonly number[][], b: readonly number[]): number[] | null {
  const m = rows.length;
  const n = rows[0]?.length ?? 0;
  if (m < n || n === 0) return null;
  // Column-major copy, columns scaled to unit norm for conditioning.
  const cols: number[][] = [];
  const scale: number[] = [];
  for (let j = 0; j < n; j++) {
    const c = rows.map((r) => r[j] as number);
    const norm = Math.hypot(...c);
    if (!(norm > 0) || !Number.isFinite(norm)) return null;
    scale.push(norm);
    cols.push(c.map((v) => v / norm));
  }
  const R: number[][] = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  const q: number[][] = [];
  for (let j = 0; j < n; j++) {
    const v = (cols[j] as number[]).slice();
    for (let i = 0; i < j; i++) {
      const qi = q[i] as number[];
      let dot = 0;
      for (let k = 0; k < m; k++) dot += (qi[k] as number) * (v[k] as number);
      (R[i] as number[])[j] = dot;
      for (let k = 0; k < m; k++) v[k] = (v[k] as number) - dot * (qi[k] as number);
    }
    const norm = Math.hypot(...v);
    if (norm < 1e-10) return null;
    (R[j] as number[])[j] = norm;
    q.push(v.map((t) => t / norm));
  }
  const qtb = q.map((qi) => qi.reduce((s, t, k) => s + t * (b[k] as number), 0));
  const c = new Array<number>(n).fill(0);
  for (let i = n - 1; i >= 0; i--) {
    let s = qtb[i] as number;
    for (let j = i + 1; j < n; j++) s -= ((R[i] as number[])[j] as number) * (c[j] as number);
    c[i] = s / ((R[i] as number[])[i] as number);
  }
  return c.map((v, j) => v / (scale[j] as number));
}

/** Rounds a reported boundary to 12 significant digits (bisection noise beyond that is meaningless). */
export function tidy(v: number): number {
  if (!Number.isFinite(v) || v === 0) return v;
  return Number(v.toPrecision(12));
}
