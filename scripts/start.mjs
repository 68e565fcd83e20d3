#!/usr/bin/env node
// `npm start`: build, package the .vsix, install it into a private profile of the cached code-server and
// serve the real editor on 127.0.0.1 with demo/ opened. Ctrl-C stops everything.
//
//   node scripts/start.mjs [--port 8080] [--workspace demo] [--no-build] [--smoke]
//
// --smoke (used by `npm test`): instead of waiting for Ctrl-C, drive Debian's Chromium to open
// demo/python/activations.py, wait until the installed .vsix reports diagnostics on it (its planted wrong
// derivative), save a screenshot to screenshots/start-smoke.png, stop everything and exit 0 (1 if no
// diagnostic appeared). This checks the packaged extension, which the in-host suites (run from the
// source folder) do not.
//
// The profile (settings, installed extension, editor state) lives in .vscode-test/start-profile/ and is
// reused between runs; the extension is reinstalled from the fresh .vsix each time.
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import path from 'node:path';
import { parseArgs } from 'node:util';
import { launchChromium } from './lib/browser.mjs';
import {
  ROOT, CACHE_DIR, ensureCodeServer, freePort, installVsix, killGroupNow, log, makeProfile, startCodeServer,
} from './lib/code-server.mjs';

const { values: opts } = parseArgs({
  options: {
    port: { type: 'string', default: process.env.PORT ?? '8080' },
    workspace: { type: 'string', default: path.join(ROOT, 'demo') },
    'no-build': { type: 'boolean', default: false },
    smoke: { type: 'boolean', default: false },
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
if (port === 0) port = await freePort();
else if (!(await portFree(port))) {
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
  if (!opts.smoke) log('stopping code-server…');
  if (server) await server.stop();
  server = undefined;
  if (!opts.smoke) log('stopped; nothing left running.');
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
if (opts.smoke) {
  let code = 1;
  const browserProfile = makeProfile('slopewise-start-smoke-');
  let context;
  try {
    context = await launchChromium(browserProfile);
    const page = context.pages()[0] ?? await context.newPage();
    await page.goto(url);
    await page.locator('.explorer-folders-view .monaco-list-row', { hasText: /^python$/ }).first().click({ timeout: 60_000 });
    await page.locator('.explorer-folders-view .monaco-list-row', { hasText: 'activations.py' }).first().click({ timeout: 30_000 });
    // The status bar's problems entry reads like "1 0" (errors, warnings); wait for errors > 0.
    const problems = page.locator('[id="status.problems"]');
    const t0 = Date.now();
    let text = '';
    while (Date.now() - t0 < 60_000) {
      text = (await problems.innerText().catch(() => '')).trim();
      const errors = Number(/\d+/.exec(text)?.[0] ?? 0);
      if (errors > 0) { code = 0; break; }
      await page.waitForTimeout(500);
    }
    fs.mkdirSync(path.join(ROOT, 'screenshots'), { recursive: true });
    await page.screenshot({ path: path.join(ROOT, 'screenshots', 'start-smoke.png') });
    console.log(code === 0
      ? `[start] smoke: the installed .vsix reports diagnostics on demo/python/activations.py (status bar: ${JSON.stringify(text)})`
      : `[start] smoke FAILED: no diagnostics from the installed .vsix within 60 s (status bar: ${JSON.stringify(text)}); see screenshots/start-smoke.png`);
  } catch (err) {
    console.error(`[start] smoke FAILED: ${err.message}`);
  } finally {
    await context?.close().catch(() => {});
    browserProfile.dispose();
  }
  await stop(code);
}
console.log(`
  Slopewise is running in a real editor (code-server, VS Code 1.100) with ${path.relative(ROOT, workspace) || workspace}/ open:

      ${url}

  Open that URL in a browser on this machine. Press Ctrl-C to stop.
`);
