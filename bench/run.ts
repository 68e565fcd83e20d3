/**
 * `npm run bench [-- --quick] [--only key,key] [--seed S]`
 *
 * The costs that matter, as ratios against the best baseline measured in the same run (shared
 * machines are noisy; absolute times are not comparable between runs). Prints a table with each
 * figure against its goal and writes bench/results.json (git-ignored). `--quick` runs every
 * measurement at tiny sizes in seconds (npm test runs it so the bench cannot rot); its figures are
 * not meaningful. Benchmarks are not tests: nothing here fails on a time.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import * as fs from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import type { MathNode } from 'mathjs';
import { CATALOGUE, derive, parseFormula, simplifyWithinBudget } from '../src/core/expr';
import { CATALOGUE_JS, defaultParams } from '../src/core/expr/catalogue-js';
import { compileScalar } from '../src/core/expr/compile';
import { clearInspectCache, inspect } from '../src/core/inspect';
import { buildHoverCard, type HoverInput } from '../src/core/hover';
import { checkText, clearCheckCaches, createChecker } from '../src/core/check';
import { analyzeSource, findFormulas } from '../src/core/detect';
import { LIMITS } from '../src/core/limits';
import { math } from '../src/core/math';
import { FLOAT_TYPES } from '../src/core/types';
import { adversarialInputs } from './adversarial';
import { bareCommentScan, commentSyntax, mixedLanguageFiles, writeTree, type LangFile } from './generate';
import { consume, makeLoop, median, now, paired, perCall, sink } from './timing';

const ROOT = path.resolve(__dirname, '..');

interface Args { quick: boolean; only: Set<string> | null; seed: number }

function parseArgs(argv: string[]): Args {
  const a: Args = { quick: false, only: null, seed: 42 };
  for (let i = 0; i < argv.length; i++) {
    const s = argv[i] as string;
    if (s === '--quick') a.quick = true;
    else if (s === '--only') a.only = new Set((argv[++i] ?? '').split(','));
    else if (s.startsWith('--only=')) a.only = new Set(s.slice(7).split(','));
    else if (s === '--seed') a.seed = Number(argv[++i]);
    else {
      process.stderr.write(`bench: unknown option ${s}\nusage: npm run bench -- [--quick] [--only section,…] [--seed S]\n`);
      process.exit(2);
    }
  }
  return a;
}

type Row = { key: string; what: string; value: number | string | null; goal: string; ok: boolean | null; detail?: string };
const rows: Row[] = [];
const results: Record<string, unknown> = {};

function record(key: string, what: string, value: number | null, goal: string, ok: boolean | null, detail?: string, extra?: Record<string, unknown>): void {
  const row: Row = { key, what, value, goal, ok };
  if (detail !== undefined) row.detail = detail;
  rows.push(row);
  results[key] = value;
  if (extra) Object.assign(results, extra);
  const shown = typeof value === 'number' ? fmt(value) : String(value);
  console.log(`  ${key}: ${shown}${detail ? `  (${detail})` : ''}`);
}

function fmt(v: number): string {
  if (!Number.isFinite(v)) return String(v);
  if (Math.abs(v) >= 1000) return Math.round(v).toLocaleString('en-US');
  if (Math.abs(v) >= 10) return v.toFixed(1);
  if (Math.abs(v) >= 0.1) return v.toFixed(3);
  return v.toPrecision(3);
}

// ─── 1. sampling: generated JS vs hand-written vs mathjs compile ──────────────────────────────────

interface CatFn { name: string; order: 0 | 1 | 2; ours: (x: number) => number; hand: (x: number) => number; node: MathNode; variable: string; params: Record<string, number> }

/** Loss targets and domains: hinge losses take y ∈ {−1, 1}; BCE needs p in (0, 1). */
const LOSS_SETUP: Record<string, { y: number; domain: [number, number] }> = {
  bce: { y: 0.3, domain: [0.001, 0.999] },
  hinge: { y: 1, domain: [-3, 3] },
  squared_hinge: { y: 1, domain: [-3, 3] },
};

