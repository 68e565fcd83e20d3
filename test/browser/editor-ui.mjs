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
  // Clicking inside the plot makes its group the active one; files should open in the first group.
  await page.keyboard.press('Control+1');
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
  for (let attempt = 0; attempt < 20; attempt++) {
    const p = await pointOnce(page, text);
    if (p.x > 0 && p.y > 0) return p;
    await page.waitForTimeout(300); // the line is still being laid out
  }
  throw new Error(`"${text}" has no position on screen`);
}

async function pointOnce(page, text) {
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
  console.log(`    pointer at ${Math.round(p.x)},${Math.round(p.y)} over "${text}"`);
  await page.mouse.move(p.x - 20, p.y);
  await page.mouse.move(p.x, p.y, { steps: 4 });
  // A mouse hover in a headless window does not always open the widget: fall back to the editor's
  // own "Show Hover" (Ctrl+K Ctrl+I) at the same place.
  const shown = await page.locator('.monaco-hover-content').first().waitFor({ timeout: 4000 }).then(() => true, () => false);
  if (!shown) {
    await page.mouse.click(p.x, p.y);
    await page.keyboard.press('Control+K');
    await page.keyboard.press('Control+I');
  }
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

async function waitForFile(file, timeoutMs = 15_000) {
  const end = Date.now() + timeoutMs;
  while (Date.now() < end) {
    if (fs.existsSync(file) && fs.statSync(file).size > 0) return true;
    await new Promise((r) => setTimeout(r, 200));
  }
  return false;
}

async function setTheme(page, name) {
  // Ctrl+K Ctrl+T: the theme picker (its list is local; the marketplace entry is never chosen).
  await page.keyboard.press('Control+K');
  await page.keyboard.press('Control+T');
  const input = page.locator('.quick-input-widget input');
  await input.waitFor();
  await page.locator('.quick-input-list .monaco-list-row').first().waitFor();
  await page.keyboard.type(name, { delay: 20 });
  await page.locator('.quick-input-list .monaco-list-row', { hasText: name }).first().waitFor({ timeout: 10_000 });
  await page.keyboard.press('Enter');
  await page.waitForTimeout(1000);
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
      chips: document.querySelectorAll('#formulas .chip').length,
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
  check(/f′ /.test(cardText) && /f″ /.test(cardText), 'the hover card shows f′ and f″');
  check(/saturates/.test(cardText), 'the hover card states the saturating ranges');
  check(/Plot/.test(cardText) && /Copy f′/.test(cardText), 'the hover card links to the plot and the copy command');
  const img = hover.locator('img').first();
  const imgOk = await img.evaluate((el) => el.complete && el.naturalWidth > 0).catch(() => false);
  check(imgOk, 'the hover card\'s SVG plot loads (data URI image)');
  await hover.screenshot({ path: path.join(SHOTS, 'hover-light.png') });
  await page.screenshot({ path: path.join(SHOTS, 'hover-light-window.png') });
  // The card's link runs the plot command with the formula as its argument (a command URI).
  await hover.locator('a', { hasText: 'Plot' }).first().click();
  const fromLink = await chartFrame(page);
  await fromLink.waitForFunction(() => Number(document.getElementById('chart')?.dataset.marks) > 0, undefined, { timeout: 30_000 });
  check(await fromLink.locator('#formulas .chip', { hasText: '1.5' }).count() === 1, 'the hover\'s Plot link plots that formula');

  // 2. Diagnostic on the planted bug.
  console.log('diagnostics');
  await page.mouse.move(5, 5);
  await page.keyboard.press('Escape');
  const squiggle = page.locator('.monaco-editor .squiggly-error').first();
  await squiggle.waitFor({ timeout: 30_000 });
  check(true, 'the planted wrong derivative is underlined as an error');
  await hoverText(page, 'soft_floor_grad(x):');
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
  await frame.locator('#formulas .chip', { hasText: 'gelu_sigmoid' }).waitFor({ timeout: 30_000 });
  await frame.waitForFunction(() => document.querySelectorAll('#chart svg .mark-rect path').length > 0, undefined, { timeout: 15_000 }).catch(() => {});
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

  // Export: the SVG button hands the chart to the host, which asks where to save it.
  console.log('export');
  const target = `/tmp/slopewise-browser-${process.pid}.svg`;
  await frame.locator('#export-svg').click();
  const dialog = page.locator('.quick-input-widget input');
  await dialog.waitFor({ timeout: 15_000 });
  // The simple save dialog opens with the suggested name filled in; replace it once it is there.
  await page.waitForFunction(() => /slopewise-plot\.svg/.test(document.querySelector('.quick-input-widget input')?.value ?? ''), undefined,
    { timeout: 15_000 }).catch(() => {});
  await dialog.fill(target);
  await page.waitForTimeout(300);
  await page.keyboard.press('Enter');
  const saved = await waitForFile(target);
  check(saved && fs.readFileSync(target, 'utf8').startsWith('<svg'), 'Export SVG saves an SVG file through the save dialog');
  if (saved) fs.rmSync(target);
  const png = `/tmp/slopewise-browser-${process.pid}.png`;
  await frame.locator('#export-png').click();
  await dialog.waitFor({ timeout: 15_000 });
  await page.waitForFunction(() => /slopewise-plot\.png/.test(document.querySelector('.quick-input-widget input')?.value ?? ''), undefined,
    { timeout: 15_000 }).catch(() => {});
  await dialog.fill(png);
  await page.waitForTimeout(300);
  await page.keyboard.press('Enter');
  const pngSaved = await waitForFile(png);
  // PNG signature (ISO/IEC 15948 / RFC 2083): 89 50 4E 47 0D 0A 1A 0A.
  check(pngSaved && fs.readFileSync(png).subarray(0, 8).equals(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a])),
    'Export PNG saves a PNG file');
  if (pngSaved) fs.rmSync(png);

  // Sliders: a formula with a parameter (the Rust ELU's ALPHA) gets one, and moving it redraws.
  console.log('slider');
  await openFromExplorer(page, ['rust', 'src', 'act.rs']);
  await clickText(page, 'ALPHA * (x.exp() - 1.0)');
  await runCommand(page, 'Slopewise: Plot Formula at Cursor or Selection');
  await frame.waitForFunction(() => document.querySelectorAll('#params input[type="range"]').length > 0, undefined, { timeout: 30_000 });
  const y0 = await frame.evaluate(() => document.querySelector('#chart svg .mark-line path')?.getAttribute('d'));
  await frame.locator('#params input[type="range"]').first().evaluate((el) => {
    el.value = String(Number(el.max) * 0.9);
    el.dispatchEvent(new Event('input', { bubbles: true }));
  });
  await frame.waitForFunction((d) => document.querySelector('#chart svg .mark-line path')?.getAttribute('d') !== d, y0, { timeout: 15_000 })
    .then(() => check(true, 'moving the parameter slider recomputes the curves'), () => check(false, 'moving the parameter slider recomputes the curves'));
  await page.waitForTimeout(600);
  await page.screenshot({ path: path.join(SHOTS, 'plot-slider-light.png') });
  await openFromExplorer(page, ['python', 'activations.py']);

  // 4. Dark theme: the user's settings file changes, the workbench and the chart follow.
  console.log('dark theme');
  await setTheme(page, 'Dark Modern');
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
  await setTheme(page, 'Dark High Contrast');
  await page.setViewportSize({ width: 980, height: 640 });
  await page.waitForTimeout(2000);
  await page.screenshot({ path: path.join(SHOTS, 'plot-hc-narrow.png') });
  marks = await marksIn(frame);
  check(marks.lines >= 3, 'the chart (now the ELU with f, f′, f″) survives the theme switch and a narrow window');

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
