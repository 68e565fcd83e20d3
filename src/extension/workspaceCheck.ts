/**
 * "Check Derivatives in the Workspace": reads every file of an enabled language through
 * `workspace.fs` (works in the web host and on virtual file systems), checks it, shows the
 * findings as diagnostics, under a cancellable progress notification.
 */
import * as vscode from 'vscode';
import type { Config } from './config';
import type { DiagnosticsManager } from './diagnostics';
import { coreLanguage } from './languages';
import * as engine from './engine';

/** File extensions per VS Code language id (only for finding files; open documents use their language id). */
const EXTENSIONS: Record<string, string[]> = {
  python: ['py', 'pyi'], c: ['c', 'h'], cpp: ['cpp', 'cc', 'cxx', 'hpp', 'hh', 'hxx'], 'cuda-cpp': ['cu', 'cuh'],
  rust: ['rs'], go: ['go'], julia: ['jl'], r: ['r', 'R'], matlab: ['m'], fortran: ['f', 'for', 'f77'],
  'fortran-modern': ['f90', 'f95', 'f03', 'f08'], javascript: ['js', 'mjs', 'cjs', 'jsx'], typescript: ['ts', 'mts', 'cts', 'tsx'],
  java: ['java'], kotlin: ['kt', 'kts'], lua: ['lua'], plaintext: ['txt'], markdown: ['md'], latex: ['tex'],
};

export function languageOfFile(path: string, enabled: readonly string[]): string | undefined {
  const ext = /\.([^./\\]+)$/.exec(path)?.[1];
  if (!ext) return undefined;
  return enabled.find((id) => EXTENSIONS[id]?.includes(ext));
}

export interface WorkspaceCheckResult {
  problems: number;
  checked: number;
  filesWithProblems: number;
  cancelled: boolean;
}

export async function checkWorkspace(diags: DiagnosticsManager, config: Config, log: vscode.LogOutputChannel): Promise<WorkspaceCheckResult | undefined> {
  if (!vscode.workspace.workspaceFolders?.length) {
    void vscode.window.showInformationMessage('Slopewise: open a folder to check a workspace.');
    return undefined;
  }
  const exts = [...new Set(config.languages.flatMap((id) => EXTENSIONS[id] ?? []))];
  if (exts.length === 0) {
    void vscode.window.showInformationMessage('Slopewise: no languages enabled (slopewise.languages).');
    return undefined;
  }
  const result = await vscode.window.withProgress({
    location: vscode.ProgressLocation.Notification, title: 'Slopewise: checking derivatives', cancellable: true,
  }, async (progress, token) => {
    const files = await vscode.workspace.findFiles(`**/*.{${exts.join(',')}}`,
      '{**/node_modules/**,**/.git/**,**/out/**,**/dist/**,**/.vscode-test/**}', config.workspaceMaxFiles, token);
    let problems = 0;
    let checked = 0;
    let filesWithProblems = 0;
    const decoder = new TextDecoder('utf-8', { fatal: true });
    for (const uri of files) {
      if (token.isCancellationRequested) break;
      progress.report({ message: vscode.workspace.asRelativePath(uri), increment: 100 / files.length });
      try {
        const open = vscode.workspace.textDocuments.find((d) => d.uri.toString() === uri.toString());
        let n: number;
        if (open) {
          n = diags.checkNow(open);
        } else {
          const bytes = await vscode.workspace.fs.readFile(uri);
          if (bytes.byteLength > config.maxFileBytes) { log.info(`${uri.fsPath}: too large, skipped`); continue; }
          const text = decoder.decode(bytes);
          const id = languageOfFile(uri.path, config.languages);
          const findings = engine.checkTextIn(text, { languageId: coreLanguage(id ?? 'plaintext') ?? 'plain', fileName: uri.path });
          n = diags.setForText(uri, text, findings);
        }
        checked++;
        problems += n;
        if (n > 0) filesWithProblems++;
      } catch (e) {
        // Non-UTF-8 or unreadable files are reported, never fatal.
        log.warn(`${vscode.workspace.asRelativePath(uri)}: not checked: ${engine.describe(e)}`);
      }
      // Let the extension host breathe between files (keeps the progress notification responsive).
      await new Promise((r) => setTimeout(r, 0));
    }
    return { problems, checked, filesWithProblems, cancelled: token.isCancellationRequested };
  });
  const summary = `${result.checked} file${result.checked === 1 ? '' : 's'} checked, ${result.problems} problem${result.problems === 1 ? '' : 's'}`
    + (result.filesWithProblems ? ` in ${result.filesWithProblems} file${result.filesWithProblems === 1 ? '' : 's'}` : '');
  log.info(`workspace check: ${summary}${result.cancelled ? ' (cancelled)' : ''}`);
  // Not awaited: the notification stays until dismissed, the command is done now.
  void vscode.window.showInformationMessage(`Slopewise: ${summary}${result.cancelled ? ' (cancelled)' : ''}.`,
    ...(result.problems > 0 ? ['Show Problems'] : [])).then((choice) => {
    if (choice === 'Show Problems') void vscode.commands.executeCommand('workbench.actions.view.problems');
  });
  return result;
}
