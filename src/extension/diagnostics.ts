/**
 * The checker's findings as diagnostics: on open, on save and after a pause in typing (per the
 * `slopewise.checkWhen` setting), with the rule id as the diagnostic code, the forward as related
 * information and severities from settings. Also caches detected formulas per document version for
 * the hover provider and the commands. Each open document has its own incremental checker
 * (engine.documentChecker): a re-check after an edit reuses what the edit did not touch — the lexing
 * outside the edited lines, each unchanged function's and comment block's detection, the comparisons —
 * and returns exactly what a full check would. Dropped when the document closes.
 */
import * as vscode from 'vscode';
import type { Finding, FoundFormula, RuleId } from '../core/types';
import type { Config, RuleSeverity } from './config';
import { coreLanguage } from './languages';
import * as engine from './engine';

/** Shared by the diagnostics and the code-action provider that fixes them. */
export const DIAGNOSTIC_SOURCE = 'Slopewise';

const SEVERITY: Record<Exclude<RuleSeverity, 'off'>, vscode.DiagnosticSeverity> = {
  error: vscode.DiagnosticSeverity.Error,
  warning: vscode.DiagnosticSeverity.Warning,
  information: vscode.DiagnosticSeverity.Information,
  hint: vscode.DiagnosticSeverity.Hint,
};

interface DocState {
  version: number;
  formulas?: FoundFormula[];
  findings?: Finding[];
}

export class DiagnosticsManager implements vscode.Disposable {
  readonly collection = vscode.languages.createDiagnosticCollection('slopewise');
  private readonly timers = new Map<string, ReturnType<typeof setTimeout>>();
  private readonly state = new Map<string, DocState>();
  /** One incremental checker per open document (bounded caches; see core/cache.ts). */
  private readonly checkers = new Map<string, engine.DocumentChecker>();
  /** Findings of files checked by the workspace command that are not open (for code actions once opened). */
  private readonly stored = new Map<string, { text: string; findings: Finding[] }>();

  constructor(private readonly log: vscode.LogOutputChannel, private readonly config: () => Config) {}

  dispose(): void {
    for (const t of this.timers.values()) clearTimeout(t);
    this.timers.clear();
    this.checkers.clear();
    this.collection.dispose();
  }

  schedule(doc: vscode.TextDocument, trigger: 'open' | 'save' | 'edit'): void {
    const key = doc.uri.toString();
    const pending = this.timers.get(key);
    if (pending) clearTimeout(pending);
    if (trigger !== 'edit') {
      this.timers.delete(key);
      this.checkNow(doc);
      return;
    }
    // Findings whose text was just edited no longer describe the file; drop them at once rather than
    // leave a stale squiggle until the debounced check runs.
    this.timers.set(key, setTimeout(() => {
      this.timers.delete(key);
      if (!doc.isClosed) this.checkNow(doc);
    }, this.config().debounceMs));
  }

  /** Removes diagnostics touched by an edit (called on every change, before the debounced re-check). */
  editApplied(e: vscode.TextDocumentChangeEvent): void {
    const current = this.collection.get(e.document.uri);
    if (!current || current.length === 0) return;
    const kept = current.filter((d) => !e.contentChanges.some((c) => c.range.intersection(d.range) !== undefined));
    if (kept.length !== current.length) this.collection.set(e.document.uri, kept);
  }

  forget(uri: vscode.Uri): void {
    const key = uri.toString();
    this.state.delete(key);
    this.checkers.delete(key);
    const t = this.timers.get(key);
    if (t) clearTimeout(t);
    this.timers.delete(key);
  }

  recheckOpen(): void {
    for (const doc of vscode.workspace.textDocuments) {
      if (this.config().isLanguageEnabled(doc.languageId) && this.config().checkWhen !== 'manual') this.checkNow(doc);
      else this.collection.delete(doc.uri);
    }
  }

  private docState(doc: vscode.TextDocument): DocState {
    const key = doc.uri.toString();
    let s = this.state.get(key);
    if (!s || s.version !== doc.version) {
      s = { version: doc.version };
      this.state.set(key, s);
    }
    return s;
  }

