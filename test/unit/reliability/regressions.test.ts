/**
 * Regressions for hangs the fuzzer found (issue 8), each in a worker with a hard kill timeout: the
 * inputs took 2^depth work before their fix, so at these sizes they would not return for hours;
 * after it they take milliseconds. No time is asserted.
 */
import assert from 'node:assert/strict';
import * as path from 'node:path';
import { inWorker } from './isolate';

const WORK = path.join(__dirname, 'redos-work.ts');

describe('reliability: regressions from fuzzing', function () {
  this.timeout(120_000);

  it('detection: 40 nested calls in a function body return (stmt.ts rendered every call twice: fuzz/corpus/detect/hang-*.txt)', async () => {
    const r = await inWorker<number>(WORK, 'nestedCalls', [40], 90_000);
    assert.ok(r.ok, r.ok ? '' : r.reason);
  });
});
