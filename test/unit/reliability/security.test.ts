/**
 * Nothing executed (issue 8): attempts through the expression language are refused with a clear
 * SlopewiseError — function definitions, object and property access, `import`, `createUnit`,
 * `evaluate`, constructor access — and nothing they name is ever run (a sentinel on globalThis
 * stays unset). The evaluator refuses any tree outside the whitelist even when handed one directly.
 */
import assert from 'node:assert/strict';
import { SlopewiseError } from '../../../src/core/errors';
import { parseFormula } from '../../../src/core/expr';
import { compileScalar, numberLiteral } from '../../../src/core/expr/compile';
import { inspect } from '../../../src/core/inspect';
import { math } from '../../../src/core/math';
import { findFormulas } from '../../../src/core/detect';
import { checkText } from '../../../src/core/check';

const g = globalThis as Record<string, unknown>;

const ATTACKS: [string, string][] = [
  ['function definition and call', 'f(x)=x^2; f(3)'],
  ['function definition alone, then use', 'g(y) = y; g(2)'],
  ['object literal with index', '{a:1}["a"]'],
  ['object literal', '{a: x}'],
  ['property access', 'x.constructor'],
  ['constructor chain', 'cos.constructor("globalThis.__slopewisePwned = 1")()'],
  ['constructor via string', '"".constructor.constructor("globalThis.__slopewisePwned = 1")()'],
  ['import', 'import({evaluate: 1}, {override: true})'],
  ['createUnit', 'createUnit("furlong", "220 yards")'],
  ['evaluate', 'evaluate("globalThis.__slopewisePwned = 1")'],
  ['parse', 'parse("x")'],
  ['compile', 'compile("x").evaluate()'],
  ['chained assignment', 'a = b = x'],
  ['matrix / index', '[1, 2, 3][1]'],
  ['proto', '__proto__'],
  ['string', '"x"'],
  ['range', '1:10'],
  ['python import', '__import__("os").system("true")'],
  ['js Function', 'Function("return 1")()'],
  ['eval', 'eval("1")'],
  ['require', 'require("fs")'],
  ['several statements', 'x; x'],
];

describe('reliability: nothing in a formula is executed', () => {
  beforeEach(() => { delete g.__slopewisePwned; });
  afterEach(() => { assert.equal(g.__slopewisePwned, undefined, 'an attack ran'); });

  for (const [what, text] of ATTACKS) {
    it(`refuses ${what}: ${text}`, () => {
      assert.throws(() => parseFormula(text), (e: unknown) => {
        assert.ok(e instanceof SlopewiseError, `not a SlopewiseError: ${String(e)}`);
        assert.ok(e.message.length >= 10, `message too short: ${e.message}`);
        // A clear error says what was wrong, in words, not a JavaScript error.
        assert.doesNotMatch(e.message, /TypeError|undefined|Cannot read/);
        if (e.position !== undefined) assert.ok(e.position >= 0 && e.position <= text.length, `position ${e.position} outside the text`);
        return true;
      });
      assert.throws(() => inspect(text), SlopewiseError);
    });
  }

  it('a left-hand side is notation, not an assignment: `y = 3*x` reads as the formula 3*x', () => {
    const f = parseFormula('y = 3*x');
    assert.equal(f.expression, '3 * x');
  });

  it('says where: the position points at the refused part', () => {
    try {
      parseFormula('1 + x.constructor');
      assert.fail('accepted');
    } catch (e) {
      assert.ok(e instanceof SlopewiseError);
      assert.ok(e.position !== undefined && e.position >= 4, `position ${String(e.position)}`);
    }
  });

  it('the evaluator refuses trees outside the whitelist even when handed one directly', () => {
    for (const text of ['f(x) = x^2', '{a: 1}', 'x.y', '[1, 2]', 'a = 1', 'x[1]', '"s"', 'evaluate("1")', 'unknownfn(x)', '1:3']) {
      const node = math.parse(text);
      assert.throws(() => compileScalar(node, 'x'), SlopewiseError, text);
    }
  });

  it('writes only numbers into generated code', () => {
    assert.equal(numberLiteral(1.5), '1.5');
    assert.equal(numberLiteral(-2), '(-2)');
    assert.equal(numberLiteral(1e-300), '1e-300');
    assert.throws(() => numberLiteral('1; process.exit()' as unknown as number), SlopewiseError);
    assert.throws(() => numberLiteral({ toString: () => '1' } as unknown as number), SlopewiseError);
  });

  it('a source file full of attacks is scanned and checked without running any of them', () => {
    const file = ATTACKS.map(([, t], i) => `# f${i}(x) = ${t}\ndef f${i}(x):\n    return ${t}\n`).join('\n');
    findFormulas(file, { languageId: 'python' });
    checkText(file, { languageId: 'python' });
  });
});
