#!/usr/bin/env node
// `npm run test:editor`: runs the in-host mocha suite (out/test/integration/index.js) inside a real
// VS Code extension host. The editor is code-server (VS Code 1.100.3) from npm, cached in .vscode-test/,
// driven by Debian's Chromium through playwright-core; the suite's result becomes this script's exit code.
//
//   node scripts/editor-test.mjs [--workspace DIR] [--extension DIR] [--tests FILE] [--grep TEXT]
//                                [--timeout SECONDS] [--verbose] [--keep-profile] [--headed]
//
// Defaults: workspace demo/, extension = repository root, tests out/test/integration/index.js, timeout 600 s.
// Exit codes: the suite's (0 passed, 1 failed); 2 setup error; 124 timeout; 130 interrupted.
import fs from 'node:fs';
import path from 'node:path';
import { parseArgs } from 'node:util';
import {
  ROOT, ensureCodeServer, ensureDebianPackages, makeProfile, startCodeServer, killGroupNow, log,
} from './lib/code-server.mjs';
import { launchChromium, enableTestPayload, runSuiteInPage } from './lib/browser.mjs';
import { suiteRun } from './lib/suite-run.mjs';

const { values: opts } = parseArgs({
  options: {
    workspace: { type: 'string', default: path.join(ROOT, 'demo') },
    extension: { type: 'string', default: ROOT },
    tests: { type: 'string' },
    grep: { type: 'string' },
    timeout: { type: 'string', default: '600' },
    verbose: { type: 'boolean', default: false },
    'keep-profile': { type: 'boolean', default: false },
    headed: { type: 'boolean', default: false },
  },
});

const extensionPath = path.resolve(opts.extension);
const testsPath = path.resolve(opts.tests ?? path.join(extensionPath, 'out', 'test', 'integration', 'index.js'));
const workspace = path.resolve(opts.workspace);
const hardTimeoutMs = Number(opts.timeout) * 1000;

const { run, finish, report, fail } = suiteRun({
  tag: 'editor',
  hardTimeoutMs,
  stopServer: (server) => server.stop(),
  // Every exit path takes the editor's process group down with it.
  onProcessExit: (r) => { if (r.server) killGroupNow(r.server.child); },
  timeoutDetail: (r) => {
    const tail = r.server ? r.server.output().split('\n').slice(-30).join('\n') : '';
    return tail ? `\nlast code-server output:\n${tail}` : '';
  },
  keepProfile: opts['keep-profile'],
});

async function main() {
  for (const [what, p] of [['extension folder', path.join(extensionPath, 'package.json')], ['workspace', workspace]]) {
    if (!fs.existsSync(p)) return finish(2, `${what} not found: ${p}`);
  }
  if (!fs.existsSync(testsPath)) {
    return finish(2, `in-host test entry not found: ${testsPath}\nRun the build first: npm run build`);
  }
  const manifest = JSON.parse(fs.readFileSync(path.join(extensionPath, 'package.json'), 'utf8'));
  if (manifest.main && !fs.existsSync(path.join(extensionPath, manifest.main))) {
    return finish(2, `the extension's main bundle ${manifest.main} is missing: run npm run build`);
  }

  ensureDebianPackages();
  const entry = ensureCodeServer();
  const t0 = Date.now();
  const profile = makeProfile('slopewise-editor-test-', { keep: opts['keep-profile'] });
  run.profile = profile;

  if (opts.grep) process.env.SLOPEWISE_TEST_GREP = opts.grep; // the extension host inherits it
  const server = await startCodeServer({ entry, profile, workspace, verbose: opts.verbose });
  run.server = server;
  log(`code-server ${server.url} (workspace ${path.relative(ROOT, workspace) || workspace})`);

  // The workbench resolves payload URIs against its remote authority; read it from the served page.
  const html = await (await fetch(`${server.url}?folder=${encodeURIComponent(workspace)}`)).text();
  const m = /remoteAuthority&quot;:&quot;([^&]+)&quot;/.exec(html) ?? /"remoteAuthority":"([^"]+)"/.exec(html);
  const authority = m ? m[1] : `127.0.0.1:${server.port}`;
  const remote = (p) => `vscode-remote://${authority}${p.split(path.sep).join('/')}`;
  const payload = [
    ['extensionDevelopmentPath', remote(extensionPath)],
    ['extensionTestsPath', remote(testsPath)],
  ];
  const url = `${server.url}?folder=${encodeURIComponent(workspace)}&payload=${encodeURIComponent(JSON.stringify(payload))}`;

  run.launching = launchChromium(profile, { headless: !opts.headed });
  const context = await run.launching;
  run.context = context;
  if (run.finished) return undefined;
  await enableTestPayload(context);
  const serverDied = new Promise((_r, reject) => {
    server.child.once('exit', (code, signal) => reject(new Error(`code-server exited during the run (code ${code}, signal ${signal})`)));
  });
  serverDied.catch(() => {});
  const remaining = Math.max(5_000, hardTimeoutMs - (Date.now() - t0) - 5_000);
  const { code, summary } = await runSuiteInPage(context, url, {
    timeoutMs: remaining,
    abort: serverDied,
    // The workbench's own start-up chatter; --verbose shows it.
    quietPrefixes: opts.verbose ? [] : ['ENOTFOUND open-vsx.org', 'Resolving connection token', 'Resolved connection token',
      'Creating a socket (', 'Updating additional builtin extensions cache', '[Service Worker]', 'ChatSessionStore:',
      'Creation of workbench contribution'],
  });
  return report(code, summary, t0, 'FAILED: in-host tests failed');
}

main().catch(fail);
