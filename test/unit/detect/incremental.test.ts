// Incremental detection: `relex` (lexing only the edited region) and the detection memo (results per
// function and per comment block, rebased when they move) must give exactly what a scan from
// scratch gives, after any edit. The edits are character-level and favour what breaks a lexer's
// state: quotes, triple quotes, comment openers and closers, newlines, continuations.
import * as assert from 'node:assert/strict';
import { editSeries, fixtureFiles } from '../check/fixture-files';
import { uniformStream as rng } from '../../../fuzz/rng';
import { lex, relex, type Lexed } from '../../../src/core/detect/lexer';
import { analyzeSource, DetectMemo, languageInfo, type SourceModel } from '../../../src/core/detect/index';

const SNIPPETS = ['"', "'", '"""', "'''", '#', '//', '/*', '*/', '%{', '%}', '--[[', ']]', '#=', '=#', '\n', '\n\n', ' ', 'x',
  '1.5', '\\', '`', 'r#"', '...', "x'", '{', '}', '(', ')', 'end\n', '    ', '\t', '!', '.gt.', 'c ', '%', 'def f(x):\n    return x\n'];

/** Replace a random range (mostly short) with a snippet, or delete it. */
function randomEdit(text: string, r: () => number): string {
  const a = Math.floor(r() * (text.length + 1));
  const b = Math.min(text.length, a + Math.floor(r() * (r() < 0.7 ? 3 : 80)));
  const ins = r() < 0.2 ? '' : SNIPPETS[Math.floor(r() * SNIPPETS.length)]!;
  return text.slice(0, a) + ins + text.slice(b);
}

const plainLexed = (l: Lexed): unknown => ({ ...l, clean: Array.from(l.clean) });

/** What detection reports, without the object graph (functions hold their tokens). */
function plainModel(m: SourceModel): unknown {
  return {
    tokens: m.lexed.tokens, comments: m.lexed.comments, lineStarts: m.lexed.lineStarts,
    codeFormulas: m.codeFormulas.map((c) => ({ ...c, fn: { name: c.fn.name, start: c.fn.start, end: c.fn.end, line: c.fn.line } })),
    commentFormulas: m.commentFormulas, groups: m.comments.groups, rejected: m.comments.rejected, constants: m.constants, skipped: m.skipped,
  };
}

describe('detect: incremental lexing and the detection memo', () => {
  const files = fixtureFiles().filter((f) => !f.startsWith('heldout/'));

  it('relex after a series of character edits equals lexing the edited text from scratch, in every fixture language', function () {
    this.timeout(300_000);
    const r = rng(7_2026);
    let edits = 0;
    let restartsInside = 0;
    for (const file of files) {
      const info = languageInfo(undefined, file);
      const versions = editSeries(file, 20, (t) => randomEdit(t, r));
      let prev = lex(versions[0]!, info, 4000);
      for (let k = 1; k < versions.length; k++) {
        const got = relex(versions[k - 1]!, prev, versions[k]!, info, 4000);
        assert.deepEqual(plainLexed(got), plainLexed(lex(versions[k]!, info, 4000)), `${file}, edit ${k}`);
        if (got.tokens.length > 0 && got.tokens[0] === prev.tokens[0]) restartsInside++;
        edits++;
        prev = got;
      }
    }
    // the prefix before the edit must really be reused (same token objects), not everything re-lexed
    assert.ok(restartsInside > edits / 2, `${restartsInside} of ${edits} edits reused the tokens before the edit`);
  });

  it('analyzeSource with a memo, fed one edited version after another, equals analyzeSource without one', function () {
    this.timeout(300_000);
    const r = rng(11_2026);
    for (const file of files) {
      const memo = new DetectMemo();
      const opts = { fileName: file };
      editSeries(file, 7, (t) => randomEdit(t, r)).forEach((text, k) => {
        assert.deepEqual(plainModel(analyzeSource(text, { ...opts, memo })), plainModel(analyzeSource(text, opts)), `${file}, edit ${k}`);
      });
    }
  });

  it('an unchanged function and comment block that moved are rebased, not read again', () => {
    const src = ['# leaky(x) = max(x, 0.01 x)', 'def leaky(x):', '    return np.maximum(x, 0.01 * x)', ''].join('\n');
    const memo = new DetectMemo();
    analyzeSource(src, { fileName: 'a.py', memo });
    const cached = { functions: memo.functions.size, comments: memo.comments.size };
    const moved = analyzeSource('\n\n' + src, { fileName: 'a.py', memo });
    assert.deepEqual({ functions: memo.functions.size, comments: memo.comments.size }, cached);
    const fresh = analyzeSource('\n\n' + src, { fileName: 'a.py' });
    assert.deepEqual(plainModel(moved), plainModel(fresh));
    assert.equal(moved.codeFormulas[0]!.line, 3);
    assert.equal(moved.commentFormulas[0]!.line, 2);
  });

  it('a memo shared by files of different languages still gives each its own result', () => {
    const memo = new DetectMemo();
    const py = ['def f(x):', '    return x * 2', ''].join('\n');
    const c = ['float f(float x) {', '    return x * 2; // f(x) = 2x', '}', ''].join('\n');
    for (const [text, fileName] of [[py, 'a.py'], [c, 'a.c'], [py, 'b.py'], [c, 'b.c']] as const) {
      assert.deepEqual(plainModel(analyzeSource(text, { fileName, memo })), plainModel(analyzeSource(text, { fileName })), fileName);
    }
  });
});
