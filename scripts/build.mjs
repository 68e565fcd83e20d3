#!/usr/bin/env node
// Bundles everything Slopewise ships or tests, with esbuild:
//   out/extension.js              extension, Node extension host (package.json "main")
//   out/web/extension.js          extension, browser/web-worker extension host (package.json "browser")
//   out/cli.js                    command line (bin/slopewise.js requires it)
//   media/dist/plot.js            webview script (browser IIFE)
//   out/test/integration/*.js     in-host tests for the Node host (code-server, desktop VS Code)
//   out/test/web/suite.js         the same in-host tests as one browser bundle (web extension host);
//                                 test/integration/**/*.node.test.ts are left out of it (Node-only tests)
//
// Flags: --production (minify, no source maps), --watch, --only=name[,name] (extension, web, cli,
// webview, tests, web-tests), --metafile=DIR (writes DIR/<target>.meta.json, esbuild's record of what
// each input contributes: for measuring a bundle, e.g. with https://esbuild.github.io/analyze/). An entry whose source file does not exist fails the build unless
// SLOPEWISE_ALLOW_MISSING=1, in which case it is skipped with a warning.
import * as esbuild from 'esbuild';
import fs from 'node:fs';
import path from 'node:path';
import { builtinModules } from 'node:module';
import { fileURLToPath } from 'node:url';
import { hostMathjsTrim } from './lib/host-mathjs.mjs';
import { mathjsCompactIdentifier } from './lib/mathjs-identifier.mjs';

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const argv = process.argv.slice(2);
const production = argv.includes('--production');
const watch = argv.includes('--watch');
const onlyArg = argv.find((a) => a.startsWith('--only='));
const only = onlyArg ? new Set(onlyArg.slice('--only='.length).split(',')) : null;
const allowMissing = process.env.SLOPEWISE_ALLOW_MISSING === '1';
const metafileArg = argv.find((a) => a.startsWith('--metafile='));
const metafileDir = metafileArg ? path.resolve(metafileArg.slice('--metafile='.length)) : null;

const rel = (p) => path.relative(ROOT, p) || '.';
const abs = (p) => path.join(ROOT, p);

/** Fails the build when a bundle meant for the browser pulls in a Node built-in. */
const NODE_BUILTINS = new Set(builtinModules.flatMap((m) => [m, `node:${m}`]));
const noNodeBuiltins = {
  name: 'no-node-builtins',
  setup(build) {
    build.onLoad({ filter: /.*/, namespace: 'browser-disabled' }, () => ({ contents: 'module.exports = {};', loader: 'js' }));
    build.onResolve({ filter: /.*/ }, async (args) => {
      if (args.pluginData?.noNodeBuiltinsProbe) return undefined;
      const bare = args.path.startsWith('node:') ? args.path : args.path.split('/')[0];
      if (!NODE_BUILTINS.has(bare) && !NODE_BUILTINS.has(args.path)) return undefined;
      // A package may map the built-in away for browsers ("browser": { "crypto": false }, as seedrandom
      // does for its guarded require): then esbuild resolves it to an empty module, which is fine.
      if (!args.path.startsWith('node:')) {
        const probe = await build.resolve(args.path, {
          kind: args.kind, importer: args.importer, resolveDir: args.resolveDir,
          pluginData: { noNodeBuiltinsProbe: true },
        });
        if (probe.errors.length === 0 && !probe.external) {
          // Mapped to `false`: esbuild answers with a non-file path; stand in an empty module, as it would.
          if (!path.isAbsolute(probe.path)) return { path: args.path, namespace: 'browser-disabled' };
          return { path: probe.path, namespace: probe.namespace || 'file', sideEffects: probe.sideEffects };
        }
      }
      return {
        errors: [{
          text: `Node built-in "${args.path}" imported from ${rel(args.importer)}: this bundle runs in a browser ` +
            'extension host/webview, where Node APIs do not exist. Move Node-only code out of its import graph.',
        }],
      };
    });
  },
};

