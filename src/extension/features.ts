/**
 * The heavy part of the extension, loaded on first need by `main.ts`: hover cards, diagnostics,
 * quick fixes, the plot panel and the commands that use the core. Providers never throw into the
 * editor: every entry point catches, logs to the output channel and returns nothing.
 */
import * as vscode from 'vscode';
import type { Config } from './config';
import type { RenderReport } from '../core/plot/protocol';
import type { FoundFormula, Language } from '../core/types';
import { coreLanguage } from './languages';
import * as engine from './engine';
import { HoverCache } from './hoverCache';
import { DiagnosticsManager, DIAGNOSTIC_SOURCE } from './diagnostics';
import { quickFixes } from './codeActions';
import { PlotPanel, type PlotRequest } from './plotPanel';
import { checkWorkspace, type WorkspaceCheckResult } from './workspaceCheck';
import { emitCode, emitFunction, commentPrefix, emitLanguageFor } from '../core/emit';
import { buildHoverCard } from '../core/hover';

/** Arguments the hover card's command links pass. */
interface FormulaArgs {
  formula: string;
  variable?: string;
  language?: string;
  params?: Record<string, number>;
  uri?: string;
}

function isFormulaArgs(v: unknown): v is FormulaArgs {
  if (typeof v !== 'object' || v === null) return false;
  const o = v as Record<string, unknown>;
  return typeof o.formula === 'string' && o.formula.length > 0 && o.formula.length <= 2000
    && (o.variable === undefined || typeof o.variable === 'string')
    && (o.language === undefined || typeof o.language === 'string')
    && (o.uri === undefined || typeof o.uri === 'string')
    && (o.params === undefined || (typeof o.params === 'object' && o.params !== null
      && Object.values(o.params).every((n) => typeof n === 'number' && Number.isFinite(n))));
}

interface FormulaTarget {
  text: string;
  range: vscode.Range;
  variable?: string;
  params?: Record<string, number>;
  name?: string;
  role?: FoundFormula['role'];
  language?: string;
}

export class Features implements vscode.Disposable {
  private readonly disposables: vscode.Disposable[] = [];
  private readonly hovers = new HoverCache(200);
  private readonly diagnostics: DiagnosticsManager;
  private renderWaiters: ((r: RenderReport) => void)[] = [];
  private lastReport: RenderReport | undefined;

  constructor(
    private readonly context: vscode.ExtensionContext,
    private readonly log: vscode.LogOutputChannel,
    private readonly config: () => Config,
  ) {
    this.diagnostics = new DiagnosticsManager(log, config);
    this.disposables.push(this.diagnostics);
  }

  dispose(): void {
    PlotPanel.current?.dispose();
    for (const d of this.disposables.splice(0)) d.dispose();
  }

  // ---- hover ------------------------------------------------------------------------------------

  provideHover(doc: vscode.TextDocument, pos: vscode.Position, token: vscode.CancellationToken): vscode.Hover | undefined {
    try {
      const config = this.config();
      if (!config.hoverEnabled || token.isCancellationRequested) return undefined;
      const target = this.formulaAt(doc, pos);
      if (!target) return undefined;
      const key = HoverCache.key(`${target.language ?? doc.languageId}\u0001${target.name ?? ''}\u0001${target.role ?? ''}\u0001${target.text}`, target.variable, target.params, config);
      let card = this.hovers.get(key);
      if (card === undefined) {
        const language = (target.language ?? coreLanguage(doc.languageId)) as Language | undefined;
        const result = engine.inspectText(target.text, {
          variable: target.variable, language, params: target.params,
          saturationThreshold: config.saturationThreshold, floatTypes: config.floatTypes,
        });
        // A comment formula is named after its left-hand side ("f"): only real function names title the card.
        if (target.name && /^[A-Za-z_][\w.]+$/.test(target.name)) result.name = target.name;
        if (target.role) result.role = target.role;
        const args: FormulaArgs = { formula: target.text, uri: doc.uri.toString() };
        if (target.variable) args.variable = target.variable;
        if (target.params) args.params = target.params;
        if (language) args.language = language;
        const encoded = encodeURIComponent(JSON.stringify([args]));
        card = buildHoverCard(result, {
          floatTypes: config.floatTypes,
          links: {
            plot: `command:slopewise.plotFormula?${encoded}`,
            copy: `command:slopewise.copyDerivative?${encoded}`,
          },
        });
        this.hovers.set(key, card);
      }
      const md = new vscode.MarkdownString(card, true);
      md.isTrusted = { enabledCommands: ['slopewise.plotFormula', 'slopewise.copyDerivative'] };
      md.supportHtml = false;
      return new vscode.Hover(md, target.range);
    } catch (e) {
      if (!engine.isUserError(e)) this.log.error(`hover failed: ${engine.describe(e)}`);
      else this.log.debug(`hover: ${engine.describe(e)}`);
      return undefined;
    }
  }

