// Settings take effect without a reload.
import * as assert from 'node:assert/strict';
import * as vscode from 'vscode';
import { api, at, closeAll, open, ours, setSetting, slopewiseHover, waitFor } from './helpers';

describe('settings', () => {
  before(async () => { await api(); });
  afterEach(async () => {
    await setSetting('severity', undefined);
    await setSetting('hover.enabled', undefined);
    await setSetting('checkWhen', undefined);
  });
  after(closeAll);

  it('slopewise.severity turns a rule\'s errors into warnings, and "off" hides it', async () => {
    const editor = await open('cuda/gauge_kernels.cu');
    const uri = editor.document.uri;
    await waitFor(() => ours(uri, 'derivative-mismatch')[0]?.severity === vscode.DiagnosticSeverity.Error, 'an error');
    await setSetting('severity', { 'derivative-mismatch': 'warning' });
    await waitFor(() => ours(uri, 'derivative-mismatch')[0]?.severity === vscode.DiagnosticSeverity.Warning, 'a warning');
    await setSetting('severity', { 'derivative-mismatch': 'off' });
    await waitFor(() => ours(uri, 'derivative-mismatch').length === 0, 'no diagnostic');
  });

  it('slopewise.hover.enabled = false removes the card', async () => {
    const editor = await open('python/activations.py');
    const pos = at(editor.document, '1.5 / (1 + |x|)^2', 3);
    assert.notEqual(await waitFor(() => slopewiseHover(editor.document.uri, pos), 'a hover'), '');
    await setSetting('hover.enabled', false);
    await waitFor(async () => (await api()).test.config().hoverEnabled === false, 'the setting to arrive');
    assert.equal(await slopewiseHover(editor.document.uri, pos), '');
  });

  it('slopewise.checkWhen = manual clears nothing on its own but stops checking on open', async () => {
    await setSetting('checkWhen', 'manual');
    await waitFor(async () => (await api()).test.config().checkWhen === 'manual', 'the setting to arrive');
    const doc = await vscode.workspace.openTextDocument({ language: 'python', content: 'def f(x):\n    return x * x\n\ndef f_grad(x):\n    return 3 * x\n' });
    await vscode.window.showTextDocument(doc);
    await new Promise((r) => setTimeout(r, 1500));
    assert.deepEqual(ours(doc.uri), []);
    // The manual command still checks.
    await vscode.commands.executeCommand('slopewise.checkFile');
    assert.equal(ours(doc.uri, 'derivative-mismatch').length, 1);
  });
});