function catalogueFunctions(quick: boolean): { fns: CatFn[]; domains: Map<string, [number, number]> } {
  const fns: CatFn[] = [];
  const domains = new Map<string, [number, number]>();
  let entries = CATALOGUE.filter((e) => CATALOGUE_JS[e.name] !== undefined);
  if (quick) entries = entries.filter((e) => ['sigmoid', 'gelu_tanh', 'elu', 'mse'].includes(e.name));
  for (const e of entries) {
    const hand = CATALOGUE_JS[e.name]!;
    const isLoss = e.role === 'loss';
    const setup = LOSS_SETUP[e.name] ?? { y: 0.3, domain: [-6, 6] as [number, number] };
    const variable = isLoss ? (e.args[0] as string) : 'x';
    const params: Record<string, number> = { ...defaultParams(e.name) };
    if (isLoss) params[e.args[1] as string] = setup.y;
    const handParams = isLoss ? { ...params, y: setup.y } : params;
    const text = isLoss ? `${e.name}(${e.args[0]}, ${e.args[1]})` : `${e.name}(x)`;
    const formula = parseFormula(text, { variable, params: isLoss ? { [e.args[1] as string]: setup.y } : {} });
    const d = derive(formula);
    const nodes: [0 | 1 | 2, MathNode][] = [[0, formula.node], [1, d.firstNode], [2, d.secondNode]];
    domains.set(e.name, isLoss ? setup.domain : [-6, 6]);
    for (const [order, node] of nodes) {
      const h = order === 0 ? hand.f : order === 1 ? hand.d1 : hand.d2;
      fns.push({ name: e.name, order, ours: compileScalar(node, variable, formula.parameters), hand: (x) => h(x, handParams), node, variable, params: formula.parameters });
    }
  }
  return { fns, domains };
}

function points(n: number, [a, b]: [number, number]): Float64Array {
  const xs = new Float64Array(n);
  // Offset grid so no point sits exactly on a kink.
  for (let i = 0; i < n; i++) xs[i] = a + ((i + 0.5) / n) * (b - a);
  return xs;
}

const ORDER_NAME = ['f', "f'", "f''"];

function benchSampling(args: Args): void {
  console.log('\n[sampling] f, f′, f″ of the catalogue: generated JS vs hand-written JS vs mathjs compile().evaluate');
  const { fns, domains } = catalogueFunctions(args.quick);
  const sizes = args.quick ? [200, 2_000] : [2_000, 200_000];
  const rounds = args.quick ? 2 : 7;
  const perFunction: { name: string; order: string; size: number; ratio: number; oursMs: number; handMs: number }[] = [];
  for (const size of sizes) {
    const minMs = args.quick ? 0.5 : size >= 100_000 ? 12 : 6;
    for (const fn of fns) {
      const xs = points(size, domains.get(fn.name) ?? [-6, 6]);
      const loopA = makeLoop();
      const loopB = makeLoop();
      // Same results, or the comparison means nothing.
      const sa = loopA(fn.ours, xs);
      const sb = loopB(fn.hand, xs);
      if (!(Math.abs(sa - sb) <= 1e-6 * Math.max(1, Math.abs(sb))) && !(Number.isNaN(sa) && Number.isNaN(sb))) {
        console.log(`  note: ${fn.name} ${ORDER_NAME[fn.order]}: generated and hand-written sums differ (${sa} vs ${sb})`);
      }
      const p = paired(rounds, () => perCall(() => consume(loopA(fn.ours, xs)), minMs), () => perCall(() => consume(loopB(fn.hand, xs)), minMs), 2);
      perFunction.push({ name: fn.name, order: ORDER_NAME[fn.order] as string, size, ratio: p.ratio, oursMs: median(p.a), handMs: median(p.b) });
    }
  }
  const ratios = perFunction.map((r) => r.ratio);
  const worst = perFunction.reduce((w, r) => (r.ratio > w.ratio ? r : w));
  const bySize = sizes.map((s) => `${s.toLocaleString('en-US')} pts ${fmt(median(perFunction.filter((r) => r.size === s).map((r) => r.ratio)))}`).join(', ');
  record('samplingVsHandwritten', 'evaluator ÷ hand-written JS (median over f, f′, f″ of the catalogue)', median(ratios), '≤ 1.2', median(ratios) <= 1.2,
    `${bySize}; worst ${worst.name} ${worst.order} @${worst.size}: ${fmt(worst.ratio)}`,
    { samplingVsHandwrittenWorst: worst, samplingVsHandwrittenBySize: Object.fromEntries(sizes.map((s) => [s, median(perFunction.filter((r) => r.size === s).map((r) => r.ratio))])), samplingDetail: perFunction });

  // mathjs compile().evaluate, for reference (2,000 points; it is 10–30× slower, 200,000 would take minutes).
  const mj: { name: string; order: string; ratio: number }[] = [];
  const size = args.quick ? 200 : 2_000;
  const mjFns = args.quick ? fns.slice(0, 3) : fns;
  for (const fn of mjFns) {
    const xs = points(size, domains.get(fn.name) ?? [-6, 6]);
    const compiled = fn.node.compile();
    const scope: Record<string, number> = { ...fn.params };
    const viaMathjs = (x: number): number => { scope[fn.variable] = x; return compiled.evaluate(scope) as number; };
    const loopA = makeLoop();
    const loopB = makeLoop();
    try {
      viaMathjs(0.5);
    } catch {
      continue; // a canonical tree mathjs's own evaluator cannot run (none expected)
    }
    const p = paired(args.quick ? 1 : 3, () => perCall(() => consume(loopA(viaMathjs, xs)), 0), () => perCall(() => consume(loopB(fn.hand, xs)), 2), 1);
    mj.push({ name: fn.name, order: ORDER_NAME[fn.order] as string, ratio: p.ratio });
  }
  const mjMedian = median(mj.map((r) => r.ratio));
  const mjWorst = mj.reduce((w, r) => (r.ratio > w.ratio ? r : w), { name: '', order: '', ratio: 0 });
  record('mathjsCompileVsHandwritten', 'mathjs compile().evaluate ÷ hand-written JS (2,000 points, median)', mjMedian, '—', null,
    `worst ${mjWorst.name} ${mjWorst.order}: ${fmt(mjWorst.ratio)}`, { mathjsCompileVsHandwrittenWorst: mjWorst });
}

