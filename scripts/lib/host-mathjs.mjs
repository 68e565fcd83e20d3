// mathjs expression-tree methods the extension host never calls, trimmed from the two extension-host
// bundles at build time (not from the CLI, not from the tests):
//   - LaTeX and HTML output. `latexForm` (mathjs `toTex`) feeds only inspect's `latex` field, which the
//     CLI prints; the hover and diagnostics use the unicode display forms. Trimming the methods lets
//     the LaTeX tables (utils/latex.js, escape-latex) leave the bundle too.
//   - mathjs's own evaluation (`node.compile()`, `node.evaluate()`). The core never evaluates through
//     mathjs: it compiles the whitelisted tree to JavaScript itself (src/core/expr/compile.ts). The
//     plugin also defines SLOPEWISE_HOST_BUNDLE, which leaves out of src/core/math.ts the mathjs
//     functions only that evaluation calls (exp, sin, max, pi, …).
//   - the tree methods (printing, walking, copying, JSON) of the node types the whitelist refuses
//     outright and our generated text never parses into (assignments, arrays, objects, accessors,
//     indexes, ranges, blocks, function definitions): see REFUSED_CLASSES.
// How: in expression/node/*.js the per-class implementations (`_toTex`, `_toHTML`, `_compile`, and
// FunctionNode's `toTex` override) are removed, and the entry points of the base class `Node`
// (`toTex`, `toHTML`, `compile`, `evaluate` and their `_` hooks) throw a clear error instead. Every
// node class inherits from `Node`, so any such call anywhere in the host throws that error. Nested
// helper functions only the removed methods used (FunctionNode's `expandTemplate`) go with
// them. The source is parsed with acorn and cut at node boundaries, never patched by pattern.
//
// Also, in plain/number/*.js, `export function fooNumber(…) {…}` followed by `fooNumber.signature = …`
// becomes `export var fooNumber = /* @__PURE__ */ signed(function fooNumber(…) {…}, …)`: the same
// function with the same property, set at the same point of the module, but in a form esbuild may
// drop when nothing uses it (a top-level property assignment counts as a side effect, so every
// plain-number implementation stayed in the bundle, used or not). Nothing in those files or their
// importers calls them before the module has run (no import cycle reaches them). And in
// factoriesNumber.js the few `export var createX = createNumberFactory(…)` lines that lack mathjs's
// usual `/* #__PURE__ */` mark get it (gamma, lgamma, combinations: unused, they kept their tables).
// And utils/bignumber/formatter.js, which formats BigNumber values, is replaced by functions of the
// same names that throw: the mathjs/number instance has no BigNumber type, so no value reaching
// mathjs's `format` can be one (the only caller tests isBigNumber first).
//
// The build fails, loudly, when
//   - a mathjs file it trims lacks a method or statement it expects (a mathjs upgrade must not
//     silently stop trimming),
//   - it trimmed nothing at all, or mathjs's LaTeX tables still end up in the bundle,
//   - src/core/expr/whitelist.ts stops refusing one of REFUSED_CLASSES outright,
//   - host code of ours uses what is trimmed (latexForm, toTex, toHTML, .compile(), .evaluate(), or
//     one of the left-out functions on the mathjs instance, `math.exp`…).
import fs from 'node:fs';
import path from 'node:path';
import * as acorn from 'acorn';

const MATHJS_LIB = String.raw`[\\/]mathjs[\\/]lib[\\/](?:esm|cjs)[\\/]`;
const PLAIN_NUMBER_FILE = new RegExp(`${MATHJS_LIB}plain[\\\\/]number[\\\\/]\\w+\\.js$`);
const FACTORIES_NUMBER_FILE = new RegExp(`${MATHJS_LIB}factoriesNumber\\.js$`);
const BIGNUMBER_FORMATTER_FILE = new RegExp(`${MATHJS_LIB}utils[\\\\/]bignumber[\\\\/]formatter\\.js$`);
const NODE_FILE = new RegExp(`${MATHJS_LIB}expression[\\\\/]node[\\\\/](\\w*Node)\\.js$`);
const LATEX_TABLES = new RegExp(`${MATHJS_LIB}utils[\\\\/]latex\\.js$|[\\\\/]escape-latex[\\\\/]`);

