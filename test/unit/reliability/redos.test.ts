/**
 * No regular expression may backtrack catastrophically on adversarial lines (issue 8). Every regex
 * literal in src/core, and every stage's entry point, runs on long runs of the characters it cares
 * about inside a worker with a hard kill timeout. No time is asserted: the timeout only stops a run
 * that would otherwise take hours (catastrophic backtracking on 4,000–50,000 characters), with
 * minutes of headroom over the seconds the work takes.
 */
import assert from 'node:assert/strict';
import * as path from 'node:path';
import { inWorker } from './isolate';
import type { EntryReport, RegexReport } from './redos-work';
import { caredCharacters, regexLiterals } from './redos-work';

const WORK = path.join(__dirname, 'redos-work.ts');
const HARD_KILL_MS = 240_000;

describe('reliability: regular expressions on adversarial input', function () {
  this.timeout(HARD_KILL_MS + 30_000);

  it('finds the regex literals of src/core (so the scan below cannot pass by finding none)', () => {
    const found = regexLiterals();
    assert.ok(found.length >= 50, `only ${found.length} regex literals found`);
    assert.ok(found.some((f) => f.file.includes('detect/')) && found.some((f) => f.file.includes('expr/')));
    // The character model: a class or escape contributes a representative character.
    assert.ok(caredCharacters('\\s+\\d*[A-Z]').includes(' '));
    assert.ok(caredCharacters('\\s+\\d*[A-Z]').includes('7'));
  });

  it('every regex literal returns on runs of its characters at the line limit, with a mismatching tail', async () => {
    const r = await inWorker<RegexReport>(WORK, 'runRegexes', [], HARD_KILL_MS);
    assert.ok(r.ok, r.ok ? '' : r.reason);
    if (r.ok) assert.ok(r.value.runs > r.value.patterns * 10, `only ${r.value.runs} runs`);
  });

  it('notation, parse, detection and checking return on 50,000-character runs (refusing with a SlopewiseError at most)', async () => {
    const r = await inWorker<EntryReport>(WORK, 'runEntryPoints', [], HARD_KILL_MS);
    assert.ok(r.ok, r.ok ? '' : r.reason);
    if (r.ok) assert.ok(r.value.calls > 500);
  });

  it('regression: a comment line with a condition and a long word no longer costs ~180 ms per line (detect/comments.ts isCondition)', async () => {
    // 500 lines of 4,000 characters (a 2 MB file): ~90 s before the fix, ~1 s after.
    const r = await inWorker<number>(WORK, 'conditionLines', [500], 60_000);
    assert.ok(r.ok, r.ok ? '' : r.reason);
  });
});
