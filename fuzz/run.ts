/**
 * `npm run fuzz [-- --seed S --count N --jobs J --stages a,b --list]`
 *
 * Grammar-based and mutation fuzzing of every stage (see stages.ts), in worker threads. Inputs are
 * regenerated from (seed, stage, index), so every failure names a reproducible input. Failing inputs
 * are minimised and saved to fuzz/corpus/<stage>/, which test/unit/reliability/corpus.test.ts
 * replays. Ends with exactly one line `N inputs, C crashes, H hangs`; exits 1 if C + H > 0.
 *
 * Default seed 1 (repeatable in CI); `--seed random` picks one and prints it.
 */
import * as crypto from 'node:crypto';
import * as fs from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import { Worker } from 'node:worker_threads';
import { CORPUS_DIR, STAGES, encodeCorpus, type Stage } from './stages';
import type { Failure, FromWorker, Job, Mismatch } from './worker';

interface Args { seed: number; count: number; jobs: number; stages: string[] | null; list: boolean }

function parseArgs(argv: string[]): Args {
  const args: Args = { seed: 1, count: 100_000, jobs: Math.max(1, Math.min(2, os.cpus().length)), stages: null, list: false };
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i] as string;
    const value = (): string => {
      const v = a.includes('=') ? a.slice(a.indexOf('=') + 1) : argv[++i];
      if (v === undefined) usage(`${a} needs a value`);
      return v as string;
    };
    if (a.startsWith('--seed')) {
      const v = value();
      args.seed = v === 'random' ? crypto.randomInt(1, 2 ** 31) : Number(v);
      if (!Number.isInteger(args.seed)) usage(`--seed must be an integer or "random", got ${v}`);
    } else if (a.startsWith('--count')) {
      args.count = Number(value());
      if (!Number.isInteger(args.count) || args.count < 1) usage('--count must be a positive integer');
    } else if (a.startsWith('--jobs')) {
      args.jobs = Number(value());
      if (!Number.isInteger(args.jobs) || args.jobs < 1) usage('--jobs must be a positive integer');
    } else if (a.startsWith('--stages')) {
      args.stages = value().split(',').filter(Boolean);
      for (const s of args.stages) if (!STAGES.some((t) => t.name === s)) usage(`unknown stage ${s} (known: ${STAGES.map((t) => t.name).join(', ')})`);
    } else if (a === '--list') args.list = true;
    else usage(`unknown option ${a}`);
  }
  return args;
}

function usage(message: string): never {
  process.stderr.write(`fuzz: ${message}\nusage: npm run fuzz -- [--seed S|random] [--count N] [--jobs J] [--stages a,b] [--list]\n`);
  process.exit(2);
}

/** Inputs per stage, proportional to the weights, summing exactly to `count`. */
export function allocate(stages: readonly Stage[], count: number): Map<string, number> {
  const total = stages.reduce((s, t) => s + t.weight, 0);
  const out = new Map<string, number>();
  let used = 0;
  for (const s of stages) {
    const n = Math.max(1, Math.floor((count * s.weight) / total));
    out.set(s.name, n);
    used += n;
  }
  const first = stages[0] as Stage;
  out.set(first.name, Math.max(1, (out.get(first.name) ?? 0) + count - used));
  return out;
}

/** Inputs per job, so one job is about a second of work. */
const CHUNK: Record<string, number> = { notation: 400, parse: 150, 'parse-mutated': 300, derive: 8, inspect: 2, detect: 6, check: 3 };

interface Slot { worker: Worker; job: Job | null; reported: number; shared: Float64Array; started: number }

const TSX = require.resolve('tsx/cjs');
const WORKER = path.join(__dirname, 'worker.ts');

function spawnWorker(): { worker: Worker; shared: Float64Array } {
  const buffer = new SharedArrayBuffer(16);
  const code = `require(${JSON.stringify(TSX)}); require(${JSON.stringify(WORKER)});`;
  const worker = new Worker(code, { eval: true, workerData: { shared: buffer }, stdout: false, stderr: false });
  return { worker, shared: new Float64Array(buffer) };
}

