#!/usr/bin/env node
// `npm run test:desktop`: the same in-host suite (out/test/integration/index.js) in a desktop VS Code,
// through @vscode/test-electron's runTests. It downloads VS Code from Microsoft's update server unless
// you name an installed one:
//
//   node scripts/desktop-test.mjs [--code /path/to/code] [--version 1.100.3] [--workspace DIR]
//   (or VSCODE_EXECUTABLE=/path/to/code)
//
// On machines without that server (only npm and Debian reachable) use `npm run test:editor` instead.
import fs from 'node:fs';
import path from 'node:path';
import { parseArgs } from 'node:util';
import { fileURLToPath } from 'node:url';

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const { values: opts } = parseArgs({
  options: {
    code: { type: 'string', default: process.env.VSCODE_EXECUTABLE },
    version: { type: 'string', default: '1.100.3' },
    workspace: { type: 'string', default: path.join(ROOT, 'demo') },
  },
});

const extensionTestsPath = path.join(ROOT, 'out', 'test', 'integration', 'index.js');
if (!fs.existsSync(extensionTestsPath)) {
  console.error(`[desktop] ${path.relative(ROOT, extensionTestsPath)} is missing: run npm run build first`);
  process.exit(2);
}

const { runTests } = await import('@vscode/test-electron');
try {
  await runTests({
    extensionDevelopmentPath: ROOT,
    extensionTestsPath,
    ...(opts.code ? { vscodeExecutablePath: path.resolve(opts.code) } : { version: opts.version }),
    cachePath: path.join(ROOT, '.vscode-test', 'desktop'),
    launchArgs: [path.resolve(opts.workspace), '--disable-extensions', '--disable-workspace-trust', '--skip-welcome',
      '--skip-release-notes'],
  });
  console.log('[desktop] in-host tests passed');
} catch (err) {
  const msg = String(err?.message ?? err);
  if (/ENOTFOUND|EAI_AGAIN|ECONNREFUSED|ETIMEDOUT|getaddrinfo|download/i.test(msg) && !opts.code) {
    console.error(`[desktop] FAILED: could not download VS Code ${opts.version} (${msg.split('\n')[0]}).\n` +
      '  This machine cannot reach update.code.visualstudio.com. Either pass an installed desktop VS Code\n' +
      '  (--code /path/to/code or VSCODE_EXECUTABLE=...), or run the same suite in code-server:\n' +
      '    npm run test:editor');
  } else {
    console.error(`[desktop] FAILED: ${msg}`);
  }
  process.exit(1);
}
