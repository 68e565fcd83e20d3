/** A small LRU of rendered hover cards, keyed by formula, variable, parameters and the settings used. */
import type { Config } from './config';

export class HoverCache {
  private readonly map = new Map<string, string>();

  constructor(private readonly capacity: number) {}

  static key(text: string, variable: string | undefined, params: Record<string, number> | undefined, config: Config): string {
    const p = params ? Object.keys(params).sort().map((k) => `${k}=${params[k]}`).join(',') : '';
    return JSON.stringify([text, variable ?? '', p, config.saturationThreshold, config.floatTypes.join(',')]);
  }

  get(key: string): string | undefined {
    const v = this.map.get(key);
    if (v !== undefined) {
      // Refresh recency.
      this.map.delete(key);
      this.map.set(key, v);
    }
    return v;
  }

  set(key: string, value: string): void {
    this.map.delete(key);
    this.map.set(key, value);
    while (this.map.size > this.capacity) {
      const oldest = this.map.keys().next().value;
      if (oldest === undefined) break;
      this.map.delete(oldest);
    }
  }

  clear(): void {
    this.map.clear();
  }

  get size(): number {
    return this.map.size;
  }
}
