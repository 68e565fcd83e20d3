/* eslint-disable @typescript-eslint/no-require-imports -- a CommonJS script loaded by node directly */
// Loaded with `node --require` in front of the CLI: reports the process's peak resident set size
// (kB, from getrusage via process.resourceUsage) on stderr when it exits, for the bench.
'use strict';
process.on('exit', () => {
  require('node:fs').writeSync(2, `\nSLOPEWISE_BENCH_MAXRSS_KB ${process.resourceUsage().maxRSS}\n`);
});
