// The plot command opens the webview; the webview reports back what it drew (layers, marks).
import * as assert from 'node:assert/strict';
import * as vscode from 'vscode';
import { api, at, closeAll, open, scratch, waitFor } from './helpers';

describe('plot', () => {
  after(async () => {
    await closeAll();
  });

  it('plots the formula at the cursor: the webview renders f and f′ with their marks', async () => {
    const a = await api();
    const editor = await open('python/activations.py');
    const pos = at(editor.document, 'x * sigmoid(1.702 * x)', 2);
    editor.selection = new vscode.Selection(pos, pos);
    const rendered = a.test.nextRender();
    await vscode.commands.executeCommand('slopewise.plotFormula');
    const r = await rendered;
    assert.equal(r.type, 'rendered');
    assert.equal(r.formulas, 1);
    assert.equal(r.layers, 2, 'f and f′ (f″ starts hidden)');
    // Two lines, the zero rule, and the saturating ranges the analysis found.
    assert.ok(r.marks >= 4, `marks: ${r.marks}`);
  });

  it('reuses the one panel and compares a second formula on the same chart', async () => {
    const a = await api();
    const editor = await open('python/activations.py');
    const pos = at(editor.document, '1.5 * x / (1 + |x|)', 3);
    editor.selection = new vscode.Selection(pos, pos);
    const rendered = a.test.nextRender();
    await vscode.commands.executeCommand('slopewise.addToPlot');
    const r = await rendered;
    assert.equal(r.formulas, 2);
    assert.equal(r.layers, 4);
    const tabs = vscode.window.tabGroups.all.flatMap((g) => g.tabs).filter((t) => t.input instanceof vscode.TabInputWebview
      && (t.input.viewType.endsWith('slopewise.plot')));
    assert.equal(tabs.length, 1, 'one plot panel');
  });

  it('plots from a hover link\'s arguments, kinks included', async () => {
    const a = await api();
    const rendered = a.test.nextRender();
    await vscode.commands.executeCommand('slopewise.plotFormula', { formula: 'max(x, 0.1 * x)', language: 'plain' });
    const r = await rendered;
    assert.equal(r.formulas, 1);
    // Lines for f and f′ (f′ is split at the kink), the zero rule, the kink's rule and diamond.
    assert.ok(r.marks >= 5, `marks: ${r.marks}`);
  });

  it('follows the document: editing the plotted function redraws the chart with the new formula', async () => {
    const a = await api();
    const editor = await scratch('python', 'def bump(x):\n    return x * x / (1 + x * x)\n');
    const pos = at(editor.document, 'x * x / (1', 2);
    editor.selection = new vscode.Selection(pos, pos);
    let rendered = a.test.nextRender();
    await vscode.commands.executeCommand('slopewise.plotFormula');
    await rendered;
    assert.deepEqual(a.test.plottedFormulas().map((f) => f.replace(/\s+/g, '')), ['x*x/(1+x*x)']);
    rendered = a.test.nextRender();
    await editor.edit((b) => b.replace(new vscode.Range(pos.translate(0, -2), pos.translate(0, 3)), 'x * x * x'));
    await rendered;
    await waitFor(() => a.test.plottedFormulas().some((f) => f.replace(/\s+/g, '').startsWith('x*x*x/')), 'the plot to follow the edit');
  });
});