// ─── 2. hover: cached vs first ───────────────────────────────────────────────────────────────────

const HOVER_FORMULAS = [
  '1/(1+exp(-x))', 'x * tanh(log(1 + exp(x)))', '0.5*x*(1+tanh(sqrt(2/pi)*(x+0.044715*x^3)))', 'np.maximum(x, 0.01*x)',
  'x if x > 0 else 1.0*(np.exp(x)-1)', 'log(1+exp(x))', 'x / (1 + abs(x))', 'σ(x)·(1 − σ(x))', '\\frac{x}{1+e^{-x}}',
  'fmaxf(x, 0.0f) + 0.1f * fminf(x, 0.0f)', '(-x).exp()', 'tanh(x)^2',
];

function hoverOnce(text: string): number {
  const r = inspect(text);
  const card = buildHoverCard(r as unknown as HoverInput, { floatTypes: FLOAT_TYPES });
  return card.length;
}

function benchHover(args: Args): void {
  console.log('\n[hover] inspect + hover card: a formula already seen ÷ the first time');
  const formulas = args.quick ? HOVER_FORMULAS.slice(0, 2) : HOVER_FORMULAS;
  // Warm the JIT on other inputs (variants that are not in the list), so "first" is not the process's first call.
  for (const f of ['tanh(x)', 'exp(-x^2)', 'max(x, 0)']) hoverOnce(f);
  const rounds = args.quick ? 1 : 3;
  const ratios: number[] = [];
  const firsts: number[] = [];
  const cached: number[] = [];
  for (let round = 0; round < rounds; round++) {
    clearInspectCache();
    for (const f of formulas) {
      const t0 = now();
      consume(hoverOnce(f));
      const first = now() - t0;
      const again = perCall(() => consume(hoverOnce(f)), args.quick ? 0.2 : 5);
      firsts.push(first);
      cached.push(again);
      ratios.push(again / first);
    }
  }
  const ratio = median(cached) / median(firsts);
  record('cachedHoverVsFirst', 'hover of a formula already seen ÷ first time', ratio, '≤ 0.05', ratio <= 0.05,
    `first ${fmt(median(firsts))} ms, cached ${fmt(median(cached))} ms (core inspect cache + card rendering; the editor's own card cache skips the rendering too)`,
    { cachedHoverFirstMs: median(firsts), cachedHoverMs: median(cached) });
}

// ─── 3. check: full check vs bare comment scan; one-line edit vs full ───────────────────────────

