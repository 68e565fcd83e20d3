// The built command line answers --help and --version, both through out/cli.js and through the
// package's `bin` launcher, and reports a usage error as exit code 2 with a JSON error object.
import * as assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import * as fs from 'node:fs';
import * as path from 'node:path';

const ROOT = path.resolve(__dirname, '..', '..');
const CLI = path.join(ROOT, 'out', 'cli.js');
const BIN = path.join(ROOT, 'bin', 'slopewise.js');
const pkg = JSON.parse(fs.readFileSync(path.join(ROOT, 'package.json'), 'utf8')) as { version: string; bin: Record<string, string> };

function run(script: string, args: string[]): { status: number | null; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [script, ...args], { encoding: 'utf8', timeout: 30_000 });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}

describe('cli: help and version', () => {
  before(() => {
    assert.ok(fs.existsSync(CLI), `${CLI} is missing: run the build first`);
  });

  it('package.json bin points at the launcher', () => {
    assert.equal(path.resolve(ROOT, pkg.bin.slopewise ?? ''), BIN);
  });

  for (const [name, script] of [['out/cli.js', CLI], ['bin/slopewise.js', BIN]] as const) {
    it(`${name} --version prints the package version`, () => {
      const r = run(script, ['--version']);
      assert.equal(r.status, 0, r.stderr);
      assert.equal(r.stdout.trim(), pkg.version);
    });

    it(`${name} --help prints usage and exits 0`, () => {
      const r = run(script, ['--help']);
      assert.equal(r.status, 0, r.stderr);
      assert.match(r.stdout, /usage/i);
      assert.match(r.stdout, /slopewise/);
      assert.match(r.stdout, /--version/);
    });
  }

  it('an unknown command is a usage error: exit 2 with a JSON error message', () => {
    const r = run(CLI, ['no-such-command-xyz']);
    assert.equal(r.status, 2);
    // The JSON object may go to stdout (machine-readable) or stderr; one of them must hold it.
    const parsed = [r.stdout, r.stderr].map((t) => {
      try { return JSON.parse(t.trim()) as { error?: { message?: unknown } }; } catch { return undefined; }
    }).find((p) => p !== undefined);
    assert.ok(parsed, `no JSON error object in stdout ${JSON.stringify(r.stdout)} or stderr ${JSON.stringify(r.stderr)}`);
    assert.equal(typeof parsed.error?.message, 'string');
    assert.ok((parsed.error?.message as string).length > 0);
  });
});
