/**
 * f′ written in terms of the output y = f(x), found by computation: σ′ = y(1 − y), tanh′ = 1 − y²,
 * exp′ = y, softplus′ = 1 − e^(−y), ELU′ = y + α for x ≤ 0, ReLU′ = [y > 0].
 *
 * How:
 * 1. Sample (x, y = f(x), d = f′(x)) on [−12, 12] (step 0.05), away from break points, where all
 *    three are finite and |y|, |d| ≤ 1e6.
 * 2. Fit candidate forms g(y) by least squares, simplest first: constants; polynomials in y of
 *    degree 1, 2; a + b·e^(−y); a + b·e^y; cubic. Coefficients are snapped to small rationals
 *    (denominator ≤ 12) or to a parameter's value (or ± a product of two) when that changes them by
 *    < 1e-9 relative.
 * 3. Verify: max |g(y) − f′(x)| ≤ 1e-10 · max(1, max |f′|) on every sample. First verified form wins.
 * 4. If no form fits globally, split at the break points and fit each piece; the pieces become one
 *    conditional in y (`y <= 0 ? 0 : 1`) when f is monotone across them (so y tells the branch), and
 *    the assembled expression is verified again, including points next to every break.
 * Returns null when nothing verifies (GELU, swish: f is not invertible, or f′ is no such form of y).
 * Limits: only the forms above; behaviour outside [−12, 12] is not sampled.
 */
import { compileScalar } from '../expr/compile';
import { math } from '../math';
import { leastSquares } from './numeric';
import type { Prepared } from './prepare';

interface Sample {
  x: number;
  y: number;
  d: number;
}

type Term = '1' | 'y' | 'y ^ 2' | 'y ^ 3' | 'exp(-y)' | 'exp(y)';

const TERM_FN: Record<Term, (y: number) => number> = {
  '1': () => 1,
  y: (y) => y,
  'y ^ 2': (y) => y * y,
  'y ^ 3': (y) => y * y * y,
  'exp(-y)': (y) => Math.exp(-y),
  'exp(y)': (y) => Math.exp(y),
};

const FAMILIES: readonly Term[][] = [
  ['1'],
  ['1', 'y'],
  ['1', 'y', 'y ^ 2'],
  ['1', 'exp(-y)'],
  ['1', 'exp(y)'],
  ['1', 'y', 'y ^ 2', 'y ^ 3'],
];

const SAMPLE_HALF_WIDTH = 12;
const SAMPLE_STEP = 0.05;
const VERIFY_TOLERANCE = 1e-10;

interface Coef {
  value: number;
  text: string;
}

function decimal(v: number): string {
  const t = String(Number(v.toPrecision(15)));
  return t;
}

/**
 * Nearby simple value: a small integer, then a parameter expression (so ELU with α = 1.5 reads
 * "y + alpha"), then a small rational; otherwise the number itself.
 */
function snap(c: number, params: Record<string, number>): Coef {
  const tol = 1e-9 * Math.max(1, Math.abs(c));
  const k0 = Math.round(c);
  if (Math.abs(k0) <= 2 && Math.abs(k0 - c) <= tol) return { value: k0, text: decimal(k0) };
  const names = Object.keys(params).filter((n) => n !== 'y' && Number.isFinite(params[n]));
  for (const n of names) {
    const v = params[n] as number;
    if (Math.abs(v - c) <= tol) return { value: v, text: n };
    if (Math.abs(-v - c) <= tol) return { value: -v, text: `-${n}` };
  }
  for (const a of names) {
    for (const b of names) {
      const v = (params[a] as number) * (params[b] as number);
      if (Math.abs(v - c) <= tol) return { value: v, text: `${a} * ${b}` };
      if (Math.abs(-v - c) <= tol) return { value: -v, text: `-${a} * ${b}` };
    }
  }
  for (let d = 1; d <= 12; d++) {
    const k = Math.round(c * d);
    if (Math.abs(k / d - c) <= tol) {
      const v = k / d;
      const exact = Number.isInteger(v) || [2, 4, 5, 8, 10].includes(d);
      return { value: v, text: exact ? decimal(v) : `(${k} / ${d})` };
    }
  }
  return { value: c, text: decimal(c) };
}

function termText(c: Coef, term: Term): string {
  if (term === '1') return c.text;
  if (c.value === 1) return term;
  if (c.value === -1) return `-${term}`;
  return `${c.text} * ${term}`;
}

