/**
 * `slopewise inspect "<formula>"`: the canonical form, f′ and f″, and the analysis of one formula.
 * Reads no files; prints JSON (`--format json`) or a summary for people (default).
 */
import type { CommandContext, CommandSpec } from '../main';
import { inspect, type InspectOptions, type InspectResult } from '../../core/inspect';
import { LANGUAGES, type Language } from '../../core/types';

function parseParams(list: readonly string[], ctx: CommandContext): Record<string, number> {
  const params: Record<string, number> = {};
  for (const item of list) {
    const eq = item.indexOf('=');
    const name = eq < 0 ? '' : item.slice(0, eq).trim();
    const valueText = eq < 0 ? '' : item.slice(eq + 1).trim();
    if (!/^[A-Za-z_][A-Za-z0-9_]*$/.test(name)) ctx.usageError(`--param needs name=value, got '${item}'`);
    const value = Number(valueText);
    if (valueText === '' || !Number.isFinite(value)) ctx.usageError(`--param ${name} needs a finite number, got '${valueText}'`);
    params[name] = value;
  }
  return params;
}

function parseDomain(text: string, ctx: CommandContext): [number, number] {
  const parts = text.split(',');
  const a = Number(parts[0]);
  const b = Number(parts[1]);
  if (parts.length !== 2 || parts[0]?.trim() === '' || parts[1]?.trim() === '' || !Number.isFinite(a) || !Number.isFinite(b) || !(a < b)) {
    ctx.usageError(`--domain needs two numbers a,b with a < b, got '${text}'`);
  }
  return [a, b];
}

function fmt(v: number | null | undefined): string {
  if (v === null) return '∞';
  if (v === undefined || Number.isNaN(v)) return '?';
  // U+2212 for negatives, as in the ∞ ends and the display forms
  const t = Number.isInteger(v) ? String(v) : Number(v.toPrecision(5)).toString();
  return t.startsWith('-') ? `−${t.slice(1)}` : t;
}

function interval(from: number | null, to: number | null): string {
  return `(${from === null ? '−∞' : fmt(from)}, ${to === null ? '∞' : fmt(to)})`;
}

/** Text for people: the engine's results first, then the analysis fields that are present. */
export function formatText(r: InspectResult): string {
  const v = r.variable;
  const lines: string[] = [];
  lines.push(`f(${v})  = ${r.expressionDisplay}${r.recognised ? `    [${r.recognised}]` : ''}`);
  lines.push(`f′(${v}) = ${r.derivativeDisplay}`);
  lines.push(`f″(${v}) = ${r.secondDerivativeDisplay}`);
  lines.push('');
  lines.push(`expression:        ${r.expression}`);
  lines.push(`derivative:        ${r.derivative}`);
  lines.push(`second derivative: ${r.secondDerivative}`);
  lines.push(`variable: ${v}    language: ${r.language}`);
  const params = Object.entries(r.parameters);
  if (params.length > 0) lines.push(`parameters: ${params.map(([k, val]) => `${k} = ${val} (${r.parameterSources[k] ?? 'given'})`).join(', ')}`);
  if (r.unbound.length > 0) lines.push(`unbound: ${r.unbound.join(', ')} (give values with --param name=value)`);
  if (r.derivativeInOutput !== undefined) lines.push(`f′ in terms of y = f(${v}): ${r.derivativeInOutput ?? 'none found'}`);
  if (r.saturation) {
    lines.push(`saturation (|f′| < ${r.threshold}): ${r.saturation.length === 0 ? 'none' : r.saturation.map((s) => `${interval(s.from, s.to)} ${s.kind}`).join(', ')}`);
  }
  if (r.kinks) lines.push(`kinks: ${r.kinks.length === 0 ? 'none' : r.kinks.map(fmt).join(', ')}`);
  if (r.discontinuities && r.discontinuities.length > 0) lines.push(`discontinuities: ${r.discontinuities.map(fmt).join(', ')}`);
  if (r.range) {
    const range = r.range as unknown as { inf: number | null; sup: number | null };
    lines.push(`range: [${range.inf === null ? '−∞' : fmt(range.inf)}, ${range.sup === null ? '∞' : fmt(range.sup)}]    monotone: ${r.monotone === 'none' ? 'no' : String(r.monotone)}`);
  }
  if (r.lipschitz !== undefined) lines.push(`Lipschitz bound sup|f′|: ${r.lipschitz === null ? 'unbounded' : fmt(r.lipschitz)}${r.lipschitzAt !== undefined && r.lipschitzAt !== null ? ` (at ${r.lipschitzAt})` : ''}`);
  if (r.gain !== undefined) lines.push(`gain 1/√E[f(z)²]: ${r.gain === null ? 'n/a' : fmt(r.gain)}    E[f′(z)²]: ${fmt(r.derivativeMeanSquare)}`);
  if (r.floatLimits) {
    for (const [type, lim] of Object.entries(r.floatLimits)) {
      const l = lim as unknown as { breakdown?: { from: number | null; to: number | null; kind: string }[]; overflows?: { operation: string; from: number | null; to: number | null }[] };
      const over = (l.overflows ?? []).map((o) => `${o.operation} overflows on ${interval(o.from, o.to)}`);
      const br = (l.breakdown ?? []).map((b) => `${b.kind} ${interval(b.from, b.to)}`);
      lines.push(`${type}: ${[...over, ...(br.length > 0 ? [`breakdown: ${br.join(', ')}`] : ['no breakdown'])].join('; ')}`);
    }
  }
  if (r.suggestions && r.suggestions.length > 0) {
    for (const s of r.suggestions) {
      const o = s as unknown as { title?: string; message?: string; replacement?: string; expression?: string };
      lines.push(`suggestion: ${o.title ?? o.message ?? ''}${o.replacement ?? o.expression ? ` → ${o.replacement ?? o.expression}` : ''}`);
    }
  }
  if (r.skipped && r.skipped.length > 0) lines.push(`skipped: ${r.skipped.map((s) => `${s.part} (${s.reason})`).join('; ')}`);
  for (const n of r.notes) lines.push(`note: ${n}`);
  return lines.join('\n') + '\n';
}