  hoverCacheSize(): number {
    return this.hovers.size;
  }

  /** The formula under the cursor: the selection when the position is inside it, else a detected formula. */
  private formulaAt(doc: vscode.TextDocument, pos: vscode.Position):
      FormulaTarget | undefined {
    const editor = vscode.window.visibleTextEditors.find((e) => e.document === doc);
    const sel = editor?.selection;
    if (sel && !sel.isEmpty && sel.contains(pos)) {
      const text = doc.getText(sel).trim();
      if (text.length > 0 && text.length <= 2000) return { text, range: sel };
    }
    const offset = doc.offsetAt(pos);
    // Innermost first: a comment's formula inside a function beats the function's own code formula.
    let found: FoundFormula | undefined;
    for (const f of this.diagnostics.formulas(doc)) {
      if (f.span.start <= offset && offset <= f.span.end && (!found || f.span.end - f.span.start < found.span.end - found.span.start)) found = f;
    }
    if (!found) return undefined;
    const range = new vscode.Range(doc.positionAt(found.span.start), doc.positionAt(found.span.end));
    const out: FormulaTarget = { text: found.text, range };
    if (found.variable) out.variable = found.variable;
    if (found.params) out.params = found.params;
    if (found.name) out.name = found.name;
    out.language = found.language;
    out.role = found.role;
    return out;
  }

  // ---- diagnostics and fixes ------------------------------------------------------------------

  scheduleCheck(doc: vscode.TextDocument, trigger: 'open' | 'save' | 'edit'): void {
    this.diagnostics.schedule(doc, trigger);
  }

  documentChanged(e: vscode.TextDocumentChangeEvent): void {
    this.diagnostics.editApplied(e);
    PlotPanel.current?.documentChanged(e.document);
  }

  forget(uri: vscode.Uri): void {
    this.diagnostics.forget(uri);
  }

  settingsChanged(): void {
    this.hovers.clear();
    this.diagnostics.recheckOpen();
    PlotPanel.current?.settingsChanged(this.config());
  }

  provideCodeActions(doc: vscode.TextDocument, range: vscode.Range | vscode.Selection, context: vscode.CodeActionContext,
    token: vscode.CancellationToken): vscode.CodeAction[] {
    try {
      if (token.isCancellationRequested) return [];
      const ours = context.diagnostics.filter((d) => d.source === DIAGNOSTIC_SOURCE);
      return quickFixes(doc, ours, this.diagnostics.findingsFor(doc.uri));
    } catch (e) {
      this.log.error(`code actions failed: ${engine.describe(e)}`);
      return [];
    }
  }

  async checkActiveFile(uriArg?: unknown): Promise<void> {
    const doc = typeof uriArg === 'string'
      ? vscode.workspace.textDocuments.find((d) => d.uri.toString() === uriArg)
      : vscode.window.activeTextEditor?.document;
    if (!doc) {
      if (typeof uriArg !== 'string') void vscode.window.showInformationMessage('Slopewise: open a file to check it.');
      return;
    }
    const n = this.diagnostics.checkNow(doc);
    if (typeof uriArg !== 'string') {
      void vscode.window.showInformationMessage(n === 0
        ? `Slopewise: no problems in ${vscode.workspace.asRelativePath(doc.uri)}.`
        : `Slopewise: ${n} problem${n === 1 ? '' : 's'} in ${vscode.workspace.asRelativePath(doc.uri)}.`);
    }
  }

  /** Returns the counts, so a test (or another extension) calling the command can read them. */
  async checkWorkspace(): Promise<WorkspaceCheckResult | undefined> {
    return checkWorkspace(this.diagnostics, this.config(), this.log);
  }

  // ---- commands on the formula at the cursor ---------------------------------------------------

