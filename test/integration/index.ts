// In-host test runner for the Node extension host: the module named by `extensionTestsPath`.
// Used by both routes that host a Node extension host:
//   - scripts/editor-test.mjs (code-server, `npm run test:editor`), and
//   - scripts/desktop-test.mjs (@vscode/test-electron's runTests, `npm run test:desktop`).
// It loads every compiled `*.test.js` next to it (out/test/integration/**) into one Mocha run and rejects
// when any test fails or when no test was found, so the caller's exit code reflects the result.
import * as fs from 'node:fs';
import * as path from 'node:path';
import Mocha from 'mocha';
import { runMocha } from './support/run-mocha';

function findTests(dir: string): string[] {
  const out: string[] = [];
  for (const entry of fs.readdirSync(dir, { withFileTypes: true })) {
    const p = path.join(dir, entry.name);
    if (entry.isDirectory()) out.push(...findTests(p));
    else if (entry.name.endsWith('.test.js')) out.push(p);
  }
  return out.sort();
}

export function run(): Promise<void> {
  const mocha = new Mocha({
    ui: 'bdd',
    forbidOnly: true,
    color: false,
    reporter: 'spec',
    // Generous: the first activation in a cold extension host also loads mathjs.
    timeout: 60_000,
  });
  // SLOPEWISE_TEST_GREP narrows the run (set it in the environment of the editor that hosts the tests).
  const grep = process.env.SLOPEWISE_TEST_GREP;
  if (grep) mocha.grep(grep);

  const files = findTests(__dirname);
  if (files.length === 0) {
    return Promise.reject(new Error(`no in-host test files (*.test.js) under ${__dirname}: did the build run?`));
  }
  for (const f of files) mocha.addFile(f);

  return runMocha(mocha);
}
