/**
 * Entry of both bundles: `out/extension.js` (Node extension host) and `out/web/extension.js`
 * (web-worker extension host). Nothing here or below may use Node APIs.
 *
 * Activation stays cheap: it registers the command table, the providers and the listeners, all of
 * which load the heavy part (`features.ts`: mathjs, the engine, analysis, checking, the plot panel)
 * on first need through a dynamic import.
 */
import * as vscode from 'vscode';
import { Config, SECTION } from './config';
import { COMMANDS, type CommandContext } from './commands';
// A static import: esbuild cannot tree-shake modules reached through a dynamic import() in a CommonJS
// bundle, which pulled all of mathjs (every function, decimal.js) into the host bundle. The Features
// object is still only constructed on first need.
import * as featuresModule from './features';
import type { Features } from './features';
import type { RenderReport } from '../core/plot/protocol';

/** What `activate` returns; the in-host tests use `test`. */
export interface SlopewiseApi {
  readonly version: string;
  /** Test-only hooks (stable enough for our own integration tests, not a public API). */
  readonly test: {
    /** Resolves with the next report a plot webview sends after rendering. */
    nextRender(): Promise<RenderReport>;
    /** The last render report, if a plot was rendered in this session. */
    lastRender(): RenderReport | undefined;
    /** The formulas on the open plot (source text), [] when no plot is open. */
    plottedFormulas(): string[];
    /** Number of hover cards held in the per-formula cache. */
    hoverCacheSize(): Promise<number>;
    /** The settings snapshot the extension currently works with. */
    config(): Config;
  };
}

export function activate(context: vscode.ExtensionContext): SlopewiseApi {
  const log = vscode.window.createOutputChannel('Slopewise', { log: true });
  context.subscriptions.push(log);

  let config = Config.read();
  let features: Promise<Features> | undefined;
  let loaded: Features | undefined;
  const loadFeatures = (): Promise<Features> => {
    features ??= Promise.resolve(featuresModule).then((m) => {
      const f = new m.Features(context, log, () => config);
      context.subscriptions.push(f);
      loaded = f;
      return f;
    });
    return features;
  };

  const ctx: CommandContext = { extension: context, log, config: () => config, features: loadFeatures };
  for (const [name, factory] of Object.entries(COMMANDS)) {
    const handler = factory(ctx);
    context.subscriptions.push(vscode.commands.registerCommand(`${SECTION}.${name}`, async (...args: unknown[]) => {
      try {
        return await handler(...args);
      } catch (e) {
        // VS Code shows a bare "command failed" toast for a rejected handler; say what went wrong instead.
        const message = e instanceof Error ? e.message : String(e);
        log.error(`command ${name} failed: ${message}`);
        void vscode.window.showErrorMessage(`Slopewise: ${message}`);
        return undefined;
      }
    }));
  }

  // Providers are registered now (so the editor knows to ask) and delegate to the lazily loaded part.
  const selector = (): vscode.DocumentSelector =>
    config.languages.flatMap((language) => [{ language, scheme: 'file' }, { language, scheme: 'untitled' },
      { language, scheme: 'vscode-test-web' }, { language, scheme: 'vscode-vfs' }]);

  const registerProviders = (): vscode.Disposable => {
    const hover = vscode.languages.registerHoverProvider(selector(), {
      provideHover: async (doc, pos, token) => (await loadFeatures()).provideHover(doc, pos, token),
    });
    const actions = vscode.languages.registerCodeActionsProvider(selector(), {
      provideCodeActions: async (doc, range, cac, token) => (await loadFeatures()).provideCodeActions(doc, range, cac, token),
    }, { providedCodeActionKinds: [vscode.CodeActionKind.QuickFix] });
    return vscode.Disposable.from(hover, actions);
  };
  // The editor context menu's `when` clauses read the enabled languages from this context key.
  const publishLanguages = (): void => void vscode.commands.executeCommand('setContext', 'slopewise.languages', config.languages);
  publishLanguages();
  let providers = registerProviders();
  context.subscriptions.push({ dispose: () => providers.dispose() });

  const scheduleCheck = (doc: vscode.TextDocument, trigger: 'open' | 'save' | 'edit'): void => {
    if (!config.isLanguageEnabled(doc.languageId)) return;
    if (config.checkWhen === 'manual') return;
    if (trigger === 'edit' && config.checkWhen !== 'onType') return;
    void loadFeatures().then((f) => f.scheduleCheck(doc, trigger));
  };

  vscode.workspace.onDidOpenTextDocument((doc) => scheduleCheck(doc, 'open'), null, context.subscriptions);
  vscode.workspace.onDidSaveTextDocument((doc) => scheduleCheck(doc, 'save'), null, context.subscriptions);
  vscode.workspace.onDidChangeTextDocument((e) => {
    if (e.contentChanges.length > 0) scheduleCheck(e.document, 'edit');
    if (features) void features.then((f) => f.documentChanged(e));
  }, null, context.subscriptions);
  vscode.workspace.onDidCloseTextDocument((doc) => {
    if (features) void features.then((f) => f.forget(doc.uri));
  }, null, context.subscriptions);

  vscode.workspace.onDidChangeConfiguration((e) => {
    if (!e.affectsConfiguration(SECTION)) return;
    const languagesBefore = config.languages.join(',');
    config = Config.read();
    log.info('settings changed; re-checking open documents');
    if (config.languages.join(',') !== languagesBefore) {
      publishLanguages();
      providers.dispose();
      providers = registerProviders();
    }
    if (features) void features.then((f) => f.settingsChanged());
    else for (const doc of vscode.workspace.textDocuments) scheduleCheck(doc, 'open');
  }, null, context.subscriptions);

  for (const doc of vscode.workspace.textDocuments) scheduleCheck(doc, 'open');
  log.info(`activated (${vscode.env.uiKind === vscode.UIKind.Web ? 'web' : 'desktop'} host)`);

  return {
    version: String((context.extension.packageJSON as { version?: unknown }).version ?? ''),
    test: {
      nextRender: async () => (await loadFeatures()).nextRender(),
      lastRender: () => loaded?.lastRender(),
      plottedFormulas: () => loaded?.plottedFormulas() ?? [],
      hoverCacheSize: async () => (await loadFeatures()).hoverCacheSize(),
      config: () => config,
    },
  };
}

export function deactivate(): void {
  // Everything is disposed through context.subscriptions.
}