function joinTerms(parts: string[]): string {
  if (parts.length === 0) return '0';
  let out = parts[0] as string;
  for (const p of parts.slice(1)) out += p.startsWith('-') ? ` - ${p.slice(1)}` : ` + ${p}`;
  return out;
}

/** Readable text of Σ c_i · term_i: "1 - y ^ 2", "y * (1 - y)", "y + alpha", "1 - exp(-y)". */
function formText(terms: readonly Term[], coefs: readonly Coef[]): string {
  const nz = terms.map((t, i) => ({ t, c: coefs[i] as Coef })).filter((e) => e.c.value !== 0);
  if (nz.length === 0) return '0';
  const constant = nz.find((e) => e.t === '1');
  const others = nz.filter((e) => e.t !== '1').reverse(); // highest term first
  const isPoly = terms.every((t) => t === '1' || t.startsWith('y'));
  // y · (…) when there is no constant and at least two powers of y.
  if (isPoly && !constant && others.length >= 2) {
    const lowered: Array<{ t: Term; c: Coef }> = others.map((e) => ({ t: (e.t === 'y' ? '1' : e.t === 'y ^ 2' ? 'y' : 'y ^ 2') as Term, c: e.c }));
    const lowTerms = lowered.map((e) => e.t).reverse();
    const lowCoefs = lowered.map((e) => e.c).reverse();
    return `y * (${formText(lowTerms, lowCoefs)})`;
  }
  const leading = others[0];
  if (constant && leading && leading.c.value < 0) return joinTerms([constant.c.text, ...others.map((e) => termText(e.c, e.t))]);
  return joinTerms([...others.map((e) => termText(e.c, e.t)), ...(constant ? [constant.c.text] : [])]);
}

interface Fitted {
  text: string;
  g: (y: number) => number;
}

function verified(g: (y: number) => number, samples: readonly Sample[]): boolean {
  let scale = 1;
  for (const s of samples) scale = Math.max(scale, Math.abs(s.d));
  const tol = VERIFY_TOLERANCE * scale;
  for (const s of samples) {
    const v = g(s.y);
    if (!(Math.abs(v - s.d) <= tol)) return false;
  }
  return true;
}

function fitPiece(samples: readonly Sample[], params: Record<string, number>): Fitted | null {
  for (const terms of FAMILIES) {
    if (samples.length < terms.length + 2) continue;
    const rows = samples.map((s) => terms.map((t) => TERM_FN[t](s.y)));
    if (rows.some((r) => r.some((v) => !Number.isFinite(v)))) continue;
    const c = leastSquares(rows, samples.map((s) => s.d));
    if (c === null) continue;
    for (const coefs of [c.map((v) => snap(v, params)), c.map((v) => ({ value: v, text: decimal(v) }))]) {
      const g = (y: number): number => terms.reduce((s, t, i) => s + (coefs[i] as Coef).value * TERM_FN[t](y), 0);
      if (verified(g, samples)) return { text: formText(terms, coefs), g };
    }
  }
  return null;
}

function samplesOf(p: Prepared, lo: number, hi: number): Sample[] {
  const out: Sample[] = [];
  const n = Math.round((2 * SAMPLE_HALF_WIDTH) / SAMPLE_STEP);
  for (let i = 0; i <= n; i++) {
    const x = Math.round((-SAMPLE_HALF_WIDTH + i * SAMPLE_STEP) * 1e9) / 1e9;
    if (x <= lo || x >= hi) continue;
    if (p.breaks.some((b) => Math.abs(x - b) < 1e-6 * Math.max(1, Math.abs(b)))) continue;
    const y = p.f(x);
    const d = p.df(x);
    if (!Number.isFinite(y) || !Number.isFinite(d) || Math.abs(y) > 1e6 || Math.abs(d) > 1e6) continue;
    out.push({ x, y, d });
  }
  return out;
}

