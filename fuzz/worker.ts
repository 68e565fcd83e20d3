/**
 * Fuzz worker: runs a range of one stage's inputs and reports failures. Before each input it writes
 * the index and start time into shared memory, so the parent can kill it when one input runs past
 * the hard limit (a synchronous hang cannot be interrupted from inside).
 */
import { parentPort, workerData } from 'node:worker_threads';
import { minimize, signature } from './minimize';
import { stageByName, type FuzzInput, type Verdict } from './stages';

export interface Job { stage: string; seed: number; from: number; to: number }
export interface Failure {
  stage: string;
  index: number;
  kind: 'crash' | 'hang';
  message: string;
  input: FuzzInput;
  minimized: FuzzInput;
  ms: number;
}
export interface Mismatch { stage: string; index: number; message: string; input: FuzzInput }
export type FromWorker =
  | { type: 'progress'; stage: string; done: number; slowestMs: number; slowestIndex: number; totalMs: number; failures: Failure[]; mismatches: Mismatch[]; slowUnconfirmed: number }
  | { type: 'idle' };

const shared = new Float64Array(workerData.shared as SharedArrayBuffer);
const now = (): number => performance.timeOrigin + performance.now();

function timed(run: (i: FuzzInput) => Verdict, input: FuzzInput): { v: Verdict; ms: number } {
  const t0 = now();
  shared[1] = t0;
  const v = run(input);
  shared[1] = 0;
  return { v, ms: now() - t0 };
}

function runJob(job: Job): void {
  const stage = stageByName(job.stage);
  if (!stage) throw new Error(`unknown stage ${job.stage}`);
  let failures: Failure[] = [];
  let mismatches: Mismatch[] = [];
  let done = 0;
  let slowestMs = 0;
  let slowestIndex = -1;
  let totalMs = 0;
  let slowUnconfirmed = 0;
  let lastReport = now();
  const flush = (): void => {
    parentPort!.postMessage({ type: 'progress', stage: job.stage, done, slowestMs, slowestIndex, totalMs, failures, mismatches, slowUnconfirmed } satisfies FromWorker);
    failures = [];
    mismatches = [];
    done = 0;
    totalMs = 0;
    slowUnconfirmed = 0;
    lastReport = now();
  };
  for (let i = job.from; i < job.to; i++) {
    const input = stage.generate(job.seed, i);
    shared[0] = i;
    const { v, ms } = timed(stage.run, input);
    done++;
    totalMs += ms;
    if (ms > slowestMs) { slowestMs = ms; slowestIndex = i; }
    if (v.kind === 'crash') {
      const sig = signature(v.message);
      const minimized = minimize(input, stage.run, (w) => w.kind === 'crash' && signature(w.message) === sig);
      failures.push({ stage: stage.name, index: i, kind: 'crash', message: v.message, input, minimized, ms });
    } else if (ms > stage.budgetMs) {
      // Confirm: shared machines pause; a hang must be over budget twice.
      const again = timed(stage.run, input);
      if (again.ms > stage.budgetMs) {
        // Minimise by time: a candidate still hangs when it runs over budget (few runs: each may be slow).
        const slow = (c: FuzzInput): Verdict => (timed(stage.run, c).ms > stage.budgetMs ? { kind: 'crash', message: 'slow' } : { kind: 'ok' });
        const minimized = minimize(input, slow, (w) => w.kind === 'crash', 40);
        failures.push({ stage: stage.name, index: i, kind: 'hang', message: `${Math.round(ms)} ms and ${Math.round(again.ms)} ms, budget ${stage.budgetMs} ms`, input, minimized, ms });
      } else slowUnconfirmed++;
    }
    if (v.kind === 'ok' && v.mismatch !== undefined) mismatches.push({ stage: stage.name, index: i, message: v.mismatch, input });
    if (failures.length > 0 || now() - lastReport > 500) flush();
  }
  flush();
}

parentPort!.on('message', (job: Job) => {
  runJob(job);
  parentPort!.postMessage({ type: 'idle' } satisfies FromWorker);
});
