/**
 * Every input the fuzzer ever found failing (fuzz/corpus/<stage>/*.txt, minimised) is replayed
 * through its stage: it must now end in a result of the right shape or a SlopewiseError. Hangs are
 * replayed as well; the mocha timeout bounds them (no time is asserted).
 */
import assert from 'node:assert/strict';
import * as fs from 'node:fs';
import * as path from 'node:path';
import { CORPUS_DIR, STAGES, decodeCorpus, stageByName } from '../../../fuzz/stages';

function corpusFiles(): { stage: string; file: string }[] {
  if (!fs.existsSync(CORPUS_DIR)) return [];
  const out: { stage: string; file: string }[] = [];
  for (const stage of fs.readdirSync(CORPUS_DIR).sort()) {
    const dir = path.join(CORPUS_DIR, stage);
    if (!fs.statSync(dir).isDirectory()) continue;
    for (const f of fs.readdirSync(dir).sort()) if (f.endsWith('.txt')) out.push({ stage, file: path.join(dir, f) });
  }
  return out;
}

describe('reliability: fuzz corpus replay', function () {
  this.timeout(60_000);

  it('every corpus folder names a stage', () => {
    for (const { stage } of corpusFiles()) assert.ok(stageByName(stage), `fuzz/corpus/${stage} is not a stage (${STAGES.map((s) => s.name).join(', ')})`);
  });

  it('the corpus format round-trips (options line, then the input verbatim)', () => {
    const text = 'line one\n# y = σ(x)\r\n\u0000end';
    const back = decodeCorpus(`${JSON.stringify({ languageId: 'python' })}\n${text}`);
    assert.equal(back.text, text);
    assert.deepEqual(back.opts, { languageId: 'python' });
  });

  for (const { stage, file } of corpusFiles()) {
    it(`${stage}: ${path.basename(file)}`, () => {
      const s = stageByName(stage);
      assert.ok(s);
      const input = decodeCorpus(fs.readFileSync(file, 'utf8'));
      const v = s.run(input);
      assert.equal(v.kind, 'ok', v.kind === 'crash' ? v.message : '');
    });
  }
});
