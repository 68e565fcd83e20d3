// The life of one in-host suite run, shared by scripts/editor-test.mjs (code-server) and
// scripts/web-test.mjs (VS Code for the web): the editor server, the browser context (and a launch in
// progress) and the profile are torn down on every exit path — the end of the run, an error, a
// signal, the hard timeout — and the result is printed as the one line scripts/test-all.mjs reads.

/**
 * @param {object} o
 * @param {string} o.tag                 prefix of every line ("editor", "web")
 * @param {number} o.hardTimeoutMs       the whole run's limit (exit 124)
 * @param {(server: any) => Promise<void> | void} o.stopServer  how this route stops its server
 * @param {(run: object) => void} [o.onProcessExit]  synchronous last resort on process exit (kill a process group)
 * @param {(run: object) => string} [o.timeoutDetail] what to add to the timeout message (server output)
 * @param {boolean} [o.keepProfile]      leave the profile on disk (its path is printed)
 */
export function suiteRun({ tag, hardTimeoutMs, stopServer, onProcessExit, timeoutDetail, keepProfile = false }) {
  /** What a run holds; the route's main() fills it in as it starts things. */
  const run = { server: undefined, context: undefined, launching: undefined, profile: undefined, finished: false };

  async function cleanup() {
    if (run.launching && !run.context) {
      run.context = await Promise.race([run.launching.catch(() => undefined), new Promise((r) => setTimeout(r, 15_000).unref())]);
    }
    if (run.context) {
      // A wedged browser must not hold up the exit: give it 10 s, then playwright's exit handler kills it.
      await Promise.race([run.context.close().catch(() => {}), new Promise((r) => setTimeout(r, 10_000).unref())]);
      run.context = undefined;
    }
    if (run.server) { await stopServer(run.server); run.server = undefined; }
    if (run.profile) {
      if (keepProfile) console.error(`[${tag}] profile kept at ${run.profile.dir}`);
      run.profile.dispose();
      run.profile = undefined;
    }
  }

  /** Ends the run once (later calls are ignored): message to stderr, everything stopped, exit code. */
  async function finish(code, message) {
    if (run.finished) return;
    run.finished = true;
    if (message) console.error(`[${tag}] ${message}`);
    await cleanup();
    process.exit(code);
  }

  process.on('exit', () => {
    onProcessExit?.(run);
    if (run.profile) run.profile.dispose();
  });
  for (const sig of ['SIGINT', 'SIGTERM', 'SIGHUP']) process.on(sig, () => { void finish(130, `interrupted (${sig}); editor stopped`); });
  setTimeout(() => {
    const detail = timeoutDetail?.(run) ?? '';
    void finish(124, `FAILED: hard timeout of ${hardTimeoutMs / 1000} s reached; editor killed.${detail}`);
  }, hardTimeoutMs).unref();

  /**
   * Prints `[tag] result: exit N (P passing, F failing) in S s` and ends the run: a success without a
   * mocha summary counts as a failure (no tests ran).
   */
  function report(code, summary, startedAt, failedMessage) {
    const seconds = ((Date.now() - startedAt) / 1000).toFixed(1);
    const counts = summary.passing !== undefined
      ? ` (${summary.passing} passing, ${summary.failing ?? 0} failing${summary.pending ? `, ${summary.pending} pending` : ''})` : '';
    console.log(`[${tag}] result: exit ${code}${counts} in ${seconds} s`);
    if (summary.passing === undefined && code === 0) return finish(1, 'FAILED: the suite reported success but mocha printed no summary: no tests ran?');
    return finish(code === 0 ? 0 : 1, code === 0 ? undefined : failedMessage);
  }

  /** For `main().catch(…)`: a missing result is a timeout, anything else a setup error. */
  const fail = (err) => finish(err?.message?.startsWith('no result') ? 124 : 2, `FAILED: ${err?.stack ?? err}`);

  return { run, finish, report, fail };
}