/** A cold full check: the shared cache is emptied first, so only repeats within the input are reused. */
function checkAll(files: readonly LangFile[]): number {
  clearCheckCaches();
  let n = 0;
  for (const f of files) n += checkText(f.text, { languageId: f.languageId, fileName: f.fileName }).length;
  return n;
}

/** Detection only (no engine): what analyzeSource finds in every file. */
function detectAll(files: readonly LangFile[]): number {
  let n = 0;
  for (const f of files) {
    const m = analyzeSource(f.text, { languageId: f.languageId, fileName: f.fileName });
    n += m.codeFormulas.length + m.commentFormulas.length;
  }
  return n;
}

/** The canonical (stock mathjs) text of every formula a check of the files reads. */
function canonicalTexts(files: readonly LangFile[]): string[] {
  const out: string[] = [];
  for (const f of files) {
    for (const x of findFormulas(f.text, { languageId: f.languageId, fileName: f.fileName })) {
      try {
        out.push(parseFormula(x.text, { language: x.language, ...(x.variable ? { variable: x.variable } : {}), ...(x.params ? { params: x.params } : {}) }).expression);
      } catch {
        // findFormulas returns only what the engine reads; nothing to add
      }
    }
  }
  return out;
}

function scanAll(files: readonly LangFile[]): number {
  let n = 0;
  for (const f of files) {
    const s = commentSyntax(f.languageId);
    n += bareCommentScan(f.text, s.line, s.block).length;
  }
  return n;
}

/** One-line edit in the middle of the first file: a constant in a formula changed (by `by`). */
function editOneLine(files: readonly LangFile[], by = 1): LangFile[] {
  const [first, ...rest] = files;
  if (!first) return [];
  const lines = first.text.split('\n');
  let at = lines.findIndex((l, i) => i > lines.length / 2 && /return .*\d/.test(l));
  if (at < 0) at = Math.floor(lines.length / 2);
  lines[at] = (lines[at] as string).replace(/(\d+)(?!.*\d)/, (m) => String(Number(m) + by));
  return [{ ...first, text: lines.join('\n') }, ...rest];
}

