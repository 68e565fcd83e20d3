// `slopewise scan` spawned as a user would run it: JSON shape, 1-based positions, folder recursion
// that skips node_modules, .git and binary files, non-UTF-8 and unreadable files reported (not fatal).
import * as assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import * as fs from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';

const ROOT = path.resolve(__dirname, '..', '..');
const CLI = path.join(ROOT, 'out', 'cli.js');

export function runCli(args: string[], cwd = ROOT): { status: number | null; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [CLI, ...args], { encoding: 'utf8', timeout: 60_000, cwd });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}

/** A scratch tree: a formula file, a nested one, node_modules and .git copies, a binary, a Latin-1 file. */
export function scratchTree(): string {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'slopewise-scan-'));
  const put = (rel: string, data: string | Buffer): void => {
    fs.mkdirSync(path.dirname(path.join(dir, rel)), { recursive: true });
    fs.writeFileSync(path.join(dir, rel), data);
  };
  put('src/act.py', 'import numpy as np\n\n# softplus(x) = log(1 + exp(x))\ndef softplus(x):\n    return np.log1p(np.exp(x))\n');
  put('src/deep/k.c', '/* relu(x) = max(0, x) */\nfloat relu(float x) { return x > 0.0f ? x : 0.0f; }\n');
  put('node_modules/pkg/a.py', 'def f(x):\n    return x * x\n');
  put('.git/hooks/b.py', 'def g(x):\n    return x * x\n');
  put('src/blob.bin', Buffer.from([0x00, 0x01, 0x02, 0x66, 0x28, 0x78, 0x29]));
  put('src/latin1.py', Buffer.from('# caf\xe9\ndef h(x):\n    return x * x\n', 'latin1'));
  return dir;
}

describe('cli: scan', () => {
  before(() => assert.ok(fs.existsSync(CLI), `${CLI} is missing: run the build first`));

  it('prints formulas as JSON with 1-based positions', () => {
    const dir = scratchTree();
    const r = runCli(['scan', 'src', '--format', 'json'], dir);
    assert.equal(r.status, 0, r.stderr + r.stdout);
    const out = JSON.parse(r.stdout) as { formulas: Record<string, unknown>[]; problems: { file: string; message: string }[] };
    const files = new Set(out.formulas.map((f) => f.file));
    assert.deepEqual([...files].sort(), ['src/act.py', 'src/deep/k.c']);
    const comment = out.formulas.find((f) => f.file === 'src/act.py' && f.origin === 'comment')!;
    assert.deepEqual(
      { line: comment.line, column: comment.column, endLine: comment.endLine, role: comment.role, name: comment.name, expression: comment.expression, language: comment.language },
      { line: 3, column: 3, endLine: 3, role: 'activation', name: 'softplus', expression: 'log(1 + exp(x))', language: 'plain' },
    );
    const code = out.formulas.find((f) => f.file === 'src/act.py' && f.origin === 'code')!;
    assert.equal(code.line, 4);
    assert.equal(code.language, 'python');
    assert.equal(code.expression, 'np.log1p(np.exp(x))');
    for (const f of out.formulas) for (const k of ['file', 'line', 'column', 'endLine', 'role', 'expression', 'language', 'origin']) assert.ok(k in f, k);
    // the Latin-1 file is reported, the binary one skipped silently, node_modules and .git never read
    assert.deepEqual(out.problems, [{ file: 'src/latin1.py', message: 'not valid UTF-8: skipped' }]);
  });

  it('reports an unreadable file and goes on', function () {
    if (process.getuid && process.getuid() === 0) {
      // root reads everything: simulate an unreadable entry with a dangling symlink instead
      const dir = scratchTree();
      fs.symlinkSync(path.join(dir, 'nowhere.py'), path.join(dir, 'src', 'gone.py'));
      const r = runCli(['scan', 'src', '--format', 'json'], dir);
      assert.equal(r.status, 0);
      const out = JSON.parse(r.stdout) as { problems: { file: string; message: string }[]; formulas: unknown[] };
      assert.ok(out.problems.some((p) => p.file === 'src/gone.py' && p.message === 'no such file'), r.stdout);
      assert.ok(out.formulas.length > 0);
      return;
    }
    const dir = scratchTree();
    fs.chmodSync(path.join(dir, 'src', 'act.py'), 0o000);
    const r = runCli(['scan', 'src', '--format', 'json'], dir);
    assert.equal(r.status, 0);
    assert.ok((JSON.parse(r.stdout) as { problems: { message: string }[] }).problems.some((p) => p.message === 'permission denied'));
  });

  it('text output names file:line:column, role and expression', () => {
    const dir = scratchTree();
    const r = runCli(['scan', 'src/deep/k.c'], dir);
    assert.equal(r.status, 0);
    assert.match(r.stdout, /^src\/deep\/k\.c:1:4 {2}activation relu {2}\(comment, plain\) {2}max\(0, x\)$/m);
    assert.match(r.stdout, /1 file\(s\) scanned: 2 formula\(s\)/);
  });

  it('usage and I/O errors exit 2 with a JSON error', () => {
    for (const args of [['scan'], ['scan', 'does/not/exist.py'], ['scan', 'x.py', '--format', 'yaml']]) {
      const r = runCli(args);
      assert.equal(r.status, 2, args.join(' '));
      assert.ok(typeof (JSON.parse(r.stdout) as { error: { message: string } }).error.message === 'string');
    }
  });

  it('writes no progress line when stderr is not a terminal', () => {
    const r = runCli(['scan', 'test/fixtures', '--format', 'json']);
    assert.equal(r.status, 0);
    assert.equal(r.stderr, '');
  });
});