const common = {
  bundle: true,
  minify: production,
  sourcemap: production ? false : 'linked',
  sourcesContent: false,
  target: 'es2022',
  logLevel: 'warning',
  legalComments: 'none',
  metafile: true,
  absWorkingDir: ROOT,
};

// ---------------------------------------------------------------------------------------------
// WEBVIEW ENTRY OPTIONS — owned by the editor helper (media/src/plot.ts). Adjust here: aliases
// (e.g. a module the webview must not carry), defines, loaders. Nothing else in this file needs to
// change for the webview.
/** `virtual:slopewise-plot-vega`: the plot template (src/core/plot/spec.ts) compiled to vega by vega-lite. */
const compiledPlotSpec = {
  name: 'compiled-plot-spec',
  setup(build) {
    build.onResolve({ filter: /^virtual:slopewise-plot-vega$/ }, () => ({ path: 'plot-vega', namespace: 'slopewise-plot' }));
    build.onLoad({ filter: /.*/, namespace: 'slopewise-plot' }, async () => {
      const mod = await esbuild.build({ entryPoints: [abs('src/core/plot/spec.ts')], bundle: true, write: false,
        format: 'esm', platform: 'neutral', logLevel: 'silent', metafile: true, absWorkingDir: ROOT });
      const { plotTemplate } = await import(`data:text/javascript;base64,${Buffer.from(mod.outputFiles[0].text).toString('base64')}`);
      const vl = await import('vega-lite');
      const warnings = [];
      const logger = { level: () => logger, info: () => logger, debug: () => logger,
        warn: (...a) => { warnings.push(a.join(' ')); return logger; }, error: (...a) => { warnings.push(a.join(' ')); return logger; } };
      const vg = vl.compile(plotTemplate(), { logger }).spec;
      return {
        contents: JSON.stringify(vg), loader: 'json',
        warnings: warnings.map((text) => ({ text: `vega-lite: ${text}` })),
        watchFiles: Object.keys(mod.metafile.inputs).map((f) => abs(f)),
      };
    });
  },
};

const WEBVIEW_OPTIONS = {
  entryPoints: { plot: abs('media/src/plot.ts') },
  outdir: abs('media/dist'),
  platform: 'browser',
  format: 'iife',
  // The host sends data only; the spec is compiled at build time, so the compiler stays out (~335 kB);
  // vega without the transforms a line chart never needs (see media/src/vega-lean.ts).
  alias: { 'vega-lite': abs('media/src/vega-lite-absent.ts'), vega: abs('media/src/vega-lean.ts') },
  define: { 'process.env.NODE_ENV': production ? '"production"' : '"development"' },
  plugins: [compiledPlotSpec],
};
// ---------------------------------------------------------------------------------------------

function integrationTestEntries() {
  const dir = abs('test/integration');
  if (!fs.existsSync(dir)) return [];
  const files = [];
  const walk = (d) => {
    for (const e of fs.readdirSync(d, { withFileTypes: true })) {
      const p = path.join(d, e.name);
      if (e.isDirectory()) walk(p);
      else if (e.name.endsWith('.test.ts')) files.push(p);
    }
  };
  walk(dir);
  const runner = path.join(dir, 'index.ts');
  return [...(fs.existsSync(runner) ? [runner] : []), ...files.sort()];
}

// ---------------------------------------------------------------------------------------------
// EXTENSION-HOST BUNDLES (out/extension.js, out/web/extension.js): options shared by both.
//
// The host never renders LaTeX or HTML from mathjs trees and never evaluates them through mathjs (the
// core compiles checked trees itself): scripts/lib/host-mathjs.mjs trims mathjs's toTex/toHTML and
// compile/evaluate methods, with the LaTeX tables, and fails the build if host code starts using
// them. The CLI and the tests keep them.
// mathjs's deprecated `identifier` type test, expanded by its Babel build into 16.7 kB of UTF-16
// ranges, goes back to `\p{L}` form, proven equal at build time (scripts/lib/mathjs-identifier.mjs).
const HOST_PLUGINS = [hostMathjsTrim(ROOT), mathjsCompactIdentifier];
/** Host bundles are read as UTF-8 (Node's loader, the web worker's script fetch): keep non-ASCII text as is, not as \u escapes. */
const HOST_OPTIONS = { charset: 'utf8' };
// ---------------------------------------------------------------------------------------------

