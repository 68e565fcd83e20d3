/**
 * Runs a function of a TypeScript module in a worker thread with a hard kill timeout, so a test of
 * "this call returns" cannot hang the test run: a synchronous loop cannot be interrupted from inside,
 * but a worker can be terminated. The timeout is a generous safety net (minutes of headroom over
 * the expected milliseconds), not a measurement; no test asserts on elapsed time.
 */
import * as path from 'node:path';
import { Worker } from 'node:worker_threads';

export interface Isolated<T> { ok: true; value: T }
export interface Killed { ok: false; reason: string }

const TSX = require.resolve('tsx/cjs');

export function inWorker<T>(modulePath: string, exportName: string, args: unknown[], hardKillMs: number): Promise<Isolated<T> | Killed> {
  const file = path.resolve(modulePath);
  const code = `
    require(${JSON.stringify(TSX)});
    const { parentPort, workerData } = require('node:worker_threads');
    const mod = require(${JSON.stringify(file)});
    Promise.resolve(mod[${JSON.stringify(exportName)}](...workerData.args))
      .then((value) => parentPort.postMessage({ ok: true, value }))
      .catch((e) => parentPort.postMessage({ ok: false, reason: 'threw: ' + (e && e.stack || e) }));
  `;
  return new Promise((resolve) => {
    const worker = new Worker(code, { eval: true, workerData: { args } });
    const timer = setTimeout(() => {
      void worker.terminate();
      resolve({ ok: false, reason: `did not return within ${hardKillMs} ms; killed` });
    }, hardKillMs);
    worker.once('message', (m: Isolated<T> | Killed) => {
      clearTimeout(timer);
      void worker.terminate();
      resolve(m);
    });
    worker.once('error', (e) => {
      clearTimeout(timer);
      resolve({ ok: false, reason: `worker error: ${e.message}` });
    });
  });
}
