// The extension-host bundles leave mathjs's LaTeX/HTML output and its tree evaluation out
// (scripts/lib/host-mathjs.mjs) and carry mathjs's `identifier` type test in compact form
// (scripts/lib/mathjs-identifier.mjs): the built bundles carry none of the LaTeX/HTML code, a host
// build of the core's mathjs instance still parses, prints, simplifies and words type errors as
// the full mathjs package does but throws a clear error from toTex/toHTML/compile/evaluate, and the
// trimming refuses a mathjs file that lacks what it expects.
import * as assert from 'node:assert/strict';
import * as fs from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import * as esbuild from 'esbuild';
import * as mathjs from 'mathjs';

const ROOT = path.resolve(__dirname, '..', '..');
const HOST_BUNDLES = ['out/extension.js', 'out/web/extension.js'];

interface IdentifierModule {
  mathjsCompactIdentifier: esbuild.Plugin;
  COMPACT_IDENTIFIER: string;
  identifierDifferences(expanded: RegExp, compact: RegExp, limit?: number): string[];
}
const loadIdentifier = async (): Promise<IdentifierModule> =>
  (await import(path.join(ROOT, 'scripts', 'lib', 'mathjs-identifier.mjs'))) as IdentifierModule;

interface HostMathjsModule {
  hostMathjsTrim(root: string): esbuild.Plugin;
  trimNodeFile(src: string, file: string, className: string): { text: string; trimmed: number };
  pureSignatures(src: string, file: string): { text: string; trimmed: number };
  pureFactories(src: string, file: string): { text: string; trimmed: number };
  absentBigNumberFormatter(src: string, file: string): { text: string; trimmed: number };
}
const loadPlugin = async (): Promise<HostMathjsModule> =>
  (await import(path.join(ROOT, 'scripts', 'lib', 'host-mathjs.mjs'))) as HostMathjsModule;

interface MathLike {
  parse(text: string): {
    type: string; toString(): string; toTex(): string; toHTML(): string; evaluate(scope?: object): unknown; compile(): unknown;
    map(f: (n: unknown) => unknown): unknown;
  };
  simplify(expr: string): { toString(): string };
  simplifyCore(node: unknown, options?: unknown): unknown;
}

/** The message of the error `fn` throws. */
function errorMessage(fn: () => unknown): string {
  try {
    fn();
  } catch (e) {
    return (e as Error).message;
  }
  throw new Error('expected an error');
}

interface CoreLike {
  math: MathLike;
  parseFormula(text: string): { node: { toString(): string }; variable: string };
  differentiate(node: unknown, variable: string): { toString(): string };
  checkWhitelist(node: unknown, locate: () => undefined): void;
}

