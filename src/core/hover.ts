/**
 * The hover card: markdown built from an inspect result. Compact and scannable — a header line
 * with the formula, a small table of derivatives, one line per finding kind, one line per float
 * type that breaks, and a tiny SVG plot of f and f′ drawn here by hand (no chart library in the
 * extension host).
 */
import type { FloatType, Interval, RangeInterval } from './types';
import { sparkSvg } from './plot/spark';

/** The inspect fields the card reads (issue 3/4 JSON). Everything beyond the formula is optional. */
export interface HoverInput {
  input: string;
  expression: string;
  variable: string;
  parameters?: Record<string, number>;
  unbound?: string[];
  notes?: string[];
  recognised?: string;
  /** Name of the function in the source (`soft_floor_grad`) and what the detector took it for. */
  name?: string;
  role?: 'activation' | 'loss' | 'derivative';
  expressionDisplay?: string;
  derivative: string;
  secondDerivative?: string;
  derivativeDisplay?: string;
  secondDerivativeDisplay?: string;
  simplifyNote?: string;
  derivativeInOutput?: string | null;
  saturation?: RangeInterval[];
  threshold?: number;
  kinks?: number[];
  discontinuities?: number[];
  range?: { inf: number | null; sup: number | null; infAttained?: boolean; supAttained?: boolean } | null;
  monotone?: string | null;
  lipschitz?: number | null;
  lipschitzAt?: number | '+inf' | '-inf' | null;
  gain?: number | null;
  floatLimits?: Partial<Record<FloatType, { breakdown?: RangeInterval[]; derivative?: { breakdown?: RangeInterval[] } | null }>>;
  suggestions?: { title?: string; expression?: string; target?: string }[];
  /** Domain of the float breakdown scan. */
  domain?: [number, number];
  /** Sampled f and f′ for the spark plot (the adapter fills these from compileScalar). */
  spark?: { xs: number[]; f: number[]; df: number[] };
}

export interface HoverOptions {
  floatTypes: readonly FloatType[];
  links?: { plot?: string; copy?: string };
}

/** Numbers as a person reads them: integers below 1e6 exactly, else 4 significant digits, no exponent between 1e-3 and 1e5. */
export function num(v: number | null | undefined, digits = 4): string {
  if (v === null || v === undefined) return '—';
  if (Number.isNaN(v)) return 'NaN';
  if (v === Infinity) return '+∞';
  if (v === -Infinity) return '−∞';
  if (v === 0) return '0';
  const a = Math.abs(v);
  if (Number.isInteger(v) && a < 1e6) return String(v).replace(/^-/, '−');
  const s = a >= 1e-3 && a < 1e5 ? String(Number(v.toPrecision(digits))) : v.toExponential(digits - 2).replace('e+', 'e');
  return s.replace(/^-/, '−');
}

export function interval(i: Interval): string {
  if (i.from !== null && i.from === i.to) return `at ${num(i.from)}`;
  const from = i.from === null ? '(−∞' : `[${num(i.from)}`;
  const to = i.to === null ? '+∞)' : `${num(i.to)}]`;
  return `${from}, ${to}`;
}

/** Escapes text for markdown (inside backticks only backticks matter; we use double backticks when needed). */
function code(text: string, max = 160): string {
  const t = text.replace(/\s+/g, ' ').trim();
  const clipped = t.length > max ? `${t.slice(0, max - 1)}…` : t;
  return clipped.includes('`') ? `\`\` ${clipped} \`\`` : `\`${clipped}\``;
}

