// Shared by the in-host tests: fixture URIs through one helper, the extension's API, polling.
import * as assert from 'node:assert/strict';
import * as vscode from 'vscode';
import type { SlopewiseApi } from '../../src/extension/main';

export const EXTENSION_ID = 'slopewise-dev.slopewise';

export async function api(): Promise<SlopewiseApi> {
  const ext = vscode.extensions.getExtension<SlopewiseApi>(EXTENSION_ID);
  assert.ok(ext, `${EXTENSION_ID} not loaded`);
  return ext.activate();
}

/** A file of the workspace the suite runs in (demo/ by default). */
export function docUri(relative: string): vscode.Uri {
  const folder = vscode.workspace.workspaceFolders?.[0];
  assert.ok(folder, 'the suite needs a workspace folder (demo/)');
  return vscode.Uri.joinPath(folder.uri, ...relative.split('/'));
}

export async function open(relative: string): Promise<vscode.TextEditor> {
  const doc = await vscode.workspace.openTextDocument(docUri(relative));
  return vscode.window.showTextDocument(doc, { preview: false });
}

/** An unsaved document (edits in it never touch the demo files). */
export async function scratch(language: string, content: string): Promise<vscode.TextEditor> {
  const doc = await vscode.workspace.openTextDocument({ language, content });
  return vscode.window.showTextDocument(doc, { preview: false });
}

export async function closeAll(): Promise<void> {
  // Revert first so unsaved scratch documents close without a save prompt.
  for (const editor of vscode.window.visibleTextEditors) {
    if (editor.document.isUntitled || editor.document.isDirty) {
      await vscode.window.showTextDocument(editor.document);
      await vscode.commands.executeCommand('workbench.action.revertAndCloseActiveEditor');
    }
  }
  await vscode.commands.executeCommand('workbench.action.closeAllEditors');
}

/** Polls `probe` until it returns something truthy (the editor works asynchronously). */
export async function waitFor<T>(probe: () => T | undefined | null | false | Promise<T | undefined | null | false>, what: string,
  timeoutMs = 30_000): Promise<T> {
  const end = Date.now() + timeoutMs;
  let last: unknown;
  while (Date.now() < end) {
    try {
      const v = await probe();
      if (v) return v;
    } catch (e) {
      last = e;
    }
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`timed out waiting for ${what}${last ? `: ${String(last)}` : ''}`);
}

export function at(doc: vscode.TextDocument, text: string, delta = 1): vscode.Position {
  const i = doc.getText().indexOf(text);
  assert.ok(i >= 0, `${JSON.stringify(text)} not in ${doc.uri.path}`);
  return doc.positionAt(i + delta);
}

/** Slopewise's hover at `pos` as markdown text ('' when there is none). */
export async function slopewiseHover(uri: vscode.Uri, pos: vscode.Position): Promise<string> {
  const hovers = await vscode.commands.executeCommand<vscode.Hover[]>('vscode.executeHoverProvider', uri, pos);
  const texts = (hovers ?? []).flatMap((h) => h.contents.map((c) => (typeof c === 'string' ? c : c.value)));
  return texts.find((t) => t.includes('**f′**')) ?? '';
}

export function ours(uri: vscode.Uri, code?: string): vscode.Diagnostic[] {
  return vscode.languages.getDiagnostics(uri).filter((d) => d.source === 'Slopewise' && (code === undefined || d.code === code));
}

export async function setSetting(key: string, value: unknown): Promise<void> {
  // Global (user) settings of the throwaway profile: never written into the demo folder.
  await vscode.workspace.getConfiguration('slopewise').update(key, value, vscode.ConfigurationTarget.Global);
}
