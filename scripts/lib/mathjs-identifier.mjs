// mathjs's typed-function setup (core/function/typed.js) registers a deprecated type `identifier`
// ("a letter, then letters or digits") whose test is a regular expression that mathjs's Babel build
// expanded from Unicode property escapes into explicit UTF-16 ranges: 16.7 kB of a minified bundle.
// No signature uses the type; typed-function only runs its test when it lists the types of a
// mismatched argument in an error message.
//
// This esbuild plugin, for the extension-host bundles, puts the compact form `/^[\p{L}][\p{L}\d]*$/u`
// back, after proving at build time that it accepts exactly the same strings as the expanded one
// under the building Node's Unicode tables: both have the form ^F(C)*$, so it suffices that the
// one-character classes F and C agree on every code point. The build fails if mathjs's expression
// changes or the proof does not hold. (At run time `\p{L}` follows the engine's Unicode version,
// which the expanded form froze; the difference is letters newer than the engine, in error text.)
import fs from 'node:fs';
import * as acorn from 'acorn';

const TYPED_FILE = /[\\/]mathjs[\\/]lib[\\/](?:esm|cjs)[\\/]core[\\/]function[\\/]typed\.js$/;
// `[\p{L}]`, not `\p{L}`: esbuild 0.28 turns a regular expression with a bare property escape into a
// `new RegExp` call (built anew on each test) for target node20.
export const COMPACT_IDENTIFIER = String.raw`/^[\p{L}][\p{L}\d]*$/u`;

/** Every code point on which two ^F(C)*$ expressions' classes differ (at most `limit`). */
export function identifierDifferences(expanded, compact, limit = 10) {
  const diffs = [];
  for (let c = 0; c <= 0x10ffff && diffs.length < limit; c++) {
    const ch = String.fromCodePoint(c);
    if (expanded.test(ch) !== compact.test(ch)) diffs.push(`U+${c.toString(16).toUpperCase()} (first)`);
    else if (expanded.test(`a${ch}`) !== compact.test(`a${ch}`)) diffs.push(`U+${c.toString(16).toUpperCase()} (later)`);
  }
  return diffs;
}

function walk(node, visit) {
  if (!node || typeof node.type !== 'string') return;
  visit(node);
  for (const key of Object.keys(node)) {
    const v = node[key];
    if (Array.isArray(v)) for (const c of v) walk(c, visit);
    else if (v && typeof v.type === 'string') walk(v, visit);
  }
}

const propKey = (p) => p.type === 'Property' && !p.computed ? (p.key.name ?? p.key.value) : undefined;

/** Returns typed.js with the identifier test's expression replaced, or throws saying why not. */
export function compactIdentifierType(src, file) {
  const ast = acorn.parse(src, { ecmaVersion: 'latest', sourceType: /[\\/]cjs[\\/]/.test(file) ? 'script' : 'module' });
  const literals = [];
  walk(ast, (n) => {
    if (n.type !== 'ObjectExpression') return;
    const name = n.properties.find((p) => propKey(p) === 'name');
    const test = n.properties.find((p) => propKey(p) === 'test');
    if (name?.value.type !== 'Literal' || name.value.value !== 'identifier' || !test) return;
    walk(test.value, (m) => { if (m.type === 'Literal' && m.regex) literals.push(m); });
  });
  if (literals.length !== 1) {
    throw new Error(`expected one regular expression in the test of mathjs's "identifier" type in ${file}, found ${literals.length}: ` +
      'mathjs changed; update scripts/lib/mathjs-identifier.mjs');
  }
  const [lit] = literals;
  const expanded = new RegExp(lit.regex.pattern, lit.regex.flags);
  const compact = new RegExp(COMPACT_IDENTIFIER.slice(1, -2), 'u');
  if (!/^\^\(\?:/.test(lit.regex.pattern) || !lit.regex.pattern.endsWith('*$')) {
    throw new Error(`mathjs's "identifier" expression in ${file} is no longer of the form ^(?:…)(?:…)*$: update scripts/lib/mathjs-identifier.mjs`);
  }
  const diffs = identifierDifferences(expanded, compact);
  if (diffs.length) {
    throw new Error(`${COMPACT_IDENTIFIER} differs from mathjs's "identifier" expression in ${file} at ${diffs.join(', ')}: update scripts/lib/mathjs-identifier.mjs`);
  }
  return src.slice(0, lit.start) + COMPACT_IDENTIFIER + src.slice(lit.end);
}

export const mathjsCompactIdentifier = {
  name: 'mathjs-compact-identifier',
  setup(build) {
    let done = 0;
    build.onStart(() => { done = 0; });
    build.onLoad({ filter: TYPED_FILE }, async (args) => {
      const src = await fs.promises.readFile(args.path, 'utf8');
      try {
        const contents = compactIdentifierType(src, args.path);
        done++;
        return { contents, loader: 'js' };
      } catch (e) {
        return { errors: [{ text: `mathjs-compact-identifier: ${e.message}` }] };
      }
    });
    build.onEnd((result) => {
      if (result.errors.length || done > 0) return undefined;
      const text = 'mathjs-compact-identifier: mathjs core/function/typed.js was not loaded: the mathjs layout changed; update scripts/lib/mathjs-identifier.mjs';
      console.error(`✘ [ERROR] ${text}`);
      return { errors: [{ text }] };
    });
  },
};