function benchCheck(args: Args): void {
  const totalLines = args.quick ? 400 : 10_000;
  const files = mixedLanguageFiles(args.seed, totalLines);
  const lines = files.reduce((s, f) => s + f.text.split('\n').length - 1, 0);
  console.log(`\n[check] ${lines.toLocaleString('en-US')} lines in ${files.length} languages (${files.map((f) => f.languageId).join(', ')})`);
  checkAll(files); // warm-up
  const rounds = args.quick ? 1 : 3;
  const p = paired(rounds, () => { const t0 = now(); consume(checkAll(files)); return now() - t0; }, () => perCall(() => consume(scanAll(files)), 20));
  record('fullCheckVsCommentScan', `full check ÷ one bare comment pass (${lines.toLocaleString('en-US')} lines)`, p.ratio, '≤ 10', p.ratio <= 10,
    `check ${fmt(median(p.a))} ms, comment pass ${fmt(median(p.b))} ms`, { fullCheckMs: median(p.a), commentScanMs: median(p.b) });
  // Where a full check's time goes: detection alone (lexing, comments, functions; no engine) against
  // the same bare pass, and the number of formulas the rest of the check reads and analyses.
  const d = paired(rounds, () => perCall(() => consume(detectAll(files)), 20), () => perCall(() => consume(scanAll(files)), 20));
  const found = detectAll(files);
  record('detectionVsCommentScan', 'detection alone ÷ one bare comment pass (informational)', d.ratio, '—', null,
    `detection ${fmt(median(d.a))} ms; ${found} formulas found, the rest of the check (${fmt(Math.max(0, median(p.a) - median(d.a)))} ms) reads, differentiates, compares and float-scans them: ${fmt(Math.max(0, median(p.a) - median(d.a)) / Math.max(1, found))} ms each`,
    { detectionMs: median(d.a), formulasFound: found });
  // A floor no checker that reads formulas with mathjs can go under: mathjs's parse alone of the
  // canonical text of every formula the check reads (no notation, no whitelist, no derivative).
  const canonical = canonicalTexts(files);
  const m = paired(rounds, () => perCall(() => { for (const t of canonical) consume(math.parse(t).type.length); }, 20), () => perCall(() => consume(scanAll(files)), 20));
  // Each rule's share: a cold check with only that rule minus one with no rule enabled (detection,
  // reading every formula, pairing derivatives with forwards and comparing them: the check's
  // pairs are reported whatever the rules), both ÷ the bare pass.
  const RULES = ['derivative-mismatch', 'formula-mismatch', 'unstable-form', 'vanishing-pair'] as const;
  const withRules = (rules: readonly (typeof RULES)[number][]): number => {
    const t0 = now();
    clearCheckCaches();
    for (const f of files) consume(checkText(f.text, { languageId: f.languageId, fileName: f.fileName, rules }).length);
    return now() - t0;
  };
  const base = median(Array.from({ length: rounds }, () => withRules([])));
  const bare = median(p.b);
  const shares = RULES.map((r) => [r, Math.max(0, median(Array.from({ length: rounds }, () => withRules([r]))) - base) / bare] as const);
  record('checkReadingVsCommentScan', 'cold check with no rule enabled (detect, read, pair, compare) ÷ bare pass (informational)', base / bare, '—', null,
    `each rule on top: ${shares.map(([r, v]) => `${r} ${fmt(v)}`).join(', ')}`, { checkRuleShares: Object.fromEntries(shares) });
  record('mathjsParseVsCommentScan', 'mathjs parse alone of the formulas read ÷ one bare comment pass (informational: a floor)', m.ratio, '—', null,
    `${canonical.length} canonical texts parsed in ${fmt(median(m.a))} ms`, { mathjsParseMs: median(m.a) });

  // What the editor does after an edit (src/extension/diagnostics.ts): the debounced re-check of the
  // document through that document's checker (createChecker), which has checked the text before the
  // edit. Each round: a fresh checker checks the file (not timed), a different one-line edit is
  // applied, the re-check is timed; against a cold full check of the same edited text (shared cache
  // emptied), interleaved. Both sides must return the same findings.
  const first = files[0] as LangFile;
  const opts = { languageId: first.languageId, fileName: first.fileName };
  let round = 0;
  // Each round is one re-check of a few ms (a single sample, unlike the loops above): more rounds and
  // a longer warm-up (the re-check's own code paths: relex, the detection memo) than the full check.
  const q = paired(args.quick ? 1 : 9, () => {
    const edited = editOneLine(files, ++round)[0] as LangFile;
    const checker = createChecker();
    checker.check(first.text, opts);
    const t0 = now();
    const n = checker.check(edited.text, opts).length;
    const ms = now() - t0;
    clearCheckCaches();
    if (n !== checkText(edited.text, opts).length) throw new Error('bench: the incremental re-check disagrees with a full check');
    consume(n);
    return ms;
  }, () => {
    const edited = editOneLine(files, round + 1)[0] as LangFile;
    clearCheckCaches();
    const t0 = now();
    consume(checkText(edited.text, opts).length);
    return now() - t0;
  }, args.quick ? 1 : 3);
  record('incrementalVsFull', 're-check after a one-line edit ÷ full check (what the editor runs)', q.ratio, '≤ 0.2', q.ratio <= 0.2,
    `${fmt(median(q.a))} ms vs ${fmt(median(q.b))} ms: the document's checker re-checks after the edit vs a cold full check of the edited text`,
    { incrementalMs: median(q.a), fullMs: median(q.b) });
}

// ─── 4. simplify under adversarial inputs ───────────────────────────────────────────────────────