/** All targets. `source` is the file that must exist; `options` are esbuild options. */
function targets() {
  const testFiles = integrationTestEntries();
  return [
    {
      name: 'extension', source: 'src/extension/main.ts',
      options: { ...common, ...HOST_OPTIONS, entryPoints: [abs('src/extension/main.ts')], outfile: abs('out/extension.js'),
        platform: 'node', format: 'cjs', target: 'node20', external: ['vscode'], plugins: HOST_PLUGINS },
    },
    {
      name: 'web', source: 'src/extension/main.ts',
      options: { ...common, ...HOST_OPTIONS, entryPoints: [abs('src/extension/main.ts')], outfile: abs('out/web/extension.js'),
        platform: 'browser', format: 'cjs', external: ['vscode'], mainFields: ['browser', 'module', 'main'],
        define: { 'process.env.NODE_ENV': production ? '"production"' : '"development"' },
        plugins: [noNodeBuiltins, ...HOST_PLUGINS] },
    },
    {
      name: 'cli', source: 'src/cli/main.ts',
      options: { ...common, entryPoints: [abs('src/cli/main.ts')], outfile: abs('out/cli.js'),
        platform: 'node', format: 'cjs', target: 'node20' },
    },
    {
      name: 'webview', source: 'media/src/plot.ts',
      options: { ...common, ...WEBVIEW_OPTIONS, plugins: [noNodeBuiltins, ...(WEBVIEW_OPTIONS.plugins ?? [])] },
    },
    {
      // One file per test module plus the runner (index.ts), so mocha can add files one by one.
      name: 'tests', source: 'test/integration/index.ts',
      options: { ...common, minify: false, entryPoints: testFiles, outdir: abs('out/test/integration'),
        outbase: abs('test/integration'), platform: 'node', format: 'cjs', target: 'node20',
        external: ['vscode'],
        // mocha's parallel mode (worker pool) is never used in the extension host.
        logOverride: { 'require-resolve-not-external': 'silent' } },
    },
    {
      // The web extension host loads one module: every test plus mocha's browser build, one bundle.
      name: 'web-tests', source: 'test/integration/web-index.ts',
      options: { ...common, minify: false, entryPoints: [abs('test/integration/web-index.ts')],
        outfile: abs('out/test/web/suite.js'), platform: 'browser', format: 'cjs', external: ['vscode'],
        mainFields: ['browser', 'module', 'main'],
        define: { 'process.env.NODE_ENV': '"development"', global: 'globalThis' },
        plugins: [webTestsGlob(testFiles), browserAssert, noNodeBuiltins] },
    },
  ];
}

/** In the web test bundle, `node:assert` and friends resolve to a browser implementation of its subset. */
const browserAssert = {
  name: 'browser-assert',
  setup(build) {
    build.onResolve({ filter: /^(node:)?assert(\/strict)?$/ }, () => ({ path: abs('test/integration/support/browser-assert.ts') }));
  },
};

/** Resolves `virtual:integration-tests` in web-index.ts to an import of every *.test.ts file. */
function webTestsGlob(testFiles) {
  return {
    name: 'integration-tests-glob',
    setup(build) {
      build.onResolve({ filter: /^virtual:integration-tests$/ }, () => ({ path: 'integration-tests', namespace: 'slopewise-tests' }));
      build.onLoad({ filter: /.*/, namespace: 'slopewise-tests' }, () => {
        // `*.node.test.ts` files need Node APIs and run only in the Node extension host.
        const tests = testFiles.filter((f) => f.endsWith('.test.ts') && !f.endsWith('.node.test.ts'));
        return {
          contents: tests.map((f) => `import ${JSON.stringify(f)};`).join('\n') +
            `\nexport const files = ${JSON.stringify(tests.map((f) => path.relative(abs('test/integration'), f)))};\n`,
          resolveDir: abs('test/integration'),
          loader: 'ts',
        };
      });
    },
  };
}