export const command: CommandSpec = {
  name: 'inspect',
  summary: 'Read one formula in any notation; print its canonical form, f′, f″ and what they do to gradients and floats.',
  usage: 'inspect "<formula>" [--var x] [--lang L] [--param name=value]… [--format text|json] [--saturation-threshold t] [--domain a,b]',
  options: [
    { name: 'var', kind: 'string', value: '<name>', help: 'variable to differentiate by (default: guessed: x, z, or the only free symbol)' },
    { name: 'lang', kind: 'string', value: '<language>', help: `notation of the formula (default: guessed): ${LANGUAGES.join(', ')}`, choices: LANGUAGES },
    { name: 'param', kind: 'repeat', value: '<name=value>', help: 'value of a parameter (repeatable)' },
    { name: 'format', kind: 'string', value: '<text|json>', help: 'output format (default text)', choices: ['text', 'json'] },
    { name: 'saturation-threshold', kind: 'number', value: '<t>', help: '|f′| below t counts as saturating (default 0.01)' },
    { name: 'domain', kind: 'string', value: '<a,b>', help: 'domain of the float breakdown scan (default -100,100)' },
    { name: 'no-analysis', kind: 'flag', help: 'print only the engine results (canonical form, f′, f″)' },
  ],
  run(ctx: CommandContext): number {
    if (ctx.positionals.length === 0) ctx.usageError('inspect needs a formula, e.g. slopewise inspect "x * sigmoid(x)"');
    const formula = ctx.positionals.join(' ');
    const opts: InspectOptions = {};
    const o = ctx.options;
    if (typeof o.var === 'string') {
      if (!/^[A-Za-z_][A-Za-z0-9_]*$/.test(o.var)) ctx.usageError(`--var needs a name, got '${o.var}'`);
      opts.variable = o.var;
    }
    if (typeof o.lang === 'string') opts.language = o.lang as Language;
    if (Array.isArray(o.param)) opts.params = parseParams(o.param, ctx);
    if (typeof o['saturation-threshold'] === 'number') {
      const t = o['saturation-threshold'];
      if (!(t > 0)) ctx.usageError(`--saturation-threshold must be positive, got ${t}`);
      opts.saturationThreshold = t;
    }
    if (typeof o.domain === 'string') opts.domain = parseDomain(o.domain, ctx);
    if (o['no-analysis'] === true) opts.analysis = false;
    const result = inspect(formula, opts);
    ctx.write(o.format === 'json' ? JSON.stringify(result, null, 2) + '\n' : formatText(result));
    return 0;
  },
};
