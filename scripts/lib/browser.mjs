// Drives Debian's Chromium with playwright-core (never a downloaded browser) and runs an in-host test
// suite in a VS Code workbench page: the workbench reports the suite's result through
// window.codeAutomationExit(code) and forwards the extension host's console through
// window.codeAutomationLog(type, args).
import fs from 'node:fs';
import path from 'node:path';

export const CHROMIUM = '/usr/bin/chromium';
export const CHROMIUM_ARGS = [
  '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking',
  '--disable-component-update', '--disable-sync', '--disable-dev-shm-usage', '--no-default-browser-check',
];

/**
 * A persistent Chromium context on a fresh profile under `profile.dir`. Persistent (not incognito) with
 * third-party cookies allowed: webviews need their service worker, which a private window refuses.
 */
export async function launchChromium(profile, { headless = true, viewport = { width: 1400, height: 900 } } = {}) {
  if (!fs.existsSync(CHROMIUM)) throw new Error(`${CHROMIUM} not found: apt-get install -y chromium`);
  const { chromium } = await import('playwright-core');
  const dataDir = path.join(profile.dir, 'chromium');
  fs.mkdirSync(path.join(dataDir, 'Default'), { recursive: true });
  fs.writeFileSync(path.join(dataDir, 'Default', 'Preferences'),
    JSON.stringify({ profile: { cookie_controls_mode: 0, block_third_party_cookies: false } }));
  return chromium.launchPersistentContext(dataDir, {
    executablePath: CHROMIUM,
    headless,
    args: CHROMIUM_ARGS,
    env: { ...process.env, ...profile.env },
    viewport,
    timeout: 60_000,
    // The calling script owns signal handling (it must also stop the editor and remove the profile).
    handleSIGINT: false, handleSIGTERM: false, handleSIGHUP: false,
  });
}

/**
 * Makes the workbench honour the `payload` URL parameter (extensionDevelopmentPath/extensionTestsPath):
 * VS Code ≥ ~1.10x reads it only with developmentOptions.enableSmokeTestDriver in the page's
 * configuration, so the configuration element's data-settings attribute is patched as it is read.
 */
export async function enableTestPayload(context) {
  await context.addInitScript(() => {
    const original = Element.prototype.getAttribute;
    Element.prototype.getAttribute = function patchedGetAttribute(name) {
      const value = original.call(this, name);
      if (name === 'data-settings' && this.id === 'vscode-workbench-web-configuration' && value) {
        try {
          const config = JSON.parse(value);
          config.developmentOptions = { ...(config.developmentOptions ?? {}), enableSmokeTestDriver: true };
          return JSON.stringify(config);
        } catch {
          return value;
        }
      }
      return value;
    };
  });
}

function show(a) {
  if (typeof a === 'string') return a;
  try { return JSON.stringify(a); } catch { return String(a); }
}

/** console.log's printf-style formatting (%s %d %i %f %j %o %O %c %%), as the host's reporter uses it. */
export function formatLogArgs(args) {
  const list = Array.isArray(args) ? [...args] : [args];
  if (typeof list[0] !== 'string') return list.map(show).join(' ');
  let rest = list.slice(1);
  const head = list[0].replace(/%([sdifjoOc%])/g, (whole, k) => {
    if (k === '%') return '%';
    if (rest.length === 0) return whole;
    const v = rest[0];
    rest = rest.slice(1);
    switch (k) {
      case 'd': case 'i': return String(k === 'i' ? parseInt(v, 10) : Number(v));
      case 'f': return String(parseFloat(v));
      case 'c': return '';
      case 's': return typeof v === 'string' ? v : show(v);
      default: return show(v);
    }
  });
  return [head, ...rest.map(show)].join(' ');
}

/**
 * Opens `url` and resolves with the exit code the in-host suite reports. Rejects on timeout, page crash,
 * or `abort` (a promise that rejects, e.g. when the server dies). Collects mocha's summary lines.
 */
export async function runSuiteInPage(context, url, { timeoutMs, abort, onLog, quietPrefixes = [] } = {}) {
  const summary = { passing: undefined, failing: undefined, pending: undefined, lines: [] };
  let resolveExit;
  const exited = new Promise((r) => { resolveExit = r; });
  const page = context.pages()[0] ?? await context.newPage();
  await page.exposeFunction('codeAutomationExit', (code) => { resolveExit(Number(code)); });
  await page.exposeFunction('codeAutomationLog', (type, args) => {
    const text = formatLogArgs(args);
    if (process.env.SLOPEWISE_EDITOR_VERBOSE === '2') console.log(`[log:${type}] ${JSON.stringify(args)}`);
    for (const line of text.split('\n')) {
      const m = /^\s*(\d+) (passing|failing|pending)\b/.exec(line);
      if (m) summary[m[2]] = Number(m[1]);
      summary.lines.push(line);
    }
    if (quietPrefixes.some((p) => text.includes(p))) return;
    (onLog ?? ((t, s) => console.log(t === 'error' ? `[host:error] ${s}` : s)))(type, text);
  });
  page.on('crash', () => resolveExit(Promise.reject(new Error('the workbench page crashed'))));
  page.on('pageerror', (err) => { if (process.env.SLOPEWISE_EDITOR_VERBOSE) console.error(`[page] ${err.message}`); });
  let timer;
  const timeout = new Promise((_r, reject) => {
    timer = setTimeout(() => reject(new Error(`no result from the in-host suite within ${Math.round(timeoutMs / 1000)} s`)), timeoutMs);
  });
  try {
    await Promise.race([page.goto(url, { waitUntil: 'domcontentloaded', timeout: 60_000 }), timeout, ...(abort ? [abort] : [])]);
    const code = await Promise.race([exited, timeout, ...(abort ? [abort] : [])]);
    return { code, summary, page };
  } finally {
    clearTimeout(timer);
  }
}
