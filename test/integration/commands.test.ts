// Commands that change the document or scan the workspace.
import * as assert from 'node:assert/strict';
import * as vscode from 'vscode';
import { api, closeAll, scratch } from './helpers';

describe('commands', () => {
  before(async () => { await api(); });
  after(closeAll);

  it('inserts the derivative as a Python function below the formula, with a comment stating it', async () => {
    const editor = await scratch('python', 'import math\n\ndef softsign(x):\n    return x / (1 + abs(x))\n');
    const line = editor.document.lineAt(3);
    editor.selection = new vscode.Selection(line.range.end, line.range.end);
    await vscode.commands.executeCommand('slopewise.insertDerivativeCode');
    const text = editor.document.getText();
    assert.match(text, /# d\/dx \[.*\] = /);
    assert.match(text, /def d_softsign\(x\):\n\s+return /);
    // The inserted code runs the derivative: check the emitted expression's shape names abs and sign or a conditional.
    assert.match(text.split('def d_softsign')[1]!, /abs|if/);
  });

  it('checks the whole workspace and reports the planted bugs in several languages', async () => {
    const result = await vscode.commands.executeCommand<{ problems: number; checked: number; filesWithProblems: number }>('slopewise.checkWorkspace');
    assert.ok(result, 'the command returns its counts');
    assert.ok(result.checked >= 6, `checked ${result.checked}`);
    assert.ok(result.filesWithProblems >= 4, `files with problems: ${result.filesWithProblems}`);
    const files = vscode.languages.getDiagnostics().filter(([, ds]) => ds.some((d) => d.source === 'Slopewise')).map(([u]) => u.path);
    for (const ext of ['.py', '.cu', '.jl']) assert.ok(files.some((f) => f.endsWith(ext)), `${ext} among ${files.join(', ')}`);
  });
});