const ABSENT = (what, why) => `{ throw new Error(${JSON.stringify(`mathjs ${what} is not part of the Slopewise extension-host bundle (scripts/lib/host-mathjs.mjs): ${why}`)}); }`;
const OUTPUT = 'LaTeX and HTML output are CLI features';
const EVALUATION = 'the core evaluates checked trees through src/core/expr/compile.ts';
/** Node.js: bodies replaced. */
const BASE_BODIES = {
  toTex: ABSENT('toTex (LaTeX output)', OUTPUT),
  _toTex: '{ return this.toTex(); }',
  toHTML: ABSENT('toHTML (HTML output)', OUTPUT),
  _toHTML: '{ return this.toHTML(); }',
  compile: ABSENT('compile/evaluate (evaluation of expression trees)', EVALUATION),
  _compile: '{ return this.compile(); }',
  evaluate: '{ return this.compile(); }',
};
/** Every other node class: methods removed (they fall through to Node's). */
const SUBCLASS_REMOVED = ['_toTex', '_toHTML', '_compile'];
const SUBCLASS_OPTIONAL = ['toTex', 'toHTML'];
/**
 * Node types the whitelist (src/core/expr/whitelist.ts) refuses straight after parsing user text, and
 * that our own generated text (stock-mathjs text printed from checked trees: no `=`, `;`, `[`, `{`,
 * `.` after a name, nor `:` outside `?:`) never parses into. Nothing in the host walks, prints, copies
 * or serialises them, so their tree methods go too (they fall through to Node's, which throw);
 * constructors and what the constructors call stay. RelationalNode is not among them: printed chains
 * of comparisons can parse back into one.
 */
const REFUSED_CLASSES = ['AccessorNode', 'ArrayNode', 'AssignmentNode', 'BlockNode', 'FunctionAssignmentNode', 'IndexNode', 'ObjectNode', 'RangeNode'];
const REFUSED_REMOVED = ['_toString', 'forEach', 'map', 'clone', 'toJSON', 'static fromJSON'];

