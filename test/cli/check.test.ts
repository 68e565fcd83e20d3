// `slopewise check` spawned: exit codes, JSON shape, SARIF valid against the 2.1.0 schema.
import * as assert from 'node:assert/strict';
import * as fs from 'node:fs';
import * as path from 'node:path';
import { sarifValidator } from '../unit/check/sarifSchema';
import { runCli, scratchTree } from './scan.test';


describe('cli: check', () => {
  it('exits 0 on clean files and 1 when there is an error finding', () => {
    assert.equal(runCli(['check', 'test/fixtures/python/activations_ok.py']).status, 0);
    assert.equal(runCli(['check', 'test/fixtures/go/act_ok.go', 'test/fixtures/lua/act_ok.lua']).status, 0);
    assert.equal(runCli(['check', 'test/fixtures/python/activations_bugs.py']).status, 1);
  });

  it('exits 0 when there are only warnings', () => {
    const dir = scratchTree();
    fs.writeFileSync(path.join(dir, 'sp.py'), 'import numpy as np\ndef sp(x):\n    return np.log(1 + np.exp(x))\n');
    const r = runCli(['check', 'sp.py', '--format', 'json'], dir);
    assert.equal(r.status, 0, r.stdout);
    const out = JSON.parse(r.stdout) as { findings: { rule: string; severity: string }[] };
    assert.deepEqual(out.findings.map((f) => [f.rule, f.severity]), [['unstable-form', 'warning']]);
  });

  it('JSON findings carry file, 1-based line/column, endLine, rule, severity, message, expected, found, evidence', () => {
    const r = runCli(['check', 'test/fixtures/rust/act_bugs.rs', '--format', 'json']);
    assert.equal(r.status, 1);
    const out = JSON.parse(r.stdout) as { findings: Record<string, unknown>[]; problems: unknown[] };
    assert.deepEqual(out.findings.map((f) => [f.rule, f.line]), [['derivative-mismatch', 10], ['derivative-mismatch', 19], ['formula-mismatch', 24]]);
    const f = out.findings[0]!;
    assert.equal(f.file, 'test/fixtures/rust/act_bugs.rs');
    assert.equal(f.column, 1);
    assert.equal(f.severity, 'error');
    assert.equal(f.expected, '(x > 0) ? 1 : NEG_SLOPE');
    assert.equal(f.found, '(x > 0) ? 1 : 0.2');
    const e = f.evidence as { x: number; expectedValue: number; foundValue: number; maxError: number; tolerance: number; points: number };
    assert.ok(e.x < 0 && Math.abs(e.expectedValue - 0.02) < 1e-7 && Math.abs(e.foundValue - 0.2) < 1e-7, JSON.stringify(e));
    assert.deepEqual(out.problems, []);
  });

  it('SARIF output validates against the SARIF 2.1.0 schema', () => {
    const r = runCli(['check', 'test/fixtures', '--format', 'sarif']);
    assert.equal(r.status, 1);
    const log = JSON.parse(r.stdout) as { version: string; runs: { results: unknown[] }[] };
    const validate = sarifValidator();
    assert.ok(validate(log), JSON.stringify(validate.errors, null, 1));
    assert.equal(log.version, '2.1.0');
    assert.ok(log.runs[0]!.results.length >= 40);
  });

  it('reports non-UTF-8 files in the output and keeps going', () => {
    const dir = scratchTree();
    const r = runCli(['check', '.', '--format', 'json'], dir);
    assert.equal(r.status, 0, r.stdout);
    const out = JSON.parse(r.stdout) as { problems: { file: string; message: string }[] };
    assert.deepEqual(out.problems, [{ file: 'src/latin1.py', message: 'not valid UTF-8: skipped' }]);
  });

  it('a file named on the command line that is not UTF-8 or is binary: exit 2, a JSON error, nothing else', () => {
    const dir = scratchTree();
    fs.writeFileSync(path.join(dir, 'blob.bin'), Buffer.from([0x7f, 0x45, 0x4c, 0x46, 0, 0, 1, 2]));
    for (const [file, why] of [['src/latin1.py', /not valid UTF-8/], ['blob.bin', /binary file/]] as const) {
      const r = runCli(['check', file, '--format', 'json'], dir);
      assert.equal(r.status, 2, r.stdout);
      const out = JSON.parse(r.stdout) as { error: { message: string }; findings?: unknown };
      assert.match(out.error.message, why);
      assert.ok(out.error.message.includes(file));
      assert.equal(out.findings, undefined);
    }
  });

  it('text output for people', () => {
    const r = runCli(['check', 'test/fixtures/julia/act_bugs.jl']);
    assert.equal(r.status, 1);
    assert.match(r.stdout, /^test\/fixtures\/julia\/act_bugs\.jl:6:1 {2}error {2}derivative-mismatch {2}tanh_act_grad disagrees/m);
    assert.match(r.stdout, /^ {4}expected: 1 - tanh\(x\) \^ 2$/m);
  });

  it('usage errors exit 2', () => {
    assert.equal(runCli(['check']).status, 2);
    assert.equal(runCli(['check', 'test/fixtures', '--format', 'xml']).status, 2);
  });
});