function formatSize(bytes) {
  return bytes >= 1024 * 1024 ? `${(bytes / 1024 / 1024).toFixed(2)} MB` : `${(bytes / 1024).toFixed(1)} kB`;
}

function printSizes(name, metafile) {
  for (const [file, info] of Object.entries(metafile.outputs)) {
    if (file.endsWith('.map')) continue;
    console.log(`  ${name.padEnd(10)} ${file.padEnd(42)} ${formatSize(info.bytes).padStart(10)}`);
  }
}

async function main() {
  const all = targets().filter((t) => !only || only.has(t.name));
  if (only) {
    const known = new Set(targets().map((t) => t.name));
    for (const n of only) if (!known.has(n)) throw new Error(`--only: unknown target "${n}" (known: ${[...known].join(', ')})`);
  }
  const missing = all.filter((t) => !fs.existsSync(abs(t.source)));
  if (missing.length && !allowMissing) {
    for (const t of missing) console.error(`build: missing entry ${t.source} (target "${t.name}")`);
    console.error('build: FAILED — set SLOPEWISE_ALLOW_MISSING=1 to skip missing entries while they are being written.');
    process.exit(1);
  }
  for (const t of missing) {
    console.warn(`\n!!! build: WARNING: ${t.source} does not exist — target "${t.name}" SKIPPED (SLOPEWISE_ALLOW_MISSING=1) !!!\n`);
  }
  const run = all.filter((t) => !missing.includes(t));
  // Compiled tests of deleted test files must not keep running: start those folders empty.
  if (run.some((t) => t.name === 'tests')) fs.rmSync(abs('out/test/integration'), { recursive: true, force: true });
  if (run.some((t) => t.name === 'web-tests')) fs.rmSync(abs('out/test/web'), { recursive: true, force: true });
  console.log(`build: ${production ? 'production' : 'development'} bundles${watch ? ' (watching)' : ''}`);

  if (watch) {
    for (const t of run) {
      const ctx = await esbuild.context({
        ...t.options,
        plugins: [...(t.options.plugins ?? []), {
          name: 'report', setup(b) {
            b.onEnd((r) => {
              if (r.errors.length) console.error(`[watch] ${t.name}: ${r.errors.length} error(s)`);
              else console.log(`[watch] ${t.name}: rebuilt`);
            });
          },
        }],
      });
      await ctx.watch();
    }
    return;
  }

  let failed = 0;
  const results = await Promise.allSettled(run.map((t) => esbuild.build(t.options)));
  results.forEach((r, i) => {
    const t = run[i];
    if (r.status === 'fulfilled') {
      printSizes(t.name, r.value.metafile);
      if (metafileDir) {
        fs.mkdirSync(metafileDir, { recursive: true });
        fs.writeFileSync(path.join(metafileDir, `${t.name}.meta.json`), JSON.stringify(r.value.metafile));
      }
    }
    else {
      failed++;
      console.error(`build: target "${t.name}" FAILED`);
      // esbuild already printed the messages (logLevel warning) for build errors; print anything else.
      if (!r.reason?.errors) console.error(r.reason);
    }
  });
  if (failed) {
    console.error(`build: ${failed} target(s) failed`);
    process.exit(1);
  }
  console.log(`build: ${run.length} target(s) ok${missing.length ? `, ${missing.length} SKIPPED` : ''}`);
}

main().catch((e) => {
  console.error(`build: ${e.message ?? e}`);
  process.exit(1);
});
