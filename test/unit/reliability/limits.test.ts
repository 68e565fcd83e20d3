/**
 * Bounded work (issue 8): each limit in src/core/limits.ts is enforced, and beyond it the tool says
 * what it skipped and why (an error with a position, or a note). Budgets are exercised with a budget
 * already spent (negative or zero), so no test depends on how fast the machine is.
 */
import assert from 'node:assert/strict';
import { SlopewiseError } from '../../../src/core/errors';
import { LIMITS } from '../../../src/core/limits';
import { derive, parseFormula, simplifyWithinBudget } from '../../../src/core/expr';
import { math } from '../../../src/core/math';
import { analyzeSource, findFormulas } from '../../../src/core/detect';
import { checkSource } from '../../../src/core/check';

function refusal(f: () => unknown): SlopewiseError {
  try {
    f();
  } catch (e) {
    assert.ok(e instanceof SlopewiseError, `not a SlopewiseError: ${String(e)}`);
    return e;
  }
  assert.fail('accepted');
}

describe('reliability: limits', () => {
  it(`formula length: over ${LIMITS.maxFormulaLength} characters is refused, saying the length and the limit`, () => {
    const text = 'x+'.repeat(LIMITS.maxFormulaLength / 2) + 'x';
    const e = refusal(() => parseFormula(text));
    assert.equal(e.code, 'too-long');
    assert.match(e.message, new RegExp(`${text.length}.*${LIMITS.maxFormulaLength}`));
  });

  it(`nesting: over ${LIMITS.maxNesting} brackets deep is refused with the position of the first bracket too deep`, () => {
    const depth = LIMITS.maxNesting + 1;
    const text = '('.repeat(depth) + 'x' + ')'.repeat(depth);
    const e = refusal(() => parseFormula(text));
    assert.equal(e.code, 'too-deep');
    assert.equal(e.position, LIMITS.maxNesting);
    // Just under the limit is read.
    const ok = '('.repeat(LIMITS.maxNesting) + 'x' + ')'.repeat(LIMITS.maxNesting);
    assert.equal(parseFormula(ok).expression, 'x');
  });

  it('nesting through function calls counts as well (the parser recursion is what the limit protects)', () => {
    const text = 'exp('.repeat(LIMITS.maxNesting + 1) + 'x' + ')'.repeat(LIMITS.maxNesting + 1);
    assert.equal(refusal(() => parseFormula(text)).code, 'too-deep');
  });

  it(`terms: a tree over ${LIMITS.maxNodes} nodes is refused before differentiation`, () => {
    const text = Array.from({ length: 350 }, () => 'x').join('+'); // 699 nodes in 699 characters
    assert.ok(text.length < LIMITS.maxFormulaLength);
    assert.equal(refusal(() => parseFormula(text)).code, 'too-long');
  });

  it('simplification: over its node limit it is skipped, out of time it falls back, each with a note', () => {
    const big = math.parse(Array.from({ length: 120 }, (_, i) => `exp(${i} * x)`).join(' + '));
    const r1 = simplifyWithinBudget(big, { maxNodes: 10 });
    assert.equal(r1.simplified, false);
    assert.match(r1.note ?? '', /more than 10 nodes/);
    const r2 = simplifyWithinBudget(math.parse('x + x + 2*x*3'), { budgetMs: -1 });
    assert.equal(r2.simplified, false);
    assert.match(r2.note ?? '', /budget/);
    // The fallback is still the same function.
    const f = r2.node.compile();
    assert.equal(f.evaluate({ x: 2 }), 2 + 2 + 12);
  });

  it('derivatives carry the simplification note when the budget ran out', () => {
    const d = derive(parseFormula('x * tanh(log(1 + exp(x)))'), { budgetMs: -1 });
    assert.match(d.simplifyNote ?? '', /budget/);
  });

  it(`file size: a file over maxFileBytes is not scanned, and the model says so`, () => {
    const m = analyzeSource('# y = 1/(1+exp(-x))\n'.repeat(100), { languageId: 'python', limits: { maxFileBytes: 1000 } });
    assert.equal(m.commentFormulas.length, 0);
    assert.ok(m.skipped.some((s) => /larger than 1000/.test(s)), m.skipped.join('; '));
  });

  it('line length: a line over maxLineLength is skipped with a note naming the line', () => {
    const text = `# ok line\n# y = ${'x+'.repeat(60)}x\n# y = 1/(1+exp(-x))\n`;
    const m = analyzeSource(text, { languageId: 'python', limits: { maxLineLength: 100 } });
    assert.ok(m.skipped.some((s) => /longer than 100 characters.*line 2/.test(s)), m.skipped.join('; '));
    assert.ok(m.commentFormulas.length >= 1);
  });

  it('formulas per file: detection returns at most maxFormulasPerFile, the first ones in the file', () => {
    const text = Array.from({ length: 30 }, (_, i) => `# y${i} = 1/(1+exp(-${i + 1}*x))`).join('\n');
    const all = findFormulas(text, { languageId: 'python' });
    const capped = findFormulas(text, { languageId: 'python', limits: { maxFormulasPerFile: 7 } });
    assert.equal(capped.length, 7);
    assert.deepEqual(capped, all.slice(0, 7));
  });

  it('formulas per file: the checker reads at most maxFormulasPerFile and notes what it left', () => {
    const text = Array.from({ length: 30 }, (_, i) => `# y${i} = 1/(1+exp(-${i + 1}*x))`).join('\n');
    const r = checkSource(text, { languageId: 'python', limits: { maxFormulasPerFile: 5 } });
    assert.ok(r.notes.some((n) => /more than 5 formulas/.test(n)), r.notes.join('; '));
  });

  it('time per file: with the budget spent the checker stops reading and says so', () => {
    const text = Array.from({ length: 30 }, (_, i) => `def f${i}(x):\n    return 1/(1+np.exp(-${i + 1}*x))\n`).join('\n');
    const r = checkSource(text, { languageId: 'python', limits: { fileBudgetMs: -1 } });
    assert.ok(r.notes.some((n) => /time budget/.test(n)), r.notes.join('; '));
    const found = findFormulas(text, { languageId: 'python', limits: { fileBudgetMs: -1 } });
    assert.equal(found.length, 0);
  });
});
