/**
 * Memory for the checker and detection: bounded, pure (no Node APIs), keyed only by what a result depends on.
 *
 * Every cached value is a pure function of its key — the formula text, the notation it is read in,
 * the variable and the parameter bindings (for a comparison: those of both sides, the argument form
 * and the upstream names) — so a hit returns exactly what recomputing would, and a miss only costs
 * time. Nothing here depends on positions in a file: spans, messages and fixes are rebuilt on every
 * check from the current text. Cached formulas and trees are shared and must be treated as immutable
 * (the checker never mutates a Formula or a MathNode; it copies, as `withParams` does).
 */

/** Entries kept per table (each table of a CheckCache). A formula with its tree is a few kB. */
export const CHECK_CACHE_ENTRIES = 1000;

/** A least-recently-used map (Map keeps insertion order; a hit moves the key to the end). */
export class Lru<V> {
  private readonly map = new Map<string, V>();
  constructor(private readonly max: number = CHECK_CACHE_ENTRIES) {}

  get size(): number {
    return this.map.size;
  }

  get(key: string): V | undefined {
    const v = this.map.get(key);
    if (v === undefined) return undefined;
    this.map.delete(key);
    this.map.set(key, v);
    return v;
  }

  has(key: string): boolean {
    return this.map.has(key);
  }

  set(key: string, value: V): void {
    if (this.map.has(key)) this.map.delete(key);
    else if (this.map.size >= this.max) {
      const oldest = this.map.keys().next();
      if (!oldest.done) this.map.delete(oldest.value);
    }
    this.map.set(key, value);
  }

  clear(): void {
    this.map.clear();
  }
}

/** Returns the cached value for `key`, computing and storing it on a miss. */
export function memo<V>(table: { get(key: string): V | undefined; set(key: string, value: V): unknown }, key: string | undefined, compute: () => V): V {
  if (key === undefined) return compute();
  const hit = table.get(key);
  if (hit !== undefined) return hit;
  const v = compute();
  table.set(key, v);
  return v;
}

/** A stable text for parameter bindings: sorted names, numbers in full (−0 kept apart from 0). */
export function paramsKey(p: Readonly<Record<string, number>> | undefined): string {
  if (!p) return '';
  const keys = Object.keys(p).sort();
  let s = '';
  for (const k of keys) {
    const v = p[k]!;
    s += `${k}=${Object.is(v, -0) ? '-0' : String(v)};`;
  }
  return s;
}

/**
 * Joins key parts unambiguously: each part is prefixed by its length, so no text (whatever
 * characters it holds) can make two different part lists produce the same key.
 */
export function keyOf(...parts: readonly (string | number | boolean | undefined)[]): string {
  let s = '';
  for (const p of parts) {
    if (p === undefined) { s += '-|'; continue; }
    const t = String(p);
    s += `${t.length}|${t}`;
  }
  return s;
}
