/**
 * A small seeded random source (SplitMix32 mixing, Mulberry32 stream). The fuzzer and the bench derive
 * one stream per (seed, stage, index), so any single input can be regenerated from those three numbers
 * — a worker that was killed mid-input can be resumed, and a report can name the exact input.
 */

/** 32-bit integer hash of several integers (SplitMix-style finaliser). */
export function mix(...parts: number[]): number {
  let h = 0x9e3779b9;
  for (const p of parts) {
    h = Math.imul(h ^ (p | 0), 0x85ebca6b);
    h ^= h >>> 13;
    h = Math.imul(h, 0xc2b2ae35);
    h ^= h >>> 16;
  }
  return h >>> 0;
}

/** Hash of a string, for stage names. */
export function hashString(s: string): number {
  let h = 2166136261;
  for (let i = 0; i < s.length; i++) h = Math.imul(h ^ s.charCodeAt(i), 16777619);
  return h >>> 0;
}

export class Rng {
  private state: number;

  constructor(seed: number) {
    this.state = seed >>> 0;
  }

  static for(seed: number, stage: string, index: number): Rng {
    return new Rng(mix(seed, hashString(stage), index));
  }

  /** Uniform in [0, 1). */
  next(): number {
    this.state = (this.state + 0x6d2b79f5) >>> 0;
    let t = this.state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  }

  /** Integer in [lo, hi] (inclusive). */
  int(lo: number, hi: number): number {
    return lo + Math.floor(this.next() * (hi - lo + 1));
  }

  bool(p = 0.5): boolean {
    return this.next() < p;
  }

  pick<T>(items: readonly T[]): T {
    if (items.length === 0) throw new RangeError('pick from an empty list');
    return items[Math.floor(this.next() * items.length)] as T;
  }

  /** Picks by weight: [[weight, value], …]. */
  weighted<T>(choices: readonly (readonly [number, T])[]): T {
    let total = 0;
    for (const [w] of choices) total += w;
    let r = this.next() * total;
    for (const [w, v] of choices) {
      r -= w;
      if (r < 0) return v;
    }
    return (choices[choices.length - 1] as readonly [number, T])[1];
  }

  /** A normal deviate (Box–Muller). */
  normal(): number {
    const u = 1 - this.next();
    const v = this.next();
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
  }
}

/** The same stream as a plain function, for tests that only need uniform numbers. */
export function uniformStream(seed: number): () => number {
  const g = new Rng(seed);
  return () => g.next();
}