function benchSimplify(args: Args): void {
  console.log('\n[simplify] adversarial inputs through simplifyWithinBudget');
  const inputs = adversarialInputs(args.quick);
  const budget = LIMITS.simplifyBudgetMs;
  // The first simplify in a process compiles mathjs's rule set (~160 ms unloaded, uninterruptible);
  // measured apart, since every later call is what a hover pays.
  const w0 = now();
  simplifyWithinBudget(math.parse('2 * x + 3 * x + x * x / x'));
  const warmupMs = now() - w0;
  results.simplifyFirstCallMs = warmupMs;
  let worst = { name: '', ms: 0, simplified: true };
  const all: { name: string; ms: number; simplified: boolean; note?: string }[] = [];
  for (const inp of inputs) {
    const t0 = now();
    const r = simplifyWithinBudget(inp.node);
    const ms = now() - t0;
    const e: { name: string; ms: number; simplified: boolean; note?: string } = { name: inp.name, ms, simplified: r.simplified };
    if (r.note !== undefined) e.note = r.note;
    all.push(e);
    if (ms > worst.ms) worst = { name: inp.name, ms, simplified: r.simplified };
  }
  results.simplifyBudgetMs = budget;
  record('simplifyWorstMs', `slowest of ${inputs.length} adversarial simplifications (budget ${budget} ms)`, worst.ms, `≤ ${1.5 * budget} (1.5 × budget)`, worst.ms <= 1.5 * budget,
    `${worst.name}${worst.simplified ? '' : ', fell back to the unsimplified form'}; first call in the process (rule warm-up) ${fmt(warmupMs)} ms`, { simplifyWorst: worst, simplifyDetail: all });
  rows.push({ key: 'simplifyBudgetMs', what: 'budget of one simplification (LIMITS.simplifyBudgetMs)', value: budget, goal: '—', ok: null });
}

// ─── 5. bundles, activation, CLI memory ─────────────────────────────────────────────────────────

/**
 * Builds with the project's own scripts/build.mjs in a scratch copy of the repository (sources and
 * build script copied, node_modules linked), so the bench never touches out/ or media/dist/ that
 * others are using.
 */
function scratchBuild(targets: string, production: boolean): string | { error: string } {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'slopewise-bench-build-'));
  for (const p of ['src', 'media/src', 'media/styles', 'scripts', 'package.json', 'tsconfig.json', 'test/integration']) {
    const from = path.join(ROOT, p);
    if (fs.existsSync(from)) fs.cpSync(from, path.join(dir, p), { recursive: true });
  }
  fs.symlinkSync(path.join(ROOT, 'node_modules'), path.join(dir, 'node_modules'), 'dir');
  const r = spawnSync(process.execPath, ['scripts/build.mjs', ...(production ? ['--production'] : []), `--only=${targets}`], { cwd: dir, encoding: 'utf8', env: { ...process.env, SLOPEWISE_ALLOW_MISSING: '1' } });
  if (r.status !== 0) return { error: `build failed: ${(r.stderr || r.stdout).slice(0, 600)}` };
  return dir;
}

function benchBundles(): string | null {
  console.log('\n[bundles] node scripts/build.mjs --production (scratch copy)');
  const built = scratchBuild('extension,cli,webview', true);
  if (typeof built !== 'string') {
    record('hostBundleBytes', 'minified extension-host bundle', null, '≤ 400,000', false, built.error);
    record('webviewBundleBytes', 'minified webview bundle', null, '≤ 600,000', false, built.error);
    return null;
  }
  const size = (p: string): number | null => (fs.existsSync(path.join(built, p)) ? fs.statSync(path.join(built, p)).size : null);
  const host = size('out/extension.js');
  const web = size('media/dist/plot.js');
  record('hostBundleBytes', 'minified extension-host bundle (out/extension.js)', host, '≤ 400,000', host === null ? false : host <= 400_000);
  record('webviewBundleBytes', 'minified webview bundle (media/dist/plot.js)', web, '≤ 600,000', web === null ? false : web <= 600_000);
  return built;
}

function benchActivation(built: string | null, args: Args): void {
  console.log('\n[activation] require + activate() of the production bundle against a stand-in vscode module (informational)');
  const bundle = built ? path.join(built, 'out/extension.js') : null;
  if (!bundle || !fs.existsSync(bundle)) { record('activationMs', 'extension load + activate (informational)', null, '—', null, 'no bundle'); return; }
  const runs: number[] = [];
  let error: string | undefined;
  for (let i = 0; i < (args.quick ? 1 : 5); i++) {
    const out = execFileSync(process.execPath, [path.join(__dirname, 'activate-child.cjs'), bundle], { encoding: 'utf8' });
    const j = JSON.parse(out.trim().split('\n').pop() as string) as { totalMs: number; error?: string };
    runs.push(j.totalMs);
    error = j.error ?? error;
  }
  record('activationMs', 'extension load + activate, median (informational)', median(runs), '—', null, error ? `activate threw against the stand-in: ${error}` : `${runs.length} fresh processes`);
}

