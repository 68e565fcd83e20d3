// Recall and false alarms over every fixture (test/fixtures/<language>/…), against the planted
// findings listed in test/fixtures/expected.json. Prints the figures; requires recall ≥ 0.9 and
// no finding at all on the files that have nothing planted.
import * as assert from 'node:assert/strict';
import * as fs from 'node:fs';
import * as path from 'node:path';
import { FIXTURES_ROOT, fixtureFiles } from './fixture-files';
import { checkText } from '../../../src/core/check/index';
import { findFormulas } from '../../../src/core/detect/index';

const ROOT = FIXTURES_ROOT;
const manifest = JSON.parse(fs.readFileSync(path.join(ROOT, 'expected.json'), 'utf8')) as {
  files: Record<string, { rule: string; line: number; bug: string }[]>;
};


const RECALL_REQUIRED = 0.9;

describe('fixtures: recall and false alarms', () => {
  const files = fixtureFiles();

  it('every fixture file is in the manifest, and the manifest names no missing file', () => {
    assert.deepEqual([...files].sort(), Object.keys(manifest.files).sort());
  });

  it('covers at least 12 languages, with planted bugs of every kind', () => {
    const langs = new Set(files.map((f) => f.split('/')[0]).filter((d) => d !== 'heldout'));
    assert.ok(langs.size >= 12, `${langs.size} languages`);
    const kinds = Object.values(manifest.files).flat().map((e) => e.bug).join(' | ');
    for (const k of ['sign', 'missing factor', 'input vs output', 'wrong constant', 'wrong branch', 'comment vs code', 'unstable form', 'vanishing pair']) {
      assert.ok(kinds.includes(k), `no planted "${k}"`);
    }
  });

  it(`finds ≥ ${RECALL_REQUIRED * 100} % of the planted findings, and nothing on clean files`, () => {
    let planted = 0;
    let found = 0;
    let extra = 0;
    let cleanAlarms = 0;
    const misses: string[] = [];
    const alarms: string[] = [];
    for (const file of files) {
      const text = fs.readFileSync(path.join(ROOT, file), 'utf8');
      const got = checkText(text, { fileName: file }).map((f) => ({ rule: f.rule, line: text.slice(0, f.span.start).split('\n').length, message: f.message }));
      const want = manifest.files[file] ?? [];
      planted += want.length;
      for (const w of want) {
        if (got.some((g) => g.rule === w.rule && g.line === w.line)) found++;
        else misses.push(`${file}:${w.line} ${w.rule} (${w.bug})`);
      }
      for (const g of got) {
        if (!want.some((w) => w.rule === g.rule && w.line === g.line)) {
          extra++;
          alarms.push(`${file}:${g.line} ${g.rule}: ${g.message}`);
          if (want.length === 0) cleanAlarms++;
        }
      }
    }
    const recall = planted === 0 ? 0 : found / planted;
    console.log(`      fixtures: ${files.length} files; planted ${planted}, found ${found}, recall ${recall.toFixed(3)}; false alarms ${extra} (${cleanAlarms} on clean files)`);
    for (const m of misses) console.log(`      missed: ${m}`);
    for (const a of alarms) console.log(`      false alarm: ${a}`);
    assert.ok(recall >= RECALL_REQUIRED, `recall ${recall}`);
    assert.equal(cleanAlarms, 0, alarms.join('\n'));
  });

  it('every fixture file yields formulas (the detector reads all of them)', () => {
    for (const file of files) {
      const text = fs.readFileSync(path.join(ROOT, file), 'utf8');
      assert.ok(findFormulas(text, { fileName: file }).length > 0, file);
    }
  });
});
