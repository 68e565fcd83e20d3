// The manifest the host loaded agrees with the code: one command table, one prefix, one category.
import * as assert from 'node:assert/strict';
import * as vscode from 'vscode';
import { COMMANDS } from '../../src/extension/commands';
import { DEFAULT_LANGUAGES } from '../../src/extension/config';
import { EXTENSION_ID } from './helpers';

interface Manifest {
  activationEvents: string[];
  capabilities: { untrustedWorkspaces: { supported: boolean }; virtualWorkspaces: boolean };
  contributes: {
    commands: { command: string; title: string; category: string }[];
    configuration: { properties: Record<string, unknown> };
    menus: Record<string, { command: string; when?: string }[]>;
    keybindings: { command: string }[];
  };
}

describe('manifest', () => {
  const pkg = (): Manifest => vscode.extensions.getExtension(EXTENSION_ID)!.packageJSON as Manifest;

  it('declares exactly the commands of the command table, all under the Slopewise category', () => {
    const declared = pkg().contributes.commands.map((c) => c.command).sort();
    assert.deepEqual(declared, Object.keys(COMMANDS).map((n) => `slopewise.${n}`).sort());
    for (const c of pkg().contributes.commands) assert.equal(c.category, 'Slopewise', c.command);
  });

  it('prefixes every setting with slopewise. and activates on every language it reads', () => {
    const keys = Object.keys(pkg().contributes.configuration.properties);
    assert.ok(keys.length >= 10);
    for (const k of keys) assert.match(k, /^slopewise\.[a-zA-Z.]+$/);
    for (const lang of DEFAULT_LANGUAGES) assert.ok(pkg().activationEvents.includes(`onLanguage:${lang}`), lang);
    assert.equal(pkg().capabilities.untrustedWorkspaces.supported, true);
    assert.equal(pkg().capabilities.virtualWorkspaces, true);
    assert.ok(pkg().contributes.menus['editor/context']?.some((m) => m.command === 'slopewise.plotFormula' && m.when?.includes('editorHasSelection')));
  });
});