  /** The formula a command acts on: from a hover link's arguments, else the active editor's cursor/selection. */
  private commandTarget(arg: unknown): { formula: FormulaArgs; editor?: vscode.TextEditor; range?: vscode.Range; name?: string } | undefined {
    if (isFormulaArgs(arg)) return { formula: arg };
    const editor = vscode.window.activeTextEditor;
    if (!editor) return undefined;
    const t = this.formulaAt(editor.document, editor.selection.active);
    if (!t) return undefined;
    const formula: FormulaArgs = { formula: t.text, uri: editor.document.uri.toString() };
    if (t.variable) formula.variable = t.variable;
    if (t.params) formula.params = t.params;
    const lang = t.language ?? coreLanguage(editor.document.languageId);
    if (lang) formula.language = lang;
    return t.name ? { formula, editor, range: t.range, name: t.name } : { formula, editor, range: t.range };
  }

  async plotFormula(arg: unknown, opts: { add?: boolean } = {}): Promise<void> {
    const target = this.commandTarget(arg);
    if (!target) {
      void vscode.window.showInformationMessage('Slopewise: put the cursor on a formula (or select one) to plot it.');
      return;
    }
    const request: PlotRequest = { formula: target.formula.formula };
    if (target.formula.variable) request.variable = target.formula.variable;
    if (target.formula.params) request.params = target.formula.params;
    if (target.formula.language) request.language = target.formula.language;
    if (target.formula.uri) request.uri = target.formula.uri;
    const panel = PlotPanel.createOrShow(this.context, this.log, this.config(), (r) => this.rendered(r));
    panel.show(request, opts.add === true);
  }

  private rendered(r: RenderReport): void {
    this.lastReport = r;
    const waiters = this.renderWaiters;
    this.renderWaiters = [];
    for (const w of waiters) w(r);
  }

  nextRender(): Promise<RenderReport> {
    return new Promise((resolve) => this.renderWaiters.push(resolve));
  }

  lastRender(): RenderReport | undefined {
    return this.lastReport;
  }

  plottedFormulas(): string[] {
    return PlotPanel.current?.formulas() ?? [];
  }

  async copyDerivative(arg: unknown): Promise<void> {
    const target = this.commandTarget(arg);
    if (!target) {
      void vscode.window.showInformationMessage('Slopewise: put the cursor on a formula (or select one) to copy its derivative.');
      return;
    }
    const d = engine.deriveText(target.formula.formula, target.formula);
    // Code in the language of the file the formula is in (a comment's formula is copied as code too).
    const doc = vscode.workspace.textDocuments.find((x) => x.uri.toString() === target.formula.uri) ?? target.editor?.document;
    const lang = doc ? emitLanguageFor(coreLanguage(doc.languageId), doc.getText()) : emitLanguageFor(target.formula.language);
    let text = d.first;
    try {
      if (lang) text = emitCode(d.firstNode, lang, { params: d.parameters });
    } catch (e) {
      // A function the language lacks (erf in JavaScript): copy the canonical form and say why.
      this.log.info(`copy derivative: ${engine.describe(e)}; copied the canonical form instead`);
    }
    await vscode.env.clipboard.writeText(text);
    void vscode.window.setStatusBarMessage(`Slopewise: copied f′ = ${d.firstDisplay}`, 4000);
  }

  async insertDerivativeCode(arg: unknown): Promise<void> {
    const target = this.commandTarget(arg);
    const editor = target?.editor ?? vscode.window.activeTextEditor;
    if (!target || !editor) {
      void vscode.window.showInformationMessage('Slopewise: put the cursor on a formula (or select one) to insert its derivative.');
      return;
    }
    const doc = editor.document;
    const lang = emitLanguageFor(coreLanguage(doc.languageId), doc.getText());
    if (!lang) {
      void vscode.window.showInformationMessage(`Slopewise: no code generator for ${doc.languageId}.`);
      return;
    }
    const d = engine.deriveText(target.formula.formula, target.formula);
    const line = doc.lineAt((target.range ?? editor.selection).end.line);
    const indent = line.text.slice(0, line.firstNonWhitespaceCharacterIndex);
    const comment = commentPrefix(lang);
    const name = `d_${(target.name ?? 'f').replace(/\W/g, '_')}`;
    const code = emitFunction(name, d.firstNode, d.variable, lang, { params: d.parameters });
    const header = `${comment} d/d${d.variable} [${d.expression}] = ${d.firstDisplay}  (generated by Slopewise)`;
    const text = `\n${indent}${header}\n${code.split('\n').map((l) => indent + l).join('\n')}`;
    const ok = await editor.edit((b) => b.insert(line.range.end, text));
    if (!ok) void vscode.window.showWarningMessage('Slopewise: the editor refused the insertion (read-only?).');
  }
}
