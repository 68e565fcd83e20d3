// Hover cards on the demo, through the editor's own hover command (vscode.executeHoverProvider).
import * as assert from 'node:assert/strict';
import * as vscode from 'vscode';
import { api, at, closeAll, open, slopewiseHover, waitFor } from './helpers';

describe('hover', () => {
  before(async () => { await api(); });
  after(closeAll);

  it('on a docstring formula (Python): the formula, f′, f″, saturation, float lines, plot image, links', async () => {
    const editor = await open('python/activations.py');
    const doc = editor.document;
    const md = await waitFor(() => slopewiseHover(doc.uri, at(doc, '1.5 * x / (1 + |x|)', 4)), 'a Slopewise hover');
    assert.match(md, /f\(x\) = 1\.5·x\/\(1 \+ \|x\|\)/);
    assert.match(md, /\*\*f′\*\* `/);
    assert.match(md, /\*\*f″\*\* `/);
    assert.match(md, /\*\*saturates\*\*/);
    assert.match(md, /`fp16`/);
    assert.match(md, /!\[[^\]]*\]\(data:image\/svg\+xml;base64,/);
    assert.match(md, /\(command:slopewise\.plotFormula\?/);
    assert.match(md, /\(command:slopewise\.copyDerivative\?/);
  });

  it('on code (Rust): the ELU body is read as a piecewise formula with a derivative in terms of the output', async () => {
    const editor = await open('rust/src/act.rs');
    const doc = editor.document;
    const md = await waitFor(() => slopewiseHover(doc.uri, at(doc, 'ALPHA * (x.exp() - 1.0)', 2)), 'a Slopewise hover');
    assert.match(md, /\*\*f′\*\* `x > 0 \? 1/);
    assert.match(md, /x > 0/);
    assert.match(md, /\*\*f′ in y = f\(x\)\*\* `/);
  });

  it('on a selection (TypeScript): the selected expression is the formula', async () => {
    const editor = await open('ts/dashboard.ts');
    const doc = editor.document;
    const start = at(doc, '1 / (1 + Math.exp(-3 * x))', 0);
    const end = start.translate(0, '1 / (1 + Math.exp(-3 * x))'.length);
    editor.selection = new vscode.Selection(start, end);
    const md = await waitFor(() => slopewiseHover(doc.uri, start.translate(0, 5)), 'a hover on the selection');
    assert.match(md, /sigmoid|σ/);
    assert.match(md, /3/);
  });

  it('caches cards per formula: a second hover adds no entry and returns the same card', async () => {
    const editor = await open('python/activations.py');
    const doc = editor.document;
    const pos = at(doc, 'x * sigmoid(1.702 * x)', 3);
    const first = await waitFor(() => slopewiseHover(doc.uri, pos), 'first hover');
    const size = await (await api()).test.hoverCacheSize();
    const second = await slopewiseHover(doc.uri, pos);
    assert.equal(second, first);
    assert.equal(await (await api()).test.hoverCacheSize(), size);
  });
});
