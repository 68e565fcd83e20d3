#!/usr/bin/env node
// A person's view of the extension in the real editor: code-server (the same cached editor the in-host
// tests use) with demo/ open and the extension loaded from this checkout, driven by Chromium through
// playwright-core. Opens a demo file from the Explorer, hovers a formula, plots it, finds the chart's
// marks inside the webview frame, and saves screenshots to screenshots/ (git-ignored), in a light and a
// dark theme and in a narrow window.
//
//   node test/browser/editor-ui.mjs [--headed] [--keep-profile]
//
// Needs `npm run build` first. Exit 0 when every check passed, 1 otherwise, 2 on a setup error.
import fs from 'node:fs';
import path from 'node:path';
import { parseArgs } from 'node:util';
import {
  ROOT, ensureCodeServer, ensureDebianPackages, makeProfile, startCodeServer, killGroupNow, log,
} from '../../scripts/lib/code-server.mjs';
import { launchChromium, enableTestPayload } from '../../scripts/lib/browser.mjs';

const { values: opts } = parseArgs({
  options: { headed: { type: 'boolean', default: false }, 'keep-profile': { type: 'boolean', default: false } },
});

const SHOTS = path.join(ROOT, 'screenshots');
const workspace = path.join(ROOT, 'demo');
let server;
let context;
let profile;
let page;
const failures = [];

function check(ok, what) {
  console.log(`${ok ? '  ✔' : '  ✘'} ${what}`);
  if (!ok) failures.push(what);
}

async function cleanup() {
  if (context) await Promise.race([context.close().catch(() => {}), new Promise((r) => setTimeout(r, 10_000).unref())]);
  context = undefined;
  if (server) await server.stop();
  server = undefined;
  if (profile) profile.dispose();
  profile = undefined;
}
process.on('exit', () => { if (server) killGroupNow(server.child); });
for (const sig of ['SIGINT', 'SIGTERM']) process.on(sig, () => { void cleanup().then(() => process.exit(130)); });

function writeSettings(extra) {
  const file = path.join(profile.userDataDir, 'User', 'settings.json');
  const settings = JSON.parse(fs.readFileSync(file, 'utf8'));
  fs.writeFileSync(file, JSON.stringify({ ...settings, ...extra }, null, 2));
}

/** Clicks through the Explorer: folder rows, then the file (keyboard Quick Open does not open files headless). */
async function openFromExplorer(page, parts) {
  await page.keyboard.press('Control+Shift+E');
  for (const name of parts) {
    const row = page.locator(`.explorer-folders-view .monaco-list-row[aria-label^="${name}"]`).first();
    await row.waitFor({ timeout: 30_000 });
    const expanded = await row.getAttribute('aria-expanded');
    if (expanded !== 'true') await row.click();
  }
  await page.locator(`.tabs-container .tab[aria-label^="${parts.at(-1)}"]`).first().waitFor({ timeout: 30_000 });
  await page.locator('.monaco-editor .view-lines').first().waitFor();
}

/**
 * The screen point in the middle of `text` on a visible editor line: the rectangle of that substring,
 * measured with a DOM Range over the line's text nodes (the editor splits lines into token spans).
 */
async function pointOf(page, text) {
  const line = page.locator('.monaco-editor .view-line', { hasText: text }).first();
  await line.waitFor({ timeout: 15_000 });
  const box = await line.evaluate((el, needle) => {
    const walker = document.createTreeWalker(el, NodeFilter.SHOW_TEXT);
    const nodes = [];
    let full = '';
    for (let n = walker.nextNode(); n; n = walker.nextNode()) { nodes.push([n, full.length]); full += n.textContent; }
    const at = full.replace(/\u00a0/g, ' ').indexOf(needle);
    if (at < 0) return null;
    const mid = at + Math.floor(needle.length / 2);
    const [node, base] = nodes.filter(([, b]) => b <= mid).at(-1);
    const r = document.createRange();
    r.setStart(node, mid - base);
    r.setEnd(node, Math.min(node.textContent.length, mid - base + 1));
    const rect = r.getBoundingClientRect();
    return { x: rect.x + rect.width / 2, y: rect.y + rect.height / 2 };
  }, text);
  if (!box) throw new Error(`"${text}" not found on the line`);
  return box;
}

async function hoverText(page, text) {
  const p = await pointOf(page, text);
  await page.mouse.move(p.x - 20, p.y);
  await page.mouse.move(p.x, p.y, { steps: 4 });
}

async function clickText(page, text) {
  const p = await pointOf(page, text);
  await page.mouse.click(p.x, p.y);
}