function benchCliMemory(built: string | null, args: Args): void {
  const files = args.quick ? 40 : 1_000;
  console.log(`\n[cli] slopewise check over a generated ${files}-file tree: peak RSS (informational)`);
  const cli = built ? path.join(built, 'out/cli.js') : path.join(ROOT, 'out/cli.js');
  if (!fs.existsSync(cli)) { record('cliPeakRssMb', 'CLI peak memory (informational)', null, '—', null, 'no CLI bundle'); return; }
  const tree = writeTree(path.join(os.tmpdir(), `slopewise-bench-tree-${process.pid}`), args.seed, files, args.quick ? 20 : 60);
  const t0 = now();
  const r = spawnSync(process.execPath, ['--require', path.join(__dirname, 'rss-hook.cjs'), cli, 'check', tree, '--format', 'json'], { encoding: 'utf8', maxBuffer: 512 * 1024 * 1024 });
  const ms = now() - t0;
  fs.rmSync(tree, { recursive: true, force: true });
  const m = /SLOPEWISE_BENCH_MAXRSS_KB (\d+)/.exec(r.stderr ?? '');
  let findings = -1;
  try {
    findings = (JSON.parse(r.stdout) as { findings: unknown[] }).findings.length;
  } catch {
    // reported below
  }
  const mb = m ? Number(m[1]) / 1024 : null;
  record('cliPeakRssMb', `CLI check peak RSS over ${files} files (informational)`, mb, '—', null,
    `exit ${r.status}, ${findings >= 0 ? `${findings} findings` : 'output not JSON'}, ${fmt(ms / 1000)} s`, { cliCheckSeconds: ms / 1000, cliFiles: files });
}

// ─── main ───────────────────────────────────────────────────────────────────────────────────────

function main(): void {
  const args = parseArgs(process.argv.slice(2));
  const t0 = now();
  const want = (k: string): boolean => args.only === null || args.only.has(k);
  console.log(`bench${args.quick ? ' (quick: tiny sizes, figures not meaningful)' : ''}, seed ${args.seed}, node ${process.version}, ${os.cpus().length} cpus, load ${os.loadavg().map((l) => l.toFixed(1)).join(' ')}`);
  const sections: [string, () => void][] = [
    ['sampling', () => benchSampling(args)],
    ['hover', () => benchHover(args)],
    ['check', () => benchCheck(args)],
    ['simplify', () => benchSimplify(args)],
  ];
  for (const [name, run] of sections) {
    if (!want(name)) continue;
    try {
      run();
    } catch (e) {
      console.log(`  ${name} failed: ${(e as Error).stack ?? String(e)}`);
      rows.push({ key: name, what: 'section failed', value: null, goal: '', ok: false, detail: (e as Error).message });
    }
  }
  let built: string | null = null;
  if (want('bundles') || want('activation') || want('cli')) {
    try {
      built = benchBundles();
      if (want('activation')) benchActivation(built, args);
      if (want('cli')) benchCliMemory(built, args);
    } finally {
      if (built) fs.rmSync(built, { recursive: true, force: true });
    }
  }

  // Table.
  const w = { key: 28, value: 14, goal: 22 };
  console.log(`\n${'key'.padEnd(w.key)}${'value'.padStart(w.value)}  ${'goal'.padEnd(w.goal)}  met`);
  console.log('─'.repeat(w.key + w.value + w.goal + 8));
  for (const r of rows) {
    const v = r.value === null ? 'n/a' : typeof r.value === 'number' ? fmt(r.value) : r.value;
    const met = r.ok === null ? '' : r.ok ? 'yes' : 'NO';
    console.log(`${r.key.padEnd(w.key)}${v.padStart(w.value)}  ${r.goal.padEnd(w.goal)}  ${met}`);
  }
  results.quick = args.quick;
  results.seed = args.seed;
  results.machine = { node: process.version, cpus: os.cpus().length, loadavg: os.loadavg() };
  results.seconds = (now() - t0) / 1000;
  results.table = rows;
  // A quick run (npm test) must not overwrite the figures of the last real run.
  const out = args.quick ? path.join(os.tmpdir(), 'slopewise-bench-quick.json') : path.join(__dirname, 'results.json');
  fs.writeFileSync(out, JSON.stringify(results, null, 2) + '\n');
  console.log(`\n${path.relative(process.cwd(), out)} written (${fmt((now() - t0) / 1000)} s)${sink === 0 ? '' : ''}`);
}

main();