function esc(text: string): string {
  return text.replace(/[\\`*_{}[\]()#+\-.!|<>]/g, (c) => `\\${c}`);
}

const FLOAT_LABEL: Record<FloatType, string> = { float16: 'fp16', bfloat16: 'bf16', float32: 'fp32' };

const BREAK_LABEL: Record<string, string> = {
  overflow: 'overflows', nan: 'NaN', zero: 'flushes to 0', inaccurate: 'inaccurate',
};

function rangeText(r: HoverInput['range']): string | undefined {
  if (!r) return undefined;
  const lo = r.inf === null ? '(−∞' : `${r.infAttained ? '[' : '('}${num(r.inf)}`;
  const hi = r.sup === null ? '+∞)' : `${num(r.sup)}${r.supAttained ? ']' : ')'}`;
  return `${lo}, ${hi}`;
}

/**
 * Merges same-kind intervals separated by less than `gap` (the scan's resolution breaks one region of
 * inaccuracy into dozens of slivers; a reader wants the region).
 */
export function mergeIntervals(b: readonly RangeInterval[], gap: number): (RangeInterval & { pieces: number })[] {
  const out: (RangeInterval & { pieces: number })[] = [];
  for (const i of b) {
    const last = out[out.length - 1];
    if (last && last.kind === i.kind && last.to !== null && i.from !== null && i.from - last.to <= gap) {
      last.to = i.to;
      last.pieces++;
    } else {
      out.push({ ...i, pieces: 1 });
    }
  }
  return out;
}

function breakdownText(b: RangeInterval[], gap: number): string {
  const merged = mergeIntervals(b, gap);
  const shown = merged.slice(0, 2).map((i) => `${BREAK_LABEL[i.kind] ?? i.kind} ${interval(i)}${i.pieces > 1 ? ' (patchy)' : ''}`).join(', ');
  return merged.length > 2 ? `${shown} (+${merged.length - 2} more)` : shown;
}

/** Markdown for the card. */
export function buildHoverCard(r: HoverInput, opts: HoverOptions): string {
  const v = r.variable;
  const out: string[] = [];
  // The source's own name first; the catalogue name when it is a known function under another name.
  const names = [r.name, r.recognised && r.recognised !== r.name ? r.recognised : undefined].filter(Boolean) as string[];
  const role = r.role === 'derivative' ? ' *(hand-written derivative: f below is this function)*' : r.role === 'loss' ? ' *(loss)*' : '';
  const title = names.length ? `**${names.map(esc).join(' · ')}**${role}` : role.trim();
  // Title and formula on their own lines (two trailing spaces: a markdown line break).
  if (title) out.push(`${title}  `);
  out.push(code(`f(${v}) = ${r.expressionDisplay ?? r.expression}`));
  const links: string[] = [];
  if (opts.links?.plot) links.push(`[$(graph-line) Plot](${opts.links.plot} "Plot f, f′ and f″ in a panel")`);
  if (opts.links?.copy) links.push(`[$(copy) Copy f′](${opts.links.copy} "Copy the derivative as code")`);
  const params = Object.entries(r.parameters ?? {});
  const meta: string[] = [];
  if (params.length) meta.push(params.map(([k, val]) => `${k} = ${num(val, 6)}`).join(', '));
  if (r.unbound?.length) meta.push(`unbound: ${r.unbound.join(', ')}`);
  // Links on the second line: the card can be taller than the hover widget, and they must stay in view.
  const second = [...(meta.length ? [`*${esc(meta.join(' · '))}*`] : []), ...links];
  if (second.length) out.push('', second.join(' · '));
  out.push('');

  // One line per derivative, label first: scannable, no table column to wrap labels into.
  out.push(`**f′** ${code(r.derivativeDisplay ?? r.derivative, 120)}  `);
  if (r.secondDerivative !== undefined || r.secondDerivativeDisplay !== undefined) {
    out.push(`**f″** ${code(r.secondDerivativeDisplay ?? r.secondDerivative ?? '', 90)}  `);
  }
  if (r.derivativeInOutput) out.push(`**f′ in y = f(${v})** ${code(r.derivativeInOutput, 90)}`);
  out.push('');
  // The picture right after the formulas: the quickest thing to read, and above the widget's fold.
  if (r.spark) {
    const svg = sparkSvg(r.spark.xs, r.spark.f, r.spark.df);
    if (svg) out.push(`![f (solid) and f′ (dashed) of ${esc(r.input.slice(0, 40))}](${svgDataUri(svg)})`, '');
  }

  const facts: string[] = [];
  const sat = (r.saturation ?? []).filter((s) => s.kind === 'saturating');
  const dead = (r.saturation ?? []).filter((s) => s.kind === 'dead');
  if (dead.length) facts.push(`**dead** (f′ = 0) on ${dead.map(interval).join(' ∪ ')}`);
  if (sat.length) facts.push(`**saturates** (|f′| < ${num(r.threshold ?? 0.01)}) on ${sat.map(interval).join(' ∪ ')}`);
  if (r.kinks?.length) facts.push(`**kink${r.kinks.length > 1 ? 's' : ''}** at ${v} = ${r.kinks.map((k) => num(k)).join(', ')}`);
  if (r.discontinuities?.length) facts.push(`**jump${r.discontinuities.length > 1 ? 's' : ''}** at ${v} = ${r.discontinuities.map((k) => num(k)).join(', ')}`);
  const shape: string[] = [];
  const range = rangeText(r.range);
  if (range) shape.push(`range ${range}`);
  if (r.monotone && r.monotone !== 'none') shape.push(r.monotone);
  if (typeof r.lipschitz === 'number') {
    const at = typeof r.lipschitzAt === 'number' ? ` at ${v} = ${num(r.lipschitzAt)}`
      : r.lipschitzAt === '+inf' ? ` as ${v} → +∞` : r.lipschitzAt === '-inf' ? ` as ${v} → −∞` : '';
    shape.push(`Lipschitz ${num(r.lipschitz)}${at}`);
  } else if (r.lipschitz === null) shape.push('Lipschitz unbounded');
  if (typeof r.gain === 'number') shape.push(`gain ${num(r.gain)}`);
  if (shape.length) facts.push(shape.join(' · '));
  for (const f of facts) out.push(`- ${f}`);

  // One line per float type: only what breaks; a type that is fine says so in one word.
  const floatLines: string[] = [];
  const gap = r.domain ? (r.domain[1] - r.domain[0]) / 40 : 5;
  for (const t of opts.floatTypes) {
    const lim = r.floatLimits?.[t];
    if (!lim) continue;
    const b = lim.breakdown ?? [];
    const db = lim.derivative?.breakdown ?? [];
    const parts: string[] = [];
    if (b.length) parts.push(`f ${breakdownText(b, gap)}`);
    if (db.length) parts.push(`f′ ${breakdownText(db, gap)}`);
    floatLines.push(`\`${FLOAT_LABEL[t]}\` ${parts.length ? parts.join(' · ') : `no breakdown${r.domain ? ` on ${interval({ from: r.domain[0], to: r.domain[1] })}` : ''}`}`);
  }
  out.push(...floatLines.map((l) => `- ${l}`));

  const suggestions = (r.suggestions ?? []).filter((s) => s.title || s.expression);
  if (suggestions.length) {
    // The rewrite of f itself first; a derivative's rewrite is usually long, so only its title.
    const ordered = [...suggestions].sort((a, b) => Number(a.target === 'derivative') - Number(b.target === 'derivative'));
    out.push('', ...ordered.slice(0, 2).map((s) => {
      const tag = s.target === 'derivative' ? ' (for f′)' : '';
      const expr = s.expression && s.expression.length <= 80 && s.target !== 'derivative' ? `: ${code(s.expression)}` : '';
      return `💡 ${esc(s.title ?? 'stable rewrite')}${tag}${expr}`;
    }));
  }
  if (r.simplifyNote) out.push('', `*${esc(r.simplifyNote)}*`);

  return out.join('\n');
}

export function svgDataUri(svg: string): string {
  // base64 keeps the markdown link target free of characters the renderer would mangle.
  const bytes = new TextEncoder().encode(svg);
  let bin = '';
  for (const b of bytes) bin += String.fromCharCode(b);
  return `data:image/svg+xml;base64,${btoa(bin)}`;
}
