#!/usr/bin/env node
// `npm start`: build, package the .vsix, install it into a private profile of the cached code-server and
// serve the real editor on 127.0.0.1 with demo/ opened. Ctrl-C stops everything.
//
//   node scripts/start.mjs [--port 8080] [--workspace demo] [--no-build]
//
// The profile (settings, installed extension, editor state) lives in .vscode-test/start-profile/ and is
// reused between runs; the extension is reinstalled from the fresh .vsix each time.
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import path from 'node:path';
import { parseArgs } from 'node:util';
import {
  ROOT, CACHE_DIR, ensureCodeServer, freePort, installVsix, killGroupNow, log, makeProfile, startCodeServer,
} from './lib/code-server.mjs';

const { values: opts } = parseArgs({
  options: {
    port: { type: 'string', default: process.env.PORT ?? '8080' },
    workspace: { type: 'string', default: path.join(ROOT, 'demo') },
    'no-build': { type: 'boolean', default: false },
    verbose: { type: 'boolean', default: false },
  },
});
const VSIX = path.join(ROOT, 'out', 'slopewise.vsix');
const workspace = path.resolve(opts.workspace);

function step(title, cmd, args) {
  log(title);
  const r = spawnSync(cmd, args, { cwd: ROOT, stdio: 'inherit' });
  if (r.status !== 0) {
    console.error(`[start] FAILED: ${title} (exit ${r.status})`);
    process.exit(1);
  }
}

function portFree(port) {
  return new Promise((resolve) => {
    const srv = net.createServer();
    srv.once('error', () => resolve(false));
    srv.listen(port, '127.0.0.1', () => srv.close(() => resolve(true)));
  });
}

if (!fs.existsSync(workspace)) {
  console.error(`[start] workspace not found: ${workspace}`);
  process.exit(2);
}
if (!opts['no-build']) {
  step('building and packaging the extension (npm run package)…', process.platform === 'win32' ? 'npm.cmd' : 'npm', ['run', '--silent', 'package']);
}
if (!fs.existsSync(VSIX)) {
  console.error(`[start] ${path.relative(ROOT, VSIX)} not found: run npm run package`);
  process.exit(1);
}

const entry = ensureCodeServer();
const base = path.join(CACHE_DIR, 'start-profile');
const profile = makeProfile('unused', { keep: true, base });
log(`installing ${path.relative(ROOT, VSIX)} into the private profile ${path.relative(ROOT, base)}…`);
installVsix(entry, profile, VSIX);

let port = Number(opts.port);
if (!(await portFree(port))) {
  const other = await freePort();
  log(`port ${port} is busy; using ${other}`);
  port = other;
}

let server;
let stopping = false;
process.on('exit', () => { if (server) killGroupNow(server.child); });
async function stop(code) {
  if (stopping) return;
  stopping = true;
  log('stopping code-server…');
  if (server) await server.stop();
  server = undefined;
  log('stopped; nothing left running.');
  process.exit(code);
}
for (const sig of ['SIGINT', 'SIGTERM', 'SIGHUP']) process.on(sig, () => { stop(0); });

try {
  server = await startCodeServer({ entry, profile, workspace, port, verbose: opts.verbose });
} catch (err) {
  console.error(`[start] FAILED: ${err.message}`);
  process.exit(1);
}
server.child.on('exit', (code, signal) => {
  if (stopping) return;
  console.error(`[start] code-server exited (code ${code}, signal ${signal})`);
  server = undefined;
  process.exit(code ?? 1);
});

const url = `${server.url}?folder=${encodeURIComponent(workspace)}`;
console.log(`
  Slopewise is running in a real editor (code-server, VS Code 1.100) with ${path.relative(ROOT, workspace) || workspace}/ open:

      ${url}

  Open that URL in a browser on this machine. Press Ctrl-C to stop.
`);
