// Bounds: line length, file size, formulas per file, time per file, and inputs built to make
// backtracking scanners blow up (the detector scans each line a bounded number of times).
import * as assert from 'node:assert/strict';
import { analyzeSource, findFormulas } from '../../../src/core/detect/index';
import { checkSource } from '../../../src/core/check/index';

describe('detect: limits', () => {
  it('skips lines longer than maxLineLength and says so', () => {
    const long = '# f(x) = ' + 'x + '.repeat(300) + 'x\n';
    const m = analyzeSource(long + '# g(x) = x^2 + 1\n', { fileName: 'a.py', limits: { maxLineLength: 200 } });
    assert.deepEqual(m.commentFormulas.map((f) => f.name), ['g']);
    assert.match(m.skipped.join(' '), /1 line\(s\) longer than 200 characters skipped \(first: line 1\)/);
  });

  it('skips files larger than maxFileBytes', () => {
    const m = analyzeSource('# f(x) = x^2\n'.repeat(100), { fileName: 'a.py', limits: { maxFileBytes: 500 } });
    assert.equal(m.commentFormulas.length, 0);
    assert.match(m.skipped[0]!, /larger than 500 characters/);
  });

  it('reports at most maxFormulasPerFile formulas', () => {
    const src = Array.from({ length: 50 }, (_, i) => `# f${i}(x) = x^2 + ${i}`).join('\n');
    assert.equal(findFormulas(src, { fileName: 'a.py' }).length, 50);
    assert.equal(findFormulas(src, { fileName: 'a.py', limits: { maxFormulasPerFile: 7 } }).length, 7);
  });

  it('stops checking when the time budget per file is spent, and says so', () => {
    const src = 'import numpy as np\ndef f(x):\n    return np.tanh(x)\ndef f_grad(x):\n    return 1 - np.tanh(x) ** 2\n';
    const r = checkSource(src, { fileName: 'a.py', limits: { fileBudgetMs: -1 } });
    assert.deepEqual(r.pairs, []);
    assert.ok(r.notes.some((n) => /time budget of -1 ms/.test(n)), r.notes.join('; '));
  });

  // Inputs that make nested-quantifier regexes take exponential time; here they must simply finish
  // (mocha's timeout is the only clock) and find nothing or the one formula.
  const hostile: [string, string][] = [
    ['nested brackets in a comment', '# f(x) = ' + '('.repeat(3000) + 'x' + ')'.repeat(3000)],
    ['a long chain of equals signs', '# ' + 'a = '.repeat(900) + 'x'],
    ['repeated piece words', '# f(x) = ' + 'x if x > 0 '.repeat(300)],
    ['unterminated block comment', '/* f(x) = x^2\n' + ' * y = '.repeat(5000)],
    ['unterminated strings', '"'.repeat(5000) + "'".repeat(5000)],
    ['dots and digits', '# v = ' + '1.'.repeat(1500)],
    ['deep if-chain in code', 'def f(x):\n' + Array.from({ length: 200 }, (_, i) => `    if x > ${i}:\n        return ${i}`).join('\n') + '\n    return x\n'],
  ];
  for (const [label, src] of hostile) {
    it(`finishes on ${label}`, () => {
      const fs = findFormulas(src, { fileName: label.includes('block') ? 'a.c' : 'a.py' });
      assert.ok(fs.length <= 2, JSON.stringify(fs.map((f) => f.text.slice(0, 40))));
    });
  }
});
