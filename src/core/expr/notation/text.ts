/**
 * Text with a position map: every character of `text` remembers the offset in the original input it
 * came from, so errors found after a rewrite (LaTeX → plain, Unicode → ASCII, dialect → canonical)
 * still point into what the user wrote.
 */
export class MappedText {
  private readonly parts: string[] = [];
  private readonly offsets: number[] = [];

  /** Appends `s`; each of its characters maps to `origin` (or `origin + i` when `spread`). */
  push(s: string, origin: number, spread = false): void {
    this.parts.push(s);
    for (let i = 0; i < s.length; i++) this.offsets.push(spread ? origin + i : origin);
  }

  get length(): number {
    return this.offsets.length;
  }

  lastChar(): string {
    const last = this.parts[this.parts.length - 1];
    return last ? last.charAt(last.length - 1) : '';
  }

  finish(): { text: string; map: number[] } {
    return { text: this.parts.join(''), map: this.offsets };
  }
}

/** Maps an offset in a rewritten text back through its map (offsets past the end map to `end`). */
export function mapBack(map: readonly number[], offset: number, end: number): number {
  if (offset < 0) return 0;
  if (offset >= map.length) return end;
  return map[offset] ?? end;
}

/** Composes two maps: `outer` maps text2 → text1, `inner` maps text1 → input. */
export function composeMaps(outer: readonly number[], inner: readonly number[], innerEnd: number): number[] {
  return outer.map((o) => mapBack(inner, o, innerEnd));
}

export function isDigit(c: string): boolean {
  return c >= '0' && c <= '9';
}

export function isIdentStart(c: string): boolean {
  return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || c === '_' || c === '$';
}

export function isIdentChar(c: string): boolean {
  return isIdentStart(c) || isDigit(c);
}
