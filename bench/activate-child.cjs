/* eslint-disable @typescript-eslint/no-require-imports -- a CommonJS script loaded by node directly */
// Informational micro-measure (not a test of the editor): the time to load the extension bundle and
// run its activate() against a stand-in `vscode` module that accepts every call. Prints JSON.
'use strict';
const Module = require('node:module');
const path = require('node:path');

/** A value that is every API at once: any property is another such value, calling one returns one. */
function anything(name) {
  const fn = function () { return anything(`${name}()`); };
  return new Proxy(fn, {
    get(target, prop) {
      if (prop === 'then') return undefined; // not a thenable
      if (prop === Symbol.toPrimitive) return () => 0;
      if (prop === Symbol.iterator) return function* () {};
      if (prop === 'dispose') return () => undefined;
      if (prop === 'length') return 0;
      if (typeof prop === 'symbol') return undefined;
      return anything(`${name}.${String(prop)}`);
    },
    construct() { return anything(`new ${name}`); },
  });
}

// A bundle imports the module through esbuild's __toESM, which copies own properties: name them.
const NAMES = ['CancellationTokenSource', 'CodeAction', 'CodeActionKind', 'ConfigurationTarget', 'Diagnostic',
  'DiagnosticRelatedInformation', 'DiagnosticSeverity', 'Disposable', 'EventEmitter', 'Hover', 'Location', 'MarkdownString',
  'Position', 'ProgressLocation', 'Range', 'Selection', 'ThemeColor', 'ThemeIcon', 'UIKind', 'Uri', 'ViewColumn',
  'WorkspaceEdit', 'commands', 'env', 'extensions', 'languages', 'l10n', 'window', 'workspace', 'version'];
const fake = { __esModule: true };
for (const n of NAMES) fake[n] = anything(`vscode.${n}`);
const resolve = Module._resolveFilename;
Module._resolveFilename = function (request, ...rest) {
  if (request === 'vscode') return 'vscode';
  return resolve.call(this, request, ...rest);
};
require.cache.vscode = { id: 'vscode', filename: 'vscode', loaded: true, exports: fake };

const bundle = path.resolve(process.argv[2]);
const t0 = performance.now();
const ext = require(bundle);
const loaded = performance.now();
const context = anything('context');
let error;
try {
  const r = ext.activate(context);
  if (r && typeof r.then === 'function') r.catch(() => undefined);
} catch (e) {
  error = String(e && e.message || e);
}
const activated = performance.now();
process.stdout.write(JSON.stringify({ loadMs: loaded - t0, activateMs: activated - loaded, totalMs: activated - t0, error }) + '\n');
process.exit(0);