async function runCommand(page, title) {
  await page.keyboard.press('F1');
  const input = page.locator('.quick-input-widget input');
  await input.waitFor();
  await input.fill(`>${title}`);
  const item = page.locator('.quick-input-list .monaco-list-row', { hasText: title }).first();
  await item.waitFor({ timeout: 15_000 });
  await page.keyboard.press('Enter');
}

/** The webview's inner frame holding the chart (VS Code nests the content one iframe deep). */
async function chartFrame(page, timeoutMs = 30_000) {
  const end = Date.now() + timeoutMs;
  while (Date.now() < end) {
    for (const f of page.frames()) {
      try {
        if (await f.locator('#chart svg').count() > 0) return f;
      } catch { /* frame navigated away */ }
    }
    await page.waitForTimeout(250);
  }
  throw new Error('no webview frame with a chart');
}

async function marksIn(frame) {
  return frame.evaluate(() => {
    const svg = document.querySelector('#chart svg');
    const count = (sel) => svg ? svg.querySelectorAll(sel).length : 0;
    return {
      lines: count('.mark-line path'), rects: count('.mark-rect path'), rules: count('.mark-rule line'),
      symbols: count('.mark-symbol path'), reported: Number(document.getElementById('chart')?.dataset.marks ?? 'NaN'),
      axisTitles: [...(svg?.querySelectorAll('.role-axis-title text') ?? [])].map((t) => t.textContent),
    };
  });
}

