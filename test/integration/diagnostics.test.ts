// The checker's findings as diagnostics on the demo's planted bugs (Python, CUDA, Julia), and the quick
// fix applied through the editor's own code-action command.
import * as assert from 'node:assert/strict';
import * as vscode from 'vscode';
import { api, closeAll, open, ours, scratch, waitFor } from './helpers';

describe('diagnostics', () => {
  before(async () => { await api(); });
  after(closeAll);

  it('Python: the wrong sign in soft_floor_grad is a derivative-mismatch error pointing at soft_floor', async () => {
    const editor = await open('python/activations.py');
    const uri = editor.document.uri;
    const [d] = await waitFor(() => ours(uri, 'derivative-mismatch').length > 0 && ours(uri, 'derivative-mismatch'), 'derivative-mismatch');
    assert.ok(d);
    assert.equal(d.severity, vscode.DiagnosticSeverity.Error);
    assert.match(editor.document.lineAt(d.range.start.line).text, /soft_floor_grad/);
    const rel = d.relatedInformation?.[0];
    assert.ok(rel, 'related information');
    assert.match(editor.document.getText(rel.location.range), /soft_floor\b/);
    // The other, correct derivatives in the file are not flagged.
    assert.equal(ours(uri, 'derivative-mismatch').length, 1);
  });

  it('CUDA: the backward slope 0.1 against the forward 0.01 is flagged', async () => {
    const editor = await open('cuda/gauge_kernels.cu');
    const uri = editor.document.uri;
    const [d] = await waitFor(() => ours(uri, 'derivative-mismatch').length > 0 && ours(uri, 'derivative-mismatch'), 'derivative-mismatch');
    assert.match(editor.document.lineAt(d!.range.start.line).text, /leaky_grad/);
  });

  it('Julia: the missing factor in gelu_t_grad is flagged; the correct Rust file has no diagnostics', async () => {
    const jl = await open('julia/prototype.jl');
    await waitFor(() => ours(jl.document.uri, 'derivative-mismatch').length > 0, 'derivative-mismatch in Julia');
    const rs = await open('rust/src/act.rs');
    // Give the check its chance to run, then require silence.
    await vscode.commands.executeCommand('slopewise.checkFile', rs.document.uri.toString());
    assert.deepEqual(ours(rs.document.uri), []);
  });

  it('quick fix: applying it replaces the wrong derivative, and the diagnostic goes', async () => {
    const content = [
      'LEAK = 0.01',
      '',
      'def leaky(x):',
      '    return x if x > 0 else LEAK * x',
      '',
      'def leaky_grad(x):',
      '    return 1.0 if x > 0 else 0.1',
      '',
    ].join('\n');
    const editor = await scratch('python', content);
    const doc = editor.document;
    const [d] = await waitFor(() => ours(doc.uri, 'derivative-mismatch').length > 0 && ours(doc.uri, 'derivative-mismatch'), 'diagnostic on scratch');
    const actions = await vscode.commands.executeCommand<vscode.CodeAction[]>('vscode.executeCodeActionProvider', doc.uri, d!.range,
      vscode.CodeActionKind.QuickFix.value);
    const fix = actions.find((a) => a.kind?.value === 'quickfix' && a.title.startsWith('Replace'));
    assert.ok(fix, `a quick fix among: ${actions.map((a) => a.title).join(' | ')}`);
    assert.ok(fix.edit, `the fix carries its edit (${JSON.stringify({ kind: fix.kind?.value, diags: fix.diagnostics?.map((x) => x.code) })})`);
    assert.equal(fix.isPreferred, true);
    assert.ok(await vscode.workspace.applyEdit(fix.edit));
    if (fix.command) await vscode.commands.executeCommand(fix.command.command, ...(fix.command.arguments ?? []));
    const fixed = doc.getText();
    assert.ok(!/else 0\.1\b/.test(fixed), fixed);
    assert.match(fixed.split('\n')[6]!, /LEAK|0\.01/);
    await waitFor(() => ours(doc.uri, 'derivative-mismatch').length === 0, 'the diagnostic to clear');
    // One edit: a single undo restores the original text.
    await vscode.commands.executeCommand('undo');
    assert.equal(doc.getText(), content);
  });

  it('unstable-form: the naive softplus gets a warning and a stable rewrite as its fix', async () => {
    const editor = await open('python/stable.py');
    const uri = editor.document.uri;
    const [d] = await waitFor(() => ours(uri, 'unstable-form').length > 0 && ours(uri, 'unstable-form'), 'unstable-form');
    assert.equal(d!.severity, vscode.DiagnosticSeverity.Warning);
    const actions = await vscode.commands.executeCommand<vscode.CodeAction[]>('vscode.executeCodeActionProvider', uri, d!.range);
    const fix = actions.find((a) => a.kind?.value === 'quickfix' && /stable/i.test(a.title));
    assert.ok(fix?.edit, `a stable rewrite among: ${actions.map((a) => `${a.title} [${a.kind?.value}] edit=${Boolean(a.edit)}`).join(' | ')}`);
    const edits = fix.edit.entries().flatMap(([, e]) => e);
    assert.match(edits[0]?.newText ?? '', /log1p/);
  });
});
