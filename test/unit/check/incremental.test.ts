// The incremental checker (createChecker) and the checker's caches: after any series of edits the
// document's checker must return exactly what a fresh full check with empty caches returns. These
// tests fail if a cache key misses something a result depends on.
import * as assert from 'node:assert/strict';
import * as fs from 'node:fs';
import * as path from 'node:path';
import { FIXTURES_ROOT, editSeries, fixtureFiles } from './fixture-files';
import { uniformStream as rng } from '../../../fuzz/rng';
import { checkSource, clearCheckCaches, createChecker, mayHaveStableRewrite, type CheckResult } from '../../../src/core/check/index';
import { keyOf, Lru, paramsKey } from '../../../src/core/cache';
import { parseFormula } from '../../../src/core/expr/parse';
import { findFormulas } from '../../../src/core/detect/index';
import { stableRewrites } from '../../../src/core/analysis/index';
import { CATALOGUE } from '../../../src/core/expr';
import { FLOAT_TYPES } from '../../../src/core/types';

const ROOT = FIXTURES_ROOT;



/**
 * One random edit of the kinds a person makes: a digit changed, a sign flipped, an operator swapped,
 * a line deleted or duplicated, a line moved, text typed in a line.
 */
function randomEdit(text: string, r: () => number): string {
  const lines = text.split('\n');
  const at = Math.floor(r() * lines.length);
  const line = lines[at] ?? '';
  const kind = Math.floor(r() * 7);
  const replaceNth = (re: RegExp, f: (m: string) => string): string => {
    const hits = [...line.matchAll(re)];
    if (hits.length === 0) return line;
    const h = hits[Math.floor(r() * hits.length)]!;
    return line.slice(0, h.index) + f(h[0]) + line.slice(h.index! + h[0].length);
  };
  switch (kind) {
    case 0: lines[at] = replaceNth(/\d/g, (d) => String((Number(d) + 1 + Math.floor(r() * 8)) % 10)); break;
    case 1: lines[at] = replaceNth(/[+-]/g, (s) => (s === '+' ? '-' : '+')); break;
    case 2: lines[at] = replaceNth(/[*/]/g, (s) => (s === '*' ? '/' : '*')); break;
    case 3: lines.splice(at, 1); break;
    case 4: lines.splice(at, 0, line); break;
    case 5: { const to = Math.floor(r() * lines.length); lines.splice(at, 1); lines.splice(to, 0, line); break; }
    default: { const col = Math.floor(r() * (line.length + 1)); lines[at] = line.slice(0, col) + [' ', 'x', '2', '(', ')', '0.5 * '][Math.floor(r() * 6)] + line.slice(col); }
  }
  return lines.join('\n');
}

/** What must agree: findings (everything in them) and the pairs compared. Notes may carry timings. */
function comparable(r: CheckResult): unknown {
  return { findings: r.findings, pairs: r.pairs };
}

describe('check: incremental checker', () => {
  const files = fixtureFiles();

  it('returns the same findings as a fresh full check, after a series of random edits to every fixture', function () {
    this.timeout(600_000);
    const r = rng(20261202);
    let compared = 0;
    let withFindings = 0;
    for (const file of files) {
      const opts = { fileName: file };
      const checker = createChecker();
      editSeries(file, 4, (t) => randomEdit(t, r)).forEach((text, step) => {
        const inc = checker.checkSource(text, opts);
        clearCheckCaches();
        const fresh = checkSource(text, opts);
        assert.deepEqual(comparable(inc), comparable(fresh), `${file}, after ${step} edit(s)`);
        compared++;
        if (fresh.findings.length > 0) withFindings++;
      });
    }
    // the series must exercise findings, not only clean texts
    assert.ok(withFindings > files.length, `${withFindings} of ${compared} checks had findings`);
  });

  it("the checker's findFormulas equals a fresh findFormulas after edits, interleaved with checks of the same text", function () {
    this.timeout(300_000);
    const r = rng(31_2026);
    for (const file of files) {
      const checker = createChecker();
      editSeries(file, 3, (t) => randomEdit(t, r)).forEach((text, step) => {
        if (step % 2 === 1) checker.check(text, { fileName: file });
        assert.deepEqual(checker.findFormulas(text, { fileName: file }), findFormulas(text, { fileName: file }), `${file}, after ${step} edit(s)`);
      });
    }
  });

  it('gives each document its own memory: checking another text in between changes nothing', () => {
    const a = fs.readFileSync(path.join(ROOT, files[0]!), 'utf8');
    const b = fs.readFileSync(path.join(ROOT, files[1]!), 'utf8');
    const checker = createChecker();
    const first = checker.checkSource(a, { fileName: files[0]! });
    checker.checkSource(b, { fileName: files[1]! });
    assert.deepEqual(comparable(checker.checkSource(a, { fileName: files[0]! })), comparable(first));
  });

  it('a forward edited in one function changes the verdict on its derivative elsewhere (pairing crosses functions)', () => {
    const src = ['def softplus(x):', '    return np.log(1 + np.exp(x))', '', 'def softplus_grad(x):', '    return 1 / (1 + np.exp(-x))', ''].join('\n');
    const checker = createChecker();
    const rules = (t: string): string[] => checker.check(t, { fileName: 'a.py', rules: ['derivative-mismatch'] }).map((f) => f.rule);
    assert.deepEqual(rules(src), []);
    // only the forward's line changes; the derivative's text is the same, its verdict must not be reused
    const edited = src.replace('np.log(1 + np.exp(x))', 'np.log(1 + np.exp(2 * x))');
    assert.deepEqual(rules(edited), ['derivative-mismatch']);
    assert.deepEqual(rules(src), []);
  });

  it('the same derivative text bound to different parameters is compared again', () => {
    const src = (a: string): string => ['ALPHA = ' + a, 'def leaky(x):', '    return np.where(x > 0, x, ALPHA * x)', '', 'def leaky_grad(x):', '    return np.where(x > 0, 1.0, 0.01)', ''].join('\n');
    const checker = createChecker();
    const rules = (t: string): string[] => checker.check(t, { fileName: 'a.py', rules: ['derivative-mismatch'] }).map((f) => f.rule);
    assert.deepEqual(rules(src('0.01')), []);
    assert.deepEqual(rules(src('0.1')), ['derivative-mismatch']);
  });
});

