/**
 * Delta debugging (Zeller's ddmin, simplified): removes chunks of lines, then of characters, while the
 * input still fails the same way. Bounded by a number of runs, so a slow stage cannot stall the run.
 */
import type { FuzzInput, Verdict } from './stages';

/** A crash's identity: its message without quoted text and numbers (those change as the input shrinks). */
export function signature(message: string): string {
  return message.replace(/'[^']*'|"[^"]*"|`[^`]*`/g, '').replace(/[\d.]+/g, '#').slice(0, 60);
}

function ddmin(parts: string[], join: string, fails: (text: string) => boolean, budget: { runs: number }): string[] {
  let current = parts;
  let n = 2;
  while (current.length >= 2 && budget.runs > 0) {
    const size = Math.ceil(current.length / n);
    let reduced = false;
    for (let i = 0; i < current.length && budget.runs > 0; i += size) {
      const candidate = current.slice(0, i).concat(current.slice(i + size));
      budget.runs--;
      if (candidate.length > 0 && fails(candidate.join(join))) {
        current = candidate;
        n = Math.max(n - 1, 2);
        reduced = true;
        break;
      }
    }
    if (!reduced) {
      if (n >= current.length) break;
      n = Math.min(current.length, n * 2);
    }
  }
  return current;
}

/** The smallest input found that still gets a verdict `same` as the original. */
export function minimize(input: FuzzInput, run: (i: FuzzInput) => Verdict, same: (v: Verdict) => boolean, maxRuns = 1500): FuzzInput {
  const budget = { runs: maxRuns };
  const fails = (text: string): boolean => same(run({ text, opts: input.opts }));
  let text = input.text;
  if (text.includes('\n')) text = ddmin(text.split('\n'), '\n', fails, budget).join('\n');
  text = ddmin([...text], '', fails, budget).join('');
  return { text, opts: input.opts };
}
