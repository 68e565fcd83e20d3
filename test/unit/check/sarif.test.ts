// The SARIF 2.1.0 log validates against the published schema (see sarifSchema.ts) and carries what code-scanning services read: rule ids, levels, regions, related locations, fixes.
import * as assert from 'node:assert/strict';
import * as fs from 'node:fs';
import * as path from 'node:path';
import { sarifValidator } from './sarifSchema';
import { checkText } from '../../../src/core/check/index';
import { findingRecords, formatFindingsText, locator } from '../../../src/core/report';
import { pathToUri, toSarif } from '../../../src/core/sarif';

const FIXTURE = path.resolve(__dirname, '..', '..', 'fixtures', 'python', 'activations_bugs.py');

const validator = sarifValidator;

describe('sarif', () => {
  const text = fs.readFileSync(FIXTURE, 'utf8');
  const records = findingRecords('python/activations_bugs.py', text, checkText(text, { fileName: FIXTURE }));

  it('is valid against the SARIF 2.1.0 schema, with findings, fixes and an unreadable file', () => {
    const log = toSarif(records, [{ file: 'data/blob.py', message: 'not valid UTF-8: skipped' }], { toolVersion: '0.1.0' });
    const validate = validator();
    const ok = validate(log);
    assert.ok(ok, JSON.stringify(validate.errors, null, 1));
    assert.ok(records.some((r) => r.fix), 'the fixture has at least one fix to carry');
  });

  it('the schema check can fail: a result without a message is rejected', () => {
    const log = toSarif(records, [], { toolVersion: '0.1.0' }) as { runs: { results: Record<string, unknown>[] }[] };
    delete log.runs[0]!.results[0]!.message;
    assert.equal(validator()(log), false);
  });

  it('maps severities to levels and keeps 1-based regions', () => {
    const log = toSarif(records, [], { toolVersion: '0.1.0' }) as { runs: { results: { ruleId: string; level: string; locations: { physicalLocation: { region: { startLine: number } } }[] }[] }[] };
    const results = log.runs[0]!.results;
    assert.equal(results.length, records.length);
    for (let i = 0; i < results.length; i++) {
      assert.equal(results[i]!.ruleId, records[i]!.rule);
      assert.equal(results[i]!.level, records[i]!.severity);
      assert.equal(results[i]!.locations[0]!.physicalLocation.region.startLine, records[i]!.line);
    }
  });

  it('writes paths as URI references', () => {
    assert.equal(pathToUri('src/a b.py'), 'src/a%20b.py');
    assert.equal(pathToUri('/home/u/x.py'), 'file:///home/u/x.py');
    assert.equal(pathToUri('C:\\work\\x.py'), 'file:///C:/work/x.py');
  });
});

describe('report', () => {
  it('locates offsets as 1-based lines and columns', () => {
    const at = locator('ab\ncd\n\nef');
    assert.deepEqual(at(0), { line: 1, column: 1 });
    assert.deepEqual(at(4), { line: 2, column: 2 });
    assert.deepEqual(at(7), { line: 4, column: 1 });
  });

  it('prints file:line:column, severity, rule, message, expected vs found', () => {
    const src = 'import numpy as np\ndef sp(x):\n    return np.log1p(np.exp(x))\ndef sp_grad(x):\n    return 1 / (1 + np.exp(x))\n';
    const out = formatFindingsText(findingRecords('m.py', src, checkText(src, { fileName: 'm.py' })), [], 1);
    assert.match(out, /^m\.py:4:1 {2}error {2}derivative-mismatch {2}sp_grad disagrees with the derivative of sp/m);
    assert.match(out, /^ {4}expected: 1 \/ \(1 \+ exp\(-x\)\)$/m);
    assert.match(out, /^ {4}found: {4}1 \/ \(1 \+ exp\(x\)\)$/m);
    assert.match(out, /1 file\(s\) checked: 1 error\(s\), 0 warning\(s\)$/m);
  });
});