function saveFailure(f: Failure): string {
  const dir = path.join(CORPUS_DIR, f.stage);
  fs.mkdirSync(dir, { recursive: true });
  const content = encodeCorpus(f.minimized);
  const hash = crypto.createHash('sha256').update(content).digest('hex').slice(0, 12);
  const file = path.join(dir, `${f.kind}-${hash}.txt`);
  if (!fs.existsSync(file)) fs.writeFileSync(file, content);
  return path.relative(process.cwd(), file);
}

async function main(): Promise<void> {
  const args = parseArgs(process.argv.slice(2));
  const stages = STAGES.filter((s) => args.stages === null || args.stages.includes(s.name));
  const counts = allocate(stages, args.count);
  if (args.list) {
    for (const s of stages) console.log(`${s.name.padEnd(14)} ${String(counts.get(s.name)).padStart(7)} inputs, budget ${s.budgetMs} ms`);
    return;
  }
  console.log(`fuzz: seed ${args.seed}, ${args.count} inputs over ${stages.length} stages, ${args.jobs} worker(s)`);
  // Slow stages first, so they spread over the workers; fast ones fill the gaps.
  const queue: Job[] = [];
  const order = [...stages].sort((a, b) => a.weight - b.weight);
  for (const s of order) {
    const n = counts.get(s.name) ?? 0;
    const chunk = CHUNK[s.name] ?? 50;
    for (let from = 0; from < n; from += chunk) queue.push({ stage: s.name, seed: args.seed, from, to: Math.min(n, from + chunk) });
  }
  const stats = new Map(stages.map((s) => [s.name, { inputs: 0, crashes: 0, hangs: 0, mismatches: 0, ms: 0, slowestMs: 0, slowestIndex: -1, slowUnconfirmed: 0 }]));
  const failures: Failure[] = [];
  const mismatches: Mismatch[] = [];
  const t0 = Date.now();
  let lastLine = 0;

  await new Promise<void>((resolve) => {
    const slots: Slot[] = [];
    let finished = 0;
    const next = (slot: Slot): void => {
      const job = queue.shift();
      slot.job = job ?? null;
      slot.reported = 0;
      if (!job) {
        void slot.worker.terminate();
        finished++;
        if (finished === args.jobs) resolve();
        return;
      }
      slot.started = Date.now();
      slot.worker.postMessage(job);
    };
    const attach = (slot: Slot): void => {
      slot.worker.on('message', (m: FromWorker) => {
        if (m.type === 'idle') { next(slot); return; }
        const st = stats.get(m.stage)!;
        st.inputs += m.done;
        slot.reported += m.done;
        st.ms += m.totalMs;
        st.slowUnconfirmed += m.slowUnconfirmed;
        if (m.slowestMs > st.slowestMs) { st.slowestMs = m.slowestMs; st.slowestIndex = m.slowestIndex; }
        for (const f of m.failures) {
          failures.push(f);
          if (f.kind === 'crash') st.crashes++; else st.hangs++;
          console.log(`  ${f.kind.toUpperCase()} ${f.stage}#${f.index}: ${f.message.slice(0, 300)}\n    minimised: ${JSON.stringify(f.minimized.text.slice(0, 300))} → ${saveFailure(f)}`);
        }
        for (const mm of m.mismatches) { mismatches.push(mm); st.mismatches++; }
        const total = [...stats.values()].reduce((s, x) => s + x.inputs, 0);
        if (Date.now() - lastLine > 15_000) {
          lastLine = Date.now();
          console.log(`  … ${total} inputs, ${((Date.now() - t0) / 1000).toFixed(0)} s`);
        }
      });
      slot.worker.on('error', (e) => {
        // A worker that dies (out of memory, stack) is a crash of the input it was on.
        const job = slot.job;
        if (job) {
          const index = slot.shared[0] ?? job.from;
          recordKill(slot, job, index, `worker died: ${e.message}`, 'crash');
        }
      });
    };
    const recordKill = (slot: Slot, job: Job, index: number, message: string, kind: 'crash' | 'hang'): void => {
      const stage = stages.find((s) => s.name === job.stage)!;
      const st = stats.get(job.stage)!;
      const unreported = Math.max(0, index - job.from - slot.reported);
      st.inputs += unreported + 1;
      const input = stage.generate(job.seed, index);
      const f: Failure = { stage: job.stage, index, kind, message, input, minimized: input, ms: Date.now() - slot.started };
      failures.push(f);
      if (kind === 'crash') st.crashes++; else st.hangs++;
      console.log(`  ${kind.toUpperCase()} ${job.stage}#${index}: ${message}\n    input: ${JSON.stringify(input.text.slice(0, 300))} → ${saveFailure(f)}`);
      if (index + 1 < job.to) queue.unshift({ ...job, from: index + 1 });
      void slot.worker.terminate();
      const fresh = spawnWorker();
      slot.worker = fresh.worker;
      slot.shared = fresh.shared;
      attach(slot);
      next(slot);
    };
    for (let i = 0; i < args.jobs; i++) {
      const w = spawnWorker();
      const slot: Slot = { worker: w.worker, shared: w.shared, job: null, reported: 0, started: Date.now() };
      slots.push(slot);
      attach(slot);
      next(slot);
    }
    const watchdog = setInterval(() => {
      for (const slot of slots) {
        const job = slot.job;
        const started = slot.shared[1] ?? 0;
        if (!job || started === 0) continue;
        const stage = stages.find((s) => s.name === job.stage)!;
        const hardMs = Math.max(stage.budgetMs * 5, 15_000);
        const elapsed = performance.timeOrigin + performance.now() - started;
        if (elapsed > hardMs) recordKill(slot, job, slot.shared[0] ?? job.from, `still running after ${Math.round(elapsed)} ms (budget ${stage.budgetMs} ms); killed`, 'hang');
      }
    }, 250);
    watchdog.unref();
  });

  const seconds = (Date.now() - t0) / 1000;
  console.log('');
  console.log(`${'stage'.padEnd(14)}${'inputs'.padStart(8)}${'crashes'.padStart(9)}${'hangs'.padStart(7)}${'mismatch'.padStart(10)}${'mean ms'.padStart(9)}${'slowest ms'.padStart(12)}${'budget ms'.padStart(11)}`);
  for (const s of stages) {
    const st = stats.get(s.name)!;
    console.log(`${s.name.padEnd(14)}${String(st.inputs).padStart(8)}${String(st.crashes).padStart(9)}${String(st.hangs).padStart(7)}${String(st.mismatches).padStart(10)}${(st.ms / Math.max(1, st.inputs)).toFixed(2).padStart(9)}${st.slowestMs.toFixed(0).padStart(12)}${String(s.budgetMs).padStart(11)}` +
      (st.slowUnconfirmed > 0 ? `  (${st.slowUnconfirmed} over budget once, not on the re-run)` : ''));
  }
  if (mismatches.length > 0) {
    const file = path.join(os.tmpdir(), `slopewise-fuzz-mismatches-${args.seed}.json`);
    fs.writeFileSync(file, JSON.stringify(mismatches, null, 1));
    console.log(`\n${mismatches.length} oracle mismatches (not counted as crashes), all in ${file}; first of each stage:`);
    const seen = new Set<string>();
    for (const m of mismatches) {
      if (seen.has(m.stage)) continue;
      seen.add(m.stage);
      console.log(`  ${m.stage}#${m.index}: ${JSON.stringify(m.input.text.slice(0, 200))} ${JSON.stringify(m.input.opts).slice(0, 200)}\n    ${m.message.slice(0, 300)}`);
    }
  }
  const inputs = [...stats.values()].reduce((s, x) => s + x.inputs, 0);
  const crashes = [...stats.values()].reduce((s, x) => s + x.crashes, 0);
  const hangs = [...stats.values()].reduce((s, x) => s + x.hangs, 0);
  console.log(`\ntime ${seconds.toFixed(1)} s, seed ${args.seed}`);
  console.log(`${inputs} inputs, ${crashes} crashes, ${hangs} hangs`);
  process.exitCode = crashes + hangs > 0 ? 1 : 0;
}

void main();