async function main() {
  if (!fs.existsSync(path.join(ROOT, 'out', 'extension.js')) || !fs.existsSync(path.join(ROOT, 'media', 'dist', 'plot.js'))) {
    console.error('[browser] build first: npm run build');
    process.exit(2);
  }
  fs.mkdirSync(SHOTS, { recursive: true });
  ensureDebianPackages();
  const entry = ensureCodeServer();
  profile = makeProfile('slopewise-browser-', { keep: opts['keep-profile'] });
  writeSettings({ 'workbench.colorTheme': 'Default Light Modern', 'editor.hover.delay': 200, 'window.commandCenter': false,
    'workbench.layoutControl.enabled': false, 'chat.commandCenter.enabled': false });
  server = await startCodeServer({ entry, profile, workspace });
  log(`code-server ${server.url}`);
  const html = await (await fetch(`${server.url}?folder=${encodeURIComponent(workspace)}`)).text();
  const m = /remoteAuthority&quot;:&quot;([^&]+)&quot;/.exec(html) ?? /"remoteAuthority":"([^"]+)"/.exec(html);
  const authority = m ? m[1] : `127.0.0.1:${server.port}`;
  const payload = [['extensionDevelopmentPath', `vscode-remote://${authority}${ROOT}`]];
  const url = `${server.url}?folder=${encodeURIComponent(workspace)}&payload=${encodeURIComponent(JSON.stringify(payload))}`;

  context = await launchChromium(profile, { headless: !opts.headed, viewport: { width: 1440, height: 900 } });
  await enableTestPayload(context);
  page = context.pages()[0] ?? await context.newPage();
  await page.goto(url, { waitUntil: 'domcontentloaded', timeout: 60_000 });
  await page.locator('.monaco-workbench').waitFor({ timeout: 60_000 });
  await page.waitForTimeout(3000);

  // 1. Hover a docstring formula.
  console.log('hover');
  await openFromExplorer(page, ['python', 'activations.py']);
  await hoverText(page, '1.5 * x / (1 + |x|)');
  const hover = page.locator('.monaco-hover-content', { hasText: 'f′' }).first();
  await hover.waitFor({ timeout: 30_000 });
  await page.waitForTimeout(500);
  const cardText = await hover.innerText();
  check(/f′\(x\)/.test(cardText), 'the hover card shows f′(x)');
  check(/saturates/.test(cardText), 'the hover card states the saturating ranges');
  check(/Open plot/.test(cardText) && /Copy f′/.test(cardText), 'the hover card links to the plot and the copy command');
  const img = hover.locator('img').first();
  const imgOk = await img.evaluate((el) => el.complete && el.naturalWidth > 0).catch(() => false);
  check(imgOk, 'the hover card\'s SVG plot loads (data URI image)');
  await hover.screenshot({ path: path.join(SHOTS, 'hover-light.png') });
  await page.screenshot({ path: path.join(SHOTS, 'hover-light-window.png') });

  // 2. Diagnostic on the planted bug.
  console.log('diagnostics');
  await page.mouse.move(5, 5);
  await page.keyboard.press('Escape');
  const squiggle = page.locator('.monaco-editor .squiggly-error').first();
  await squiggle.waitFor({ timeout: 30_000 });
  check(true, 'the planted wrong derivative is underlined as an error');
  await squiggle.hover();
  const diagHover = page.locator('.monaco-hover-content', { hasText: 'derivative-mismatch' }).first();
  await diagHover.waitFor({ timeout: 15_000 }).catch(() => {});
  check(await diagHover.count() > 0, 'hovering the squiggle shows the rule id derivative-mismatch');
  await page.screenshot({ path: path.join(SHOTS, 'diagnostic-light.png') });

  // 3. Plot the formula at the cursor.
  console.log('plot');
  await page.mouse.move(5, 5);
  await page.keyboard.press('Escape');
  await clickText(page, 'x * sigmoid(1.702 * x)');
  await runCommand(page, 'Slopewise: Plot Formula at Cursor or Selection');
  const frame = await chartFrame(page);
  await frame.waitForFunction(() => Number(document.getElementById('chart')?.dataset.marks) > 0, undefined, { timeout: 30_000 });
  let marks = await marksIn(frame);
  console.log(`    marks: ${JSON.stringify(marks)}`);
  check(marks.lines >= 2, 'the chart draws f and f′ as lines');
  check(marks.rects >= 1, 'the chart shades the saturating range');
  check(marks.reported > 0, 'the webview reports its mark count');
  check(marks.axisTitles.includes('x') && marks.axisTitles.includes('value'), 'both axes are titled');
  await page.waitForTimeout(500);
  await page.screenshot({ path: path.join(SHOTS, 'plot-light.png') });

  // Compare a second formula and turn on f″.
  await page.locator('.monaco-editor .view-lines').first().click({ position: { x: 5, y: 5 } });
  await clickText(page, '1.5 * x / (1 + |x|)');
  await runCommand(page, 'Slopewise: Add Formula at Cursor to the Open Plot');
  await frame.waitForFunction(() => document.querySelectorAll('#formulas .chip').length === 2, undefined, { timeout: 30_000 });
  await frame.locator('#show-d2').check();
  await frame.waitForFunction(() => Number(document.getElementById('chart')?.dataset.layers) === 6, undefined, { timeout: 15_000 });
  marks = await marksIn(frame);
  check(marks.lines >= 6, 'two formulas × three curves are drawn');
  // Zoom with the button: the host resamples and the x range text follows.
  const before = await frame.locator('#domain-text').innerText();
  await frame.locator('#zoom-in').click();
  await frame.waitForFunction((b) => document.getElementById('domain-text')?.textContent !== b, before, { timeout: 10_000 });
  check(true, 'zooming changes the x range');
  await page.waitForTimeout(800);
  await page.screenshot({ path: path.join(SHOTS, 'plot-compare-light.png') });

  // 4. Dark theme: the user's settings file changes, the workbench and the chart follow.
  console.log('dark theme');
  writeSettings({ 'workbench.colorTheme': 'Default Dark Modern' });
  await page.waitForFunction(() => document.querySelector('.monaco-workbench')?.classList.contains('vs-dark'), undefined, { timeout: 20_000 });
  await page.waitForTimeout(1500);
  const labelColour = await frame.evaluate(() => getComputedStyle(document.querySelector('#chart svg .role-axis-label text') ?? document.body).fill);
  check(labelColour && !/rgb\(0, 0, 0\)|#000/.test(labelColour), `axis labels follow the dark theme (${labelColour})`);
  await page.screenshot({ path: path.join(SHOTS, 'plot-dark.png') });
  await hoverText(page, '1.5 / (1 + |x|)^2');
  await page.locator('.monaco-hover-content', { hasText: 'f′' }).first().waitFor({ timeout: 30_000 });
  await page.waitForTimeout(400);
  await page.locator('.monaco-hover-content', { hasText: 'f′' }).first().screenshot({ path: path.join(SHOTS, 'hover-dark.png') });

  // 5. High contrast, narrow window: still legible.
  console.log('high contrast, narrow');
  await page.mouse.move(5, 5);
  await page.keyboard.press('Escape');
  writeSettings({ 'workbench.colorTheme': 'Default High Contrast' });
  await page.setViewportSize({ width: 980, height: 640 });
  await page.waitForTimeout(2000);
  await page.screenshot({ path: path.join(SHOTS, 'plot-hc-narrow.png') });
  marks = await marksIn(frame);
  check(marks.lines >= 6, 'the chart survives the theme switch and a narrow window');

  console.log(failures.length ? `FAILED: ${failures.length} check(s)` : 'all checks passed');
  console.log(`screenshots in ${path.relative(ROOT, SHOTS)}/`);
  return failures.length ? 1 : 0;
}

main().then(async (code) => { await cleanup(); process.exit(code); },
  async (err) => {
    console.error(`[browser] FAILED: ${err?.stack ?? err}`);
    if (page) await page.screenshot({ path: path.join(SHOTS, 'failure.png') }).catch(() => {});
    await cleanup();
    process.exit(1);
  });
