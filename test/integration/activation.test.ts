// The extension activates inside a real extension host and registers every command it declares.
// Runs in both hosts: Node (code-server / desktop VS Code) and browser (VS Code for the web).
import * as assert from 'node:assert/strict';
import * as vscode from 'vscode';

const EXTENSION_ID = 'slopewise-dev.slopewise';

interface CommandContribution { command: string; title?: string }

function extension(): vscode.Extension<unknown> {
  const ext = vscode.extensions.getExtension(EXTENSION_ID);
  assert.ok(ext, `extension ${EXTENSION_ID} is not loaded in this host`);
  return ext;
}

describe('activation', () => {
  it('activates', async () => {
    const ext = extension();
    await ext.activate();
    assert.equal(ext.isActive, true);
  });

  it('registers every command declared in contributes.commands', async () => {
    const ext = extension();
    await ext.activate();
    // Read the manifest the host loaded, so this cannot pass on an empty or different list.
    const declared = ((ext.packageJSON as { contributes?: { commands?: CommandContribution[] } })
      .contributes?.commands ?? []).map((c) => c.command);
    assert.ok(declared.length > 0, 'package.json contributes.commands is empty');
    const registered = new Set(await vscode.commands.getCommands(true));
    const missing = declared.filter((c) => !registered.has(c));
    assert.deepEqual(missing, [], `declared but not registered: ${missing.join(', ')}`);
  });
});