  /** Formulas detected in the document (cached per version). */
  formulas(doc: vscode.TextDocument): FoundFormula[] {
    const s = this.docState(doc);
    if (!s.formulas) {
      const text = doc.getText();
      s.formulas = text.length > this.config().maxFileBytes ? []
        : this.checkerFor(doc).findFormulas(text, { languageId: coreLanguage(doc.languageId) ?? 'plain', fileName: doc.fileName })
          .slice(0, this.config().maxFormulasPerFile);
    }
    return s.formulas;
  }

  /** The document's own checker (created on first use, dropped by `forget`). */
  private checkerFor(doc: vscode.TextDocument): engine.DocumentChecker {
    const key = doc.uri.toString();
    let checker = this.checkers.get(key);
    if (!checker) {
      checker = engine.documentChecker();
      this.checkers.set(key, checker);
    }
    return checker;
  }

  findingsFor(uri: vscode.Uri): Finding[] {
    return this.state.get(uri.toString())?.findings ?? [];
  }

  /** Checks the document now; returns the number of diagnostics shown. Never throws. */
  checkNow(doc: vscode.TextDocument): number {
    try {
      const text = doc.getText();
      const config = this.config();
      if (text.length > config.maxFileBytes) {
        this.log.info(`${vscode.workspace.asRelativePath(doc.uri)}: ${text.length} characters, over slopewise.limits.maxFileBytes; not checked`);
        this.collection.delete(doc.uri);
        return 0;
      }
      const findings = this.checkerFor(doc).check(text, { languageId: coreLanguage(doc.languageId) ?? 'plain', fileName: doc.fileName, maxFormulasPerFile: config.maxFormulasPerFile });
      const s = this.docState(doc);
      s.findings = findings;
      const diags = this.toDiagnostics(findings, (off) => doc.positionAt(off), doc.uri, config);
      this.collection.set(doc.uri, diags);
      this.log.debug(`${vscode.workspace.asRelativePath(doc.uri)}: ${diags.length} diagnostic(s)`);
      return diags.length;
    } catch (e) {
      this.log.error(`checking ${doc.uri.toString()} failed: ${engine.describe(e)}`);
      return 0;
    }
  }

  /** Sets diagnostics for a file that is not open (workspace check); returns how many. */
  setForText(uri: vscode.Uri, text: string, findings: Finding[]): number {
    const lineStarts = [0];
    for (let i = 0; i < text.length; i++) if (text.charCodeAt(i) === 10) lineStarts.push(i + 1);
    const positionAt = (off: number): vscode.Position => {
      let lo = 0;
      let hi = lineStarts.length - 1;
      while (lo < hi) {
        const mid = (lo + hi + 1) >> 1;
        if ((lineStarts[mid] ?? 0) <= off) lo = mid; else hi = mid - 1;
      }
      return new vscode.Position(lo, off - (lineStarts[lo] ?? 0));
    };
    this.stored.set(uri.toString(), { text, findings });
    const diags = this.toDiagnostics(findings, positionAt, uri, this.config());
    this.collection.set(uri, diags);
    return diags.length;
  }

  private toDiagnostics(findings: Finding[], positionAt: (off: number) => vscode.Position, uri: vscode.Uri,
    config: Config): vscode.Diagnostic[] {
    const out: vscode.Diagnostic[] = [];
    for (const f of findings) {
      const sev = config.severities[f.rule as RuleId] ?? 'warning';
      if (sev === 'off') continue;
      const range = new vscode.Range(positionAt(f.span.start), positionAt(f.span.end));
      const d = new vscode.Diagnostic(range, diagnosticMessage(f), SEVERITY[sev]);
      d.source = DIAGNOSTIC_SOURCE;
      d.code = f.rule;
      if (f.related) {
        d.relatedInformation = [new vscode.DiagnosticRelatedInformation(
          new vscode.Location(uri, new vscode.Range(positionAt(f.related.span.start), positionAt(f.related.span.end))),
          f.related.message)];
      }
      out.push(d);
    }
    return out;
  }
}

/** The message, plus expected vs found on their own lines when the checker gave them. */
export function diagnosticMessage(f: Finding): string {
  const lines = [f.message];
  if (f.expected !== undefined && !f.message.includes(f.expected)) lines.push(`expected: ${f.expected}`);
  if (f.found !== undefined && !f.message.includes(f.found)) lines.push(`found:    ${f.found}`);
  return lines.join('\n');
}