/** Our modules that may mention LaTeX output in the host graph: where it is defined or re-exported. */
const LATEX_DEFINERS = new Set(['src/core/expr/display.ts', 'src/core/expr/index.ts']);
const USES_LATEX_OR_HTML = /\blatexForm\b|\.(?:toTex|toHTML)\s*\(/;
const USES_EVALUATION = /\.(?:compile|evaluate)\s*\(/;
/** The functions src/core/math.ts leaves out when SLOPEWISE_HOST_BUNDLE is defined. */
const EVALUATION_ONLY = ['exp', 'log', 'log1p', 'expm1', 'sqrt', 'cbrt', 'abs', 'sign', 'sin', 'cos', 'tan', 'sinh', 'cosh',
  'tanh', 'sech', 'asinh', 'atan', 'max', 'min', 'mod', 'pi', 'e'];
// Not inside a string ('math.exp' is text guess.ts looks for) or a comment (stripped first).
const USES_EVALUATION_ONLY = new RegExp(`(?<!['"\`\\w.])\\bmath\\.(?:${EVALUATION_ONLY.join('|')})\\b`);
const withoutComments = (ts) => ts.replace(/\/\*[\s\S]*?\*\//g, '').replace(/(^|[^:'"\\])\/\/.*$/gm, '$1');

function walk(node, visit) {
  if (!node || typeof node.type !== 'string') return;
  if (visit(node) === false) return;
  for (const key of Object.keys(node)) {
    const v = node[key];
    if (Array.isArray(v)) for (const c of v) walk(c, visit);
    else if (v && typeof v.type === 'string') walk(v, visit);
  }
}

function parse(src, file) {
  return acorn.parse(src, { ecmaVersion: 'latest', sourceType: /[\\/]cjs[\\/]/.test(file) ? 'script' : 'module' });
}

/** Applies [start, end, replacement] cuts, which must not overlap. */
function splice(src, cuts) {
  let out = src;
  for (const [s, e, text] of [...cuts].sort((a, b) => b[0] - a[0])) out = out.slice(0, s) + text + out.slice(e);
  return out;
}

const methodName = (n) => n.type === 'MethodDefinition' && !n.computed && n.key.type === 'Identifier' ? n.key.name : null;

/** Trims one expression/node/*.js file; returns its new text, or throws saying what it missed. */
export function trimNodeFile(src, file, className) {
  const cuts = [];
  const found = new Map();
  walk(parse(src, file), (n) => {
    if (n.type !== 'ClassDeclaration' && n.type !== 'ClassExpression') return undefined;
    if (n.id?.name !== className) return undefined;
    for (const m of n.body.body) {
      const name = methodName(m);
      if (!name) continue;
      if (REFUSED_CLASSES.includes(className) && REFUSED_REMOVED.includes(m.static ? `static ${name}` : name)) {
        cuts.push([m.start, m.end, '']);
        found.set(m.static ? `static ${name}` : name, (found.get(m.static ? `static ${name}` : name) ?? 0) + 1);
        continue;
      }
      if (m.static) continue;
      if (className === 'Node' && Object.hasOwn(BASE_BODIES, name)) {
        cuts.push([m.value.body.start, m.value.body.end, BASE_BODIES[name]]);
        found.set(name, (found.get(name) ?? 0) + 1);
      } else if (className !== 'Node' && (SUBCLASS_REMOVED.includes(name) || SUBCLASS_OPTIONAL.includes(name))) {
        cuts.push([m.start, m.end, '']);
        found.set(name, (found.get(name) ?? 0) + 1);
      }
    }
    return false;
  });
  const expected = className === 'Node' ? Object.keys(BASE_BODIES)
    : [...SUBCLASS_REMOVED, ...(REFUSED_CLASSES.includes(className) ? REFUSED_REMOVED : [])];
  const missing = expected.filter((name) => found.get(name) !== 1);
  if (missing.length) {
    throw new Error(`expected one method ${missing.join(', ')} in class ${className} of ${file}, found ` +
      `${missing.map((m) => found.get(m) ?? 0).join(', ')}: mathjs changed; update scripts/lib/host-mathjs.mjs`);
  }
  const text = dropUnusedLocalFunctions(splice(src, cuts), file);
  return { text: text.text, trimmed: cuts.length + text.dropped };
}

/**
 * Removes function declarations nested in a function (mathjs's factory bodies) whose name no longer
 * occurs anywhere else in the file, repeatedly: helpers only the trimmed methods called, such as
 * FunctionNode's `expandTemplate`; likewise `var access = accessFactory(…)` (and assignFactory), the
 * evaluation helpers of AccessorNode and AssignmentNode, whose factories only build a closure.
 * esbuild keeps unused nested declarations. Conservative: any other identifier of the same name, in
 * any scope, keeps the declaration.
 */
const PURE_HELPER_FACTORIES = new Set(['accessFactory', 'assignFactory']);
function dropUnusedLocalFunctions(src, file) {
  let text = src;
  let dropped = 0;
  for (;;) {
    const uses = new Map();
    const nested = [];
    walk(parse(text, file), (n) => {
      if (n.type === 'Identifier') uses.set(n.name, (uses.get(n.name) ?? 0) + 1);
      if (n.type === 'FunctionDeclaration' || n.type === 'FunctionExpression' || n.type === 'ArrowFunctionExpression') {
        const body = n.body.type === 'BlockStatement' ? n.body.body : [];
        for (const s of body) {
          if (s.type === 'FunctionDeclaration' && s.id) nested.push({ node: s, name: s.id.name });
          const d = s.type === 'VariableDeclaration' && s.declarations.length === 1 ? s.declarations[0] : null;
          if (d?.id.type === 'Identifier' && d.init?.type === 'CallExpression' && d.init.callee.type === 'Identifier' &&
            PURE_HELPER_FACTORIES.has(d.init.callee.name)) nested.push({ node: s, name: d.id.name });
        }
      }
      return undefined;
    });
    const unused = nested.filter((f) => uses.get(f.name) === 1);
    if (!unused.length) return { text, dropped };
    text = splice(text, unused.map((f) => [f.node.start, f.node.end, '']));
    dropped += unused.length;
  }
}

const SIGNED = '__slopewiseSigned';

/**
 * Rewrites each `export function f(…) {…}` directly followed by `f.signature = expr;` into a pure
 * call that returns the function with its signature set. Returns the new text and how many.
 */
export function pureSignatures(src, file) {
  const body = parse(src, file).body;
  const cuts = [];
  for (let i = 0; i + 1 < body.length; i++) {
    const decl = body[i];
    const next = body[i + 1];
    const fnDecl = decl.type === 'ExportNamedDeclaration' ? decl.declaration : null;
    if (fnDecl?.type !== 'FunctionDeclaration' || fnDecl.async || fnDecl.generator) continue;
    const name = fnDecl.id.name;
    const e = next.type === 'ExpressionStatement' ? next.expression : null;
    if (e?.type !== 'AssignmentExpression' || e.operator !== '=' || e.left.type !== 'MemberExpression' || e.left.computed ||
      e.left.object.type !== 'Identifier' || e.left.object.name !== name || e.left.property.name !== 'signature') continue;
    cuts.push([decl.start, next.end,
      `export var ${name} = /* @__PURE__ */ ${SIGNED}(${src.slice(fnDecl.start, fnDecl.end)}, ${src.slice(e.right.start, e.right.end)});`]);
    i++;
  }
  const text = cuts.length ? `${splice(src, cuts)}\nfunction ${SIGNED}(fn, signature) {\n  fn.signature = signature;\n  return fn;\n}\n` : src;
  // Nothing else may still assign a signature at the top level (a form this rewrite does not know).
  const left = parse(text, file).body.filter((n) => n.type === 'ExpressionStatement' && /\.signature\s*=/.test(text.slice(n.start, n.end)));
  if (left.length) throw new Error(`top-level signature assignments this plugin does not recognise in ${file}: update scripts/lib/host-mathjs.mjs`);
  return { text, trimmed: cuts.length };
}

/** Marks `export var createX = createNumberFactory(…)` (and the like) pure where mathjs did not. */
export function pureFactories(src, file) {
  const cuts = [];
  for (const n of parse(src, file).body) {
    const d = n.type === 'ExportNamedDeclaration' ? n.declaration : null;
    if (d?.type !== 'VariableDeclaration' || d.declarations.length !== 1) continue;
    const init = d.declarations[0].init;
    if (init?.type !== 'CallExpression' || init.callee.type !== 'Identifier' || !/^(?:factory|createNumber\w*Factory)$/.test(init.callee.name)) continue;
    if (/__PURE__/.test(src.slice(d.declarations[0].id.end, init.start))) continue;
    cuts.push([init.start, init.start, '/* @__PURE__ */ ']);
  }
  if (!cuts.length) {
    throw new Error(`every factory in ${file} is marked pure already: mathjs fixed it; drop pureFactories from scripts/lib/host-mathjs.mjs`);
  }
  return { text: splice(src, cuts), trimmed: cuts.length };
}

/** The exported functions of bignumber/formatter.js, each throwing; `format` must be among them. */
export function absentBigNumberFormatter(src, file) {
  const names = [];
  for (const n of parse(src, file).body) {
    if (n.type === 'ExportNamedDeclaration' && n.declaration?.type === 'FunctionDeclaration') names.push(n.declaration.id.name);
    else if (n.type.startsWith('Export')) throw new Error(`an export other than a function declaration in ${file}: update scripts/lib/host-mathjs.mjs`);
  }
  if (!names.includes('format')) throw new Error(`no exported function format in ${file}: update scripts/lib/host-mathjs.mjs`);
  const body = ABSENT('BigNumber formatting', 'its mathjs/number instance has no BigNumber type');
  return { text: names.map((name) => `export function ${name}() ${body}\n`).join(''), trimmed: names.length };
}

/** The plugin. `root` is the build's absWorkingDir (metafile inputs are relative to it). */
export function hostMathjsTrim(root) {
  return {
    name: 'host-mathjs',
    setup(build) {
      build.initialOptions.define = { ...build.initialOptions.define, SLOPEWISE_HOST_BUNDLE: 'true' };
      let trimmed = 0;
      let signed = 0;
      let nodeFiles = 0;
      build.onStart(() => { trimmed = 0; nodeFiles = 0; signed = 0; });
      const load = (trim, count) => async (args) => {
        const src = await fs.promises.readFile(args.path, 'utf8');
        try {
          const r = trim(src, args.path);
          count(r.trimmed);
          return { contents: r.text, loader: 'js' };
        } catch (e) {
          return { errors: [{ text: `host-mathjs: ${e.message}` }] };
        }
      };
      build.onLoad({ filter: PLAIN_NUMBER_FILE }, load(pureSignatures, (n) => { signed += n; }));
      build.onLoad({ filter: FACTORIES_NUMBER_FILE }, load(pureFactories, () => {}));
      build.onLoad({ filter: BIGNUMBER_FORMATTER_FILE }, load(absentBigNumberFormatter, () => {}));
      build.onLoad({ filter: NODE_FILE }, load((src, file) => {
        nodeFiles++;
        return trimNodeFile(src, file, NODE_FILE.exec(file)[1]);
      }, (n) => { trimmed += n; }));
      build.onEnd((result) => {
        if (!result.metafile || result.errors.length) return undefined;
        const errors = [];
        if (signed === 0) {
          errors.push({ text: 'host-mathjs: no `fooNumber.signature = …` found in mathjs plain/number/*.js: the mathjs layout changed; update scripts/lib/host-mathjs.mjs' });
        }
        if (nodeFiles === 0 || trimmed === 0) {
          errors.push({ text: 'host-mathjs: no mathjs expression node file was loaded or trimmed: the mathjs layout changed; update scripts/lib/host-mathjs.mjs' });
        }
        for (const out of Object.values(result.metafile.outputs)) {
          for (const [input, info] of Object.entries(out.inputs)) {
            if (LATEX_TABLES.test(`/${input}`) && info.bytesInOutput > 0) {
              errors.push({ text: `host-mathjs: ${input} is still in the extension-host bundle (${info.bytesInOutput} bytes): something else uses mathjs's LaTeX tables; update scripts/lib/host-mathjs.mjs` });
            }
          }
        }
        const whitelist = fs.readFileSync(path.join(root, 'src/core/expr/whitelist.ts'), 'utf8');
        for (const cls of REFUSED_CLASSES) {
          if (!new RegExp(`case '${cls}':(\\s*case '\\w+':)*\\s*throw `).test(whitelist)) {
            errors.push({ text: `host-mathjs: src/core/expr/whitelist.ts no longer refuses ${cls} outright, but the host bundles trim its tree methods: update REFUSED_CLASSES in scripts/lib/host-mathjs.mjs` });
          }
        }
        for (const input of Object.keys(result.metafile.inputs)) {
          if (!input.startsWith('src/')) continue;
          const text = fs.readFileSync(path.join(root, input), 'utf8');
          if (!LATEX_DEFINERS.has(input) && USES_LATEX_OR_HTML.test(text)) {
            errors.push({ text: `${input} uses LaTeX or HTML output (latexForm/toTex/toHTML), which the extension-host bundles leave out (scripts/lib/host-mathjs.mjs)` });
          }
          const evalOnly = USES_EVALUATION_ONLY.exec(withoutComments(text));
          if (evalOnly) {
            errors.push({ text: `${input} uses ${evalOnly[0]}, which the extension-host bundles leave out of the mathjs instance (src/core/math.ts, SLOPEWISE_HOST_BUNDLE)` });
          }
          if (USES_EVALUATION.test(text)) {
            errors.push({ text: `${input} calls .compile()/.evaluate(), which the extension-host bundles leave out of mathjs trees (scripts/lib/host-mathjs.mjs): use src/core/expr/compile.ts` });
          }
        }
        // esbuild does not print errors returned from onEnd: say it here.
        for (const e of errors) console.error(`✘ [ERROR] ${e.text}`);
        return { errors };
      });
    },
  };
}