describe('check: cache building blocks', () => {
  it('keys cannot collide whatever the text holds (length-prefixed parts)', () => {
    assert.notEqual(keyOf('a|b', 'c'), keyOf('a', 'b|c'));
    assert.notEqual(keyOf('1|a', ''), keyOf('1', 'a'));
    assert.notEqual(keyOf(undefined, 'x'), keyOf('', 'x'));
    assert.equal(paramsKey({ b: 2, a: 1 }), paramsKey({ a: 1, b: 2 }));
    assert.notEqual(paramsKey({ a: 0 }), paramsKey({ a: -0 }));
  });

  it('the LRU keeps at most its size, dropping the least recently used', () => {
    const l = new Lru<number>(3);
    l.set('a', 1); l.set('b', 2); l.set('c', 3);
    assert.equal(l.get('a'), 1); // a is now the most recent
    l.set('d', 4);
    assert.equal(l.size, 3);
    assert.equal(l.has('b'), false);
    assert.deepEqual(['a', 'c', 'd'].map((k) => l.get(k)), [1, 3, 4]);
  });
});

describe('check: the exp/log shortcut of the float analysis', () => {
  // mayHaveStableRewrite skips the breakdown scan for trees without exp or log. Checked against the
  // full analysis (stableRewrites) on every catalogue function and on a set of hand-written forms:
  // whenever the shortcut says "no", the analysis must find no rewrite.
  const forms = [
    ...CATALOGUE.filter((e) => e.role === 'activation').map((e) => `${e.name}(x)`),
    'x / (1 + abs(x))', 'x^2 / 2', 'max(x, 0) + 0.01 * min(x, 0)', 'x * tanh(x)', 'sqrt(x^2 + 1) - 1', '1 / (1 + x^2)',
    'log(1 + exp(x))', '1 / (1 + exp(-x))', 'exp(x) - 1', 'log(1 + x)', '(exp(x) - exp(-x)) / (exp(x) + exp(-x))',
  ];
  for (const text of forms) {
    it(text, () => {
      const f = parseFormula(text, { variable: 'x' });
      if (f.unbound.length > 0) return;
      const found = stableRewrites(f.node, null, 'x', f.parameters, FLOAT_TYPES, [-100, 100]);
      if (!mayHaveStableRewrite(f.node)) assert.deepEqual(found, [], `${text}: the shortcut would hide ${found.map((s) => s.rule).join(', ')}`);
    });
  }

  it('does not skip the forms it exists for (the analysis finds a rewrite for each)', () => {
    // softplus, sigmoid and log(1 + u) in their naive forms overflow or lose digits in float32
    // (IEEE 754 binary32: exp overflows beyond x ≈ 88.7); each has a stable rewrite.
    for (const text of ['log(1 + exp(x))', '1 / (1 + exp(-x))', 'log(1 + x)']) {
      const f = parseFormula(text, { variable: 'x' });
      assert.ok(mayHaveStableRewrite(f.node), text);
    }
    const naive = parseFormula('log(1 + exp(x))', { variable: 'x' });
    assert.ok(stableRewrites(naive.node, null, 'x', naive.parameters, FLOAT_TYPES, [-100, 100]).length > 0);
  });
});
