/**
 * Side-by-side timing on a shared, noisy machine: every ratio is measured within one run, the two
 * sides interleaved (ABAB…, the order alternating per round), after a warm-up, as the ratio of
 * medians. Absolute times are printed for orientation only.
 */

export const now: () => number = () => performance.now();

export function median(xs: readonly number[]): number {
  if (xs.length === 0) return NaN;
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 === 1 ? (s[m] as number) : ((s[m - 1] as number) + (s[m] as number)) / 2;
}

/** Milliseconds per call of `fn`, calling it until at least `minMs` have passed (at least once). */
export function perCall(fn: () => unknown, minMs: number): number {
  let calls = 0;
  const t0 = now();
  let t = t0;
  do {
    fn();
    calls++;
    t = now();
  } while (t - t0 < minMs);
  return (t - t0) / calls;
}

export interface Paired {
  a: number[];
  b: number[];
  /** median(a) / median(b). */
  ratio: number;
}

/** Interleaved rounds of two measurements; each returns milliseconds. */
export function paired(rounds: number, a: () => number, b: () => number, warmup = 1): Paired {
  for (let i = 0; i < warmup; i++) { a(); b(); }
  const ta: number[] = [];
  const tb: number[] = [];
  for (let i = 0; i < rounds; i++) {
    if (i % 2 === 0) { ta.push(a()); tb.push(b()); } else { tb.push(b()); ta.push(a()); }
  }
  return { a: ta, b: tb, ratio: median(ta) / median(tb) };
}

/** A loop over the points with its own call site, so each function is measured monomorphically. */
export function makeLoop(): (f: (x: number) => number, xs: Float64Array) => number {
  // The bench's own fixed source; a fresh closure per call gives the loop its own type feedback.
  return new Function('f', 'xs', 'let s = 0; for (let i = 0; i < xs.length; i++) s += f(xs[i]); return s;') as (f: (x: number) => number, xs: Float64Array) => number;
}

/** Keeps results observable so the JIT cannot drop the work. */
export let sink = 0;
export function consume(v: number): void {
  sink += Number.isFinite(v) ? v * 1e-300 : 1e-300;
}
