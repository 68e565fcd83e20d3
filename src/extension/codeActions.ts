/**
 * Quick fixes for Slopewise diagnostics: each is one WorkspaceEdit replacing the span the checker
 * named with the text it computed (the correct derivative in the file's language, or a stable
 * rewrite), so one undo reverts it. The action also re-checks the file, so the diagnostic goes even
 * when `slopewise.checkWhen` is not `onType`.
 */
import * as vscode from 'vscode';
import type { Finding } from '../core/types';

export function quickFixes(doc: vscode.TextDocument, diagnostics: readonly vscode.Diagnostic[], findings: Finding[]): vscode.CodeAction[] {
  const actions: vscode.CodeAction[] = [];
  for (const diag of diagnostics) {
    const finding = findings.find((f) => f.rule === diag.code
      && doc.positionAt(f.span.start).isEqual(diag.range.start) && doc.positionAt(f.span.end).isEqual(diag.range.end));
    if (!finding?.fix) continue;
    const fix = finding.fix;
    const action = new vscode.CodeAction(fix.title, vscode.CodeActionKind.QuickFix);
    action.edit = new vscode.WorkspaceEdit();
    action.edit.replace(doc.uri, new vscode.Range(doc.positionAt(fix.span.start), doc.positionAt(fix.span.end)), fix.text);
    action.diagnostics = [diag];
    action.isPreferred = true;
    action.command = { command: 'slopewise.checkFile', title: 'Re-check', arguments: [doc.uri.toString()] };
    actions.push(action);
  }
  return actions;
}