/** Bundles the core's mathjs instance and formula reader the way the host targets do (or without the plugins) and loads them. */
async function buildCoreMath(plugins: esbuild.Plugin[]): Promise<CoreLike & { inputs: string[] }> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'slopewise-host-bundle-'));
  try {
    const outfile = path.join(dir, 'math.cjs');
    const entry = path.join(dir, 'entry.ts');
    fs.writeFileSync(entry, `export { math } from ${JSON.stringify(path.join(ROOT, 'src', 'core', 'math'))};\n` +
      `export { parseFormula, differentiate } from ${JSON.stringify(path.join(ROOT, 'src', 'core', 'expr'))};\n` +
      `export { checkWhitelist } from ${JSON.stringify(path.join(ROOT, 'src', 'core', 'expr', 'whitelist'))};\n`);
    const r = await esbuild.build({
      entryPoints: [entry], bundle: true, platform: 'node', format: 'cjs',
      target: 'node20', outfile, metafile: true, logLevel: 'silent', absWorkingDir: ROOT, plugins,
    });
    const out = Object.values(r.metafile.outputs)[0]!;
    const inputs = Object.entries(out.inputs).filter(([, i]) => i.bytesInOutput > 0).map(([f]) => f);
    // eslint-disable-next-line @typescript-eslint/no-require-imports
    return { ...(require(outfile) as CoreLike), inputs };
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

describe('extension-host bundles: mathjs trimmed at build time', function () {
  this.timeout(60_000);

  for (const bundle of HOST_BUNDLES) {
    it(`${bundle} carries no mathjs LaTeX or HTML rendering`, () => {
      const file = path.join(ROOT, bundle);
      assert.ok(fs.existsSync(file), `${file} is missing: run the build first`);
      const text = fs.readFileSync(file, 'utf8');
      assert.match(text, /mathjs toTex \(LaTeX output\) is not part of the Slopewise extension-host bundle/);
      assert.ok(text.includes(String.raw`/^[\p{L}][\p{L}\d]*$/u`), 'compact identifier expression missing');
      assert.ok(!text.includes(String.raw`\uFB13-\uFB17`), 'expanded identifier expression still present');
      // Strings that only mathjs's LaTeX/HTML methods and tables contain (our LaTeX *reader*,
      // src/core/expr/notation/latex.ts, has its own, such as \begin{cases}).
      for (const marker of ['math-parenthesis', 'math-operator', 'Template: ', '{\\text{otherwise}}']) {
        assert.ok(!text.includes(marker), `${bundle} still contains ${JSON.stringify(marker)}`);
      }
    });
  }

  it('a host build of the core mathjs instance prints, simplifies and words type errors like mathjs, and toTex/toHTML/compile/evaluate throw', async () => {
    const { hostMathjsTrim } = await loadPlugin();
    const { mathjsCompactIdentifier } = await loadIdentifier();
    const { math, inputs } = await buildCoreMath([hostMathjsTrim(ROOT), mathjsCompactIdentifier]);
    // The outside reference: the full mathjs package from npm, untrimmed.
    for (const text of ['sin(x)^2 / (1 + exp(-x))', 'x > 0 ? x : 0.01 * x', 'max(x, 0) != 1', 'a < b <= c', '1e-21 * x + 123456789012345680000 - 0.1']) {
      assert.equal(math.parse(text).toString(), mathjs.parse(text).toString(), text);
    }
    for (const text of ['2 * x + 3 * x', 'x * x / x ^ 2 + (1 > 0)', '0.5 * exp(y) * 2']) {
      assert.equal(math.simplify(text).toString(), mathjs.simplify(text).toString(), text);
    }
    assert.throws(() => math.parse('x^2').toTex(), /toTex \(LaTeX output\) is not part of the Slopewise extension-host bundle/);
    assert.throws(() => math.parse('f(x) = x > 0 ? x : 0').toTex(), /not part of the Slopewise extension-host bundle/);
    assert.throws(() => math.parse('[a, b]').toHTML(), /toHTML \(HTML output\) is not part of the Slopewise extension-host bundle/);
    assert.throws(() => math.parse('x + 1').evaluate({ x: 1 }), /compile\/evaluate \(evaluation of expression trees\) is not part/);
    assert.throws(() => math.parse('sin(x) > 0 ? 1 : 2').compile(), /compile\/evaluate \(evaluation of expression trees\) is not part/);
    assert.ok(!inputs.some((f) => /mathjs\/lib\/(esm|cjs)\/utils\/latex\.js$|escape-latex/.test(f)), inputs.join('\n'));
    // SLOPEWISE_HOST_BUNDLE: the functions only mathjs's evaluation calls are left out; erf stays.
    const has = (name: string) => (math as unknown as Record<string, unknown>)[name] !== undefined;
    assert.deepEqual(['sin', 'exp', 'max', 'pi', 'erf', 'add', 'larger', 'simplify'].filter(has), ['erf', 'add', 'larger', 'simplify']);
    // typed-function names the `identifier` type (the test the compact form replaced) in its errors.
    const full = mathjs as unknown as MathLike;
    for (const arg of ['x', 'x1', 'αβ2', '1x', 'x_1', '', 'ſ', '𝑥', 'x\u0301']) {
      assert.equal(errorMessage(() => math.simplifyCore(math.parse('x'), arg)),
        errorMessage(() => full.simplifyCore(full.parse('x'), arg)), JSON.stringify(arg));
    }
    assert.match(errorMessage(() => math.simplifyCore(math.parse('x'), 'x')), /actual: identifier \| string, index: 1/);
    assert.match(errorMessage(() => math.simplifyCore(math.parse('x'), '1x')), /actual: string, index: 1/);
  });

  it('the identifier proof finds a class that differs', async () => {
    const { identifierDifferences } = await loadIdentifier();
    assert.deepEqual(identifierDifferences(/^[a-z][a-z\d]*$/, /^[a-z][a-z]*$/, 3), ['U+30 (later)', 'U+31 (later)', 'U+32 (later)']);
    assert.deepEqual(identifierDifferences(/^[a-y][a-z]*$/, /^[a-z][a-z]*$/, 3), ['U+7A (first)']);
  });

  it('without the plugin the same build renders LaTeX and evaluates (with sin) as mathjs does (the test above can tell them apart)', async () => {
    const { math } = await buildCoreMath([]);
    assert.equal(math.parse('sqrt(x) / 2').toTex(), mathjs.parse('sqrt(x) / 2').toTex());
    assert.equal(math.parse('sin(x) + 1').evaluate({ x: 0 }), 1);
  });

  it('refuses a mathjs node file that lacks the methods it trims', async () => {
    const { trimNodeFile } = await loadPlugin();
    const renamed = 'export class SymbolNode { toString() { return "x"; } _toLatex() { return "x"; } _toHTML() { return "x"; } _compile() {} }';
    assert.throws(() => trimNodeFile(renamed, 'SymbolNode.js', 'SymbolNode'), /expected one method _toTex in class SymbolNode/);
    assert.throws(() => trimNodeFile('export class Node { toTex() {} _toTex() {} toHTML() {} compile() {} _compile() {} evaluate() {} }', 'Node.js', 'Node'),
      /expected one method _toHTML in class Node/);
    assert.throws(() => trimNodeFile('export class RangeNode { _toTex() {} _toHTML() {} _compile() {} _toString() {} forEach() {} map() {} clone() {} toJSON() {} }',
      'RangeNode.js', 'RangeNode'), /expected one method static fromJSON in class RangeNode/);
    const ok = trimNodeFile('export class SymbolNode { toString() { return "x"; } _toTex() { return "x"; } _toHTML() { return "x"; } _compile() {} }',
      'SymbolNode.js', 'SymbolNode');
    assert.equal(ok.trimmed, 3);
    assert.ok(!ok.text.includes('_toTex') && !ok.text.includes('_compile') && ok.text.includes('toString'), ok.text);
  });

  it('plain-number implementations keep their signature and leave the bundle when unused', async () => {
    const { pureSignatures } = await loadPlugin();
    const src = "var n1 = 'number';\nexport function aNumber(x) {\n  return x + 1;\n}\naNumber.signature = n1;\n" +
      "export function bNumber(x) {\n  return x * 271828;\n}\nbNumber.signature = 'number, number';\n";
    const r = pureSignatures(src, 'plain/number/demo.js');
    assert.equal(r.trimmed, 2);
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'slopewise-signatures-'));
    try {
      fs.writeFileSync(path.join(dir, 'demo.js'), r.text);
      fs.writeFileSync(path.join(dir, 'entry.js'), "export { aNumber } from './demo.js';\n");
      const outfile = path.join(dir, 'out.cjs');
      await esbuild.build({ entryPoints: [path.join(dir, 'entry.js')], bundle: true, format: 'cjs', platform: 'node', outfile, logLevel: 'silent' });
      assert.ok(!fs.readFileSync(outfile, 'utf8').includes('271828'), 'the unused function stayed');
      // eslint-disable-next-line @typescript-eslint/no-require-imports
      const { aNumber } = require(outfile) as { aNumber: ((x: number) => number) & { signature: string } };
      assert.equal(aNumber(1), 2);
      assert.equal(aNumber.signature, 'number');
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
    assert.throws(() => pureSignatures('export function f() {}\nvar g = 1;\nf.signature = "number";\n', 'plain/number/odd.js'),
      /top-level signature assignments this plugin does not recognise/);
    const { pureFactories } = await loadPlugin();
    const factories = "export var createA = /* #__PURE__ */createNumberFactory('a', aNumber);\nexport var createB = createNumberFactory('b', bNumber);\n";
    assert.equal(pureFactories(factories, 'factoriesNumber.js').text,
      "export var createA = /* #__PURE__ */createNumberFactory('a', aNumber);\nexport var createB = /* @__PURE__ */ createNumberFactory('b', bNumber);\n");
    assert.throws(() => pureFactories("export var createA = /* #__PURE__ */factory('a', [], f);\n", 'factoriesNumber.js'), /marked pure already/);
    const { absentBigNumberFormatter } = await loadPlugin();
    const stub = absentBigNumberFormatter('import { x } from "y";\nexport function format(v) { return x(v); }\nexport function toFixed(v) { return v; }\n', 'formatter.js');
    assert.equal(stub.trimmed, 2);
    assert.match(stub.text, /^export function format\(\) \{ throw new Error\("mathjs BigNumber formatting is not part/);
    assert.throws(() => absentBigNumberFormatter('export function toFixed(v) { return v; }\n', 'formatter.js'), /no exported function format/);
  });

  it('refused node types: the host reads and refuses formulas exactly as before, and their tree methods throw', async () => {
    const { hostMathjsTrim } = await loadPlugin();
    const { mathjsCompactIdentifier } = await loadIdentifier();
    const host = await buildCoreMath([hostMathjsTrim(ROOT), mathjsCompactIdentifier]);
    const full = await buildCoreMath([]);
    const outcome = (core: CoreLike, text: string): string => {
      try {
        // Not derive(): its simplification runs under a time budget, so its text may differ run to run.
        const f = core.parseFormula(text);
        const d1 = core.differentiate(f.node, f.variable);
        return `ok ${f.node.toString()} | ${d1.toString()} | ${core.differentiate(d1, f.variable).toString()}`;
      } catch (e) {
        const err = e as { code?: string; message: string; position?: number };
        return `error ${err.code} ${err.position} ${err.message}`;
      }
    };
    const refused = ['a = x', 'f(x) = x^2', '[x, 1]', '{a: x}', 'x.y', 'v[1]', '1:3', 'x; x', 'x\n1', 'a.b(x)', 'g(x)[2]', 'x < 1 < 2', '(x = 1) + 2'];
    const read = ['tanh(x) * sigmoid(x)', 'max(x, 0.1 * x)', 'gelu(x)', 'x > 0 ? x : exp(x) - 1', 'log(1 + exp(x))', 'x == 1 ? 0 : x', 'cbrt(x) + atan(x)'];
    for (const text of [...refused, ...read]) assert.equal(outcome(host, text), outcome(full, text), `${text}: ${outcome(host, text)} vs ${outcome(full, text)}`);
    for (const text of ['[x, 1]', '{a: x}', '1:3', 'x; x', 'x < 1 < 2']) assert.match(outcome(host, text), /^error not-allowed/, text);
    // Straight at the whitelist, past the notation layer's own refusals: every refused node type.
    const whitelisted = (core: CoreLike, text: string): string => errorMessage(() => core.checkWhitelist(core.math.parse(text), () => undefined));
    for (const text of ['a = x', 'f(x) = x', '[x, 1]', '{a: x}', 'x.y', 'v[1]', '1:3', 'x; x', 'x < 1 < 2', 'sin(a.b)', 'max([1], x)']) {
      assert.equal(whitelisted(host, text), whitelisted(full, text), text);
    }
    for (const text of read) assert.match(outcome(host, text), /^ok /, text);
    const assignment = host.math.parse('a = x');
    assert.equal(assignment.type, 'AssignmentNode');
    assert.throws(() => assignment.toString(), /_toString not implemented for AssignmentNode/);
    assert.throws(() => host.math.parse('[x, 1]').map((n) => n), /Cannot run map on a Node interface/);
    assert.equal(full.math.parse('a = x').toString(), 'a = x');
  });
});
