// What the engine refuses, and the bounds it checks before parsing: every refusal is a
// SlopewiseError with a code and, where it applies, the position in the text as given.
import * as assert from 'node:assert/strict';
import { parseFormula } from '../../../src/core/expr';
import { SlopewiseError } from '../../../src/core/errors';
import { LIMITS } from '../../../src/core/limits';
import { math } from '../../../src/core/math';
import { checkWhitelist } from '../../../src/core/expr/whitelist';

function refusal(input: string): SlopewiseError {
  try {
    parseFormula(input);
  } catch (e) {
    assert.ok(e instanceof SlopewiseError, `${input}: threw ${String(e)} instead of a SlopewiseError`);
    return e;
  }
  assert.fail(`${input} was accepted`);
}

describe('whitelist: refused input', () => {
  const cases: [string, string, number | undefined][] = [
    // [input, code, position]
    ['f(x)=x^2; f(3)', 'not-allowed', 8],
    ['{a:1}["a"]', 'not-allowed', 0],
    ['import("fs")', 'not-allowed', 0],
    ['createUnit("foo")', 'not-allowed', 0],
    ['evaluate("1+1")', 'not-allowed', 0],
    ['x + constructor', 'not-allowed', 4],
    ['x.constructor', 'not-allowed', 1],
    ['x["constructor"]', 'not-allowed', 1],
    ['x + "text"', 'not-allowed', 4],
    ['[1, 2, 3]', 'not-allowed', 0],
    ['x = 1; y = 2', 'not-allowed', 5],
    ['1:3', 'not-allowed', undefined],
    ['x!', 'not-allowed', 1],
    ['x % 2', 'not-allowed', 2],
    ['sigmoidd(x)', 'unknown-function', 0],
    ['2 * fooo(x)', 'unknown-function', 4],
    ['softmax(x)', 'unknown-function', 0],
    ['exp(x, 2)', 'bad-argument', 0],
    ['clamp(x, foo=2)', 'bad-argument', 9],
    ['x +', 'syntax', 3],
    ['(x', 'syntax', 0],
    ['x @ y', 'not-allowed', 2],
  ];
  for (const [input, code, position] of cases) {
    it(`${input} → ${code}`, () => {
      const e = refusal(input);
      assert.equal(e.code, code, e.message);
      if (position !== undefined) assert.equal(e.position, position, e.message);
      assert.ok(e.message.length > 5);
    });
  }

  it('suggests a close catalogue name for a misspelt function', () => {
    assert.match(refusal('sigmoidd(x)').message, /did you mean sigmoid/);
    assert.match(refusal('gleu(x)').message, /did you mean gelu/);
  });

  it('positions point into the original text after a LaTeX or Unicode rewrite', () => {
    // '\frac{1}{x} + fooo(x)': the unknown call starts at offset 14.
    assert.equal(refusal('\\frac{1}{x} + fooo(x)').position, 14);
    assert.equal(refusal('σ(x) + fooo(x)').position, 7);
  });

  it('the tree whitelist refuses nodes the notation layer never produces', () => {
    for (const text of ['f(x) = x^2', 'a = 2', 'x[1]', '{a: 1}', '[1, 2]', '1:3', 'a; b', '"s"', 'obj.prop', 'x < y < z']) {
      assert.throws(() => checkWhitelist(math.parse(text), () => undefined), (e: unknown) => e instanceof SlopewiseError && e.code === 'not-allowed', text);
    }
  });
});

describe('whitelist: bounds before parsing', () => {
  it('10 000 nested parentheses give a clean too-deep error, no RangeError', () => {
    const e = refusal('('.repeat(10_000) + 'x' + ')'.repeat(10_000));
    assert.ok(e.code === 'too-long' || e.code === 'too-deep');
    const deep = refusal('('.repeat(900) + 'x' + ')'.repeat(900));
    assert.equal(deep.code, 'too-deep');
    assert.equal(deep.position, LIMITS.maxNesting);
  });

  it('nesting through function calls is bounded too', () => {
    let s = 'x';
    for (let i = 0; i < 200; i++) s = `exp(${s})`;
    assert.equal(refusal(s).code, 'too-deep');
  });

  it('LaTeX braces are bounded', () => {
    assert.equal(refusal('\\frac{'.repeat(60) + 'x' + '}{2}'.repeat(60)).code, 'too-deep');
  });

  it('over-long input is refused with the limit in the message', () => {
    const e = refusal('x+'.repeat(LIMITS.maxFormulaLength) + 'x');
    assert.equal(e.code, 'too-long');
    assert.match(e.message, new RegExp(String(LIMITS.maxFormulaLength)));
  });

  it('a formula with too many nodes is refused before differentiation', () => {
    const e = refusal(Array.from({ length: 400 }, () => 'x').join('+'));
    assert.equal(e.code, 'too-long');
  });
});