export function derivativeInOutput(p: Prepared): string | null {
  const params = Object.fromEntries(Object.entries(p.params).filter(([k]) => k !== 'y'));
  const all = samplesOf(p, -Infinity, Infinity);
  if (all.length < 10) return null;
  const global = fitPiece(all, params);
  if (global) return global.text;
  const cuts = p.breaks.filter((b) => Math.abs(b) < SAMPLE_HALF_WIDTH);
  if (cuts.length === 0) return null;
  const bounds = [-Infinity, ...cuts, Infinity];
  const pieces: Array<{ fit: Fitted; ymin: number; ymax: number; lo: number; hi: number }> = [];
  for (let i = 0; i + 1 < bounds.length; i++) {
    const lo = bounds[i] as number;
    const hi = bounds[i + 1] as number;
    const s = samplesOf(p, lo, hi);
    if (s.length === 0) continue; // a piece outside the sampled range or the domain
    const fit = fitPiece(s, params);
    if (fit === null) return null;
    const ys = s.map((e) => e.y);
    pieces.push({ fit, ymin: Math.min(...ys), ymax: Math.max(...ys), lo, hi });
  }
  if (pieces.length === 0) return null;
  // Merge neighbours with the same form.
  const merged: typeof pieces = [];
  for (const pc of pieces) {
    const last = merged[merged.length - 1];
    if (last && last.fit.text === pc.fit.text) merged[merged.length - 1] = { ...last, ymin: Math.min(last.ymin, pc.ymin), ymax: Math.max(last.ymax, pc.ymax), hi: pc.hi };
    else merged.push(pc);
  }
  if (merged.length === 1) return (merged[0] as (typeof merged)[number]).fit.text;
  // y must tell the branch: f monotone across the pieces, so their y ranges do not overlap.
  const tolY = (a: number): number => 1e-12 * Math.max(1, Math.abs(a));
  const increasing = merged.every((pc, i) => i === 0 || (merged[i - 1] as typeof pc).ymax <= pc.ymin + tolY(pc.ymin));
  const decreasing = merged.every((pc, i) => i === 0 || (merged[i - 1] as typeof pc).ymin >= pc.ymax - tolY(pc.ymax));
  if (!increasing && !decreasing) return null;
  const ordered = increasing ? merged : merged.slice().reverse();
  let text = (ordered[ordered.length - 1] as (typeof ordered)[number]).fit.text;
  for (let i = ordered.length - 2; i >= 0; i--) {
    const pc = ordered[i] as (typeof ordered)[number];
    const cut = increasing ? pc.hi : pc.lo; // the break between this piece and the next in y order
    const b = snap(p.f(cut), params);
    const degenerate = pc.ymax - pc.ymin <= tolY(pc.ymax);
    const op = degenerate ? '<=' : '<';
    const rest = i === ordered.length - 2 ? text : `(${text})`;
    text = `y ${op} ${b.text} ? ${pc.fit.text} : ${rest}`;
  }
  // Verify the assembled expression, including points right next to every break.
  let g: (y: number) => number;
  try {
    g = compileScalar(math.parse(text), 'y', params);
  } catch {
    return null;
  }
  const near: Sample[] = [];
  for (const c of cuts) {
    for (const h of [1e-3, 1e-2]) {
      for (const x of [c - h, c + h]) {
        const y = p.f(x);
        const d = p.df(x);
        if (Number.isFinite(y) && Number.isFinite(d)) near.push({ x, y, d });
      }
    }
  }
  return verified(g, [...all, ...near]) ? text : null;
}

/**
 * Readable stock-mathjs text of the polynomial Σ coefs[i]·v^i (coefficients snapped to small
 * rationals), a common constant factor pulled out: [0, 2, −2] in p → "2 * p * (1 - p)".
 */
export function polynomialText(coefs: readonly number[], variable: string): string {
  const terms = (['1', 'y', 'y ^ 2', 'y ^ 3'] as Term[]).slice(0, coefs.length);
  const snapped = coefs.map((c) => snap(c, {}));
  const nz = snapped.filter((c) => c.value !== 0);
  let factor = 1;
  const lead = nz[nz.length - 1];
  if (lead && Math.abs(lead.value) !== 1 && nz.every((c) => Number.isInteger(c.value / lead.value))) factor = Math.abs(lead.value);
  const scaled = snapped.map((c) => (factor === 1 ? c : snap(c.value / factor, {})));
  let text = formText(terms, scaled);
  if (factor !== 1 && text === '1') return decimal(factor);
  // "y * (1 - y)" reads better as "y * (1 - y)"; wrap a sum when a factor is pulled out.
  if (factor !== 1) text = `${decimal(factor)} * ${/[+-]/.test(text.replace(/^-/, '')) && !text.startsWith('y * (') ? `(${text})` : text}`;
  return variable === 'y' ? text : text.replace(/\by\b/g, variable);
}
