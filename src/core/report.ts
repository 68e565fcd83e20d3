/**
 * Findings and formulas as plain records with 1-based positions (what the command line prints and
 * SARIF carries), and their text form for a terminal: `file:line:column  severity  rule  message`,
 * then expected vs found and the numeric evidence.
 */
import type { Finding, FoundFormula, Span } from './types';

export interface Position {
  /** 1-based line. */
  line: number;
  /** 1-based column (UTF-16 code units, like editors count). */
  column: number;
}

/** Offset → 1-based line/column for one text (binary search over line starts). */
export function locator(text: string): (offset: number) => Position {
  const starts = [0];
  for (let i = 0; i < text.length; i++) if (text.charCodeAt(i) === 10) starts.push(i + 1);
  return (offset: number) => {
    let lo = 0;
    let hi = starts.length - 1;
    while (lo < hi) {
      const mid = (lo + hi + 1) >> 1;
      if (starts[mid]! <= offset) lo = mid;
      else hi = mid - 1;
    }
    return { line: lo + 1, column: offset - starts[lo]! + 1 };
  };
}

export interface Region {
  line: number;
  column: number;
  endLine: number;
  endColumn: number;
}

function region(loc: (o: number) => Position, span: Span): Region {
  const a = loc(span.start);
  const b = loc(Math.max(span.start, span.end));
  return { line: a.line, column: a.column, endLine: b.line, endColumn: b.column };
}

export interface FormulaRecord {
  file: string;
  line: number;
  column: number;
  endLine: number;
  role: FoundFormula['role'];
  name?: string;
  expression: string;
  language: string;
  origin: FoundFormula['origin'];
  variable?: string;
  argument?: 'input' | 'output';
}

export interface FindingRecord {
  file: string;
  line: number;
  column: number;
  endLine: number;
  endColumn: number;
  rule: Finding['rule'];
  severity: Finding['severity'];
  message: string;
  expected?: string;
  found?: string;
  evidence?: Finding['evidence'];
  related?: Region & { message: string };
  fix?: Region & { title: string; text: string };
}

export interface Problem {
  file: string;
  message: string;
}

export function formulaRecords(file: string, text: string, formulas: readonly FoundFormula[], language: string): FormulaRecord[] {
  const loc = locator(text);
  return formulas.map((f) => {
    const r = region(loc, f.span);
    const rec: FormulaRecord = {
      file, line: r.line, column: r.column, endLine: r.endLine, role: f.role, expression: f.text,
      language: f.origin === 'code' ? language : f.language, origin: f.origin,
    };
    if (f.name) rec.name = f.name;
    if (f.variable) rec.variable = f.variable;
    if (f.argument) rec.argument = f.argument;
    return rec;
  });
}

export function findingRecords(file: string, text: string, findings: readonly Finding[]): FindingRecord[] {
  const loc = locator(text);
  return findings.map((f) => {
    const r = region(loc, f.span);
    const rec: FindingRecord = { file, ...r, rule: f.rule, severity: f.severity, message: f.message };
    if (f.expected !== undefined) rec.expected = f.expected;
    if (f.found !== undefined) rec.found = f.found;
    if (f.evidence) rec.evidence = f.evidence;
    if (f.related) rec.related = { ...region(loc, f.related.span), message: f.related.message };
    if (f.fix) rec.fix = { ...region(loc, f.fix.span), title: f.fix.title, text: f.fix.text };
    return rec;
  });
}

function num(v: number): string {
  if (!Number.isFinite(v)) return String(v);
  return Number(v.toPrecision(6)).toString();
}

export function formatFindingsText(findings: readonly FindingRecord[], problems: readonly Problem[], filesChecked: number): string {
  const out: string[] = [];
  for (const f of findings) {
    out.push(`${f.file}:${f.line}:${f.column}  ${f.severity}  ${f.rule}  ${f.message}`);
    if (f.expected !== undefined) out.push(`    expected: ${f.expected}`);
    if (f.found !== undefined) out.push(`    found:    ${f.found}`);
    if (f.evidence) {
      const e = f.evidence;
      out.push(`    largest error ${num(e.maxError)} at x = ${num(e.x)} over ${e.points} points (relative tolerance ${e.tolerance})`);
    }
    if (f.related) out.push(`    see ${f.file}:${f.related.line}:${f.related.column} (${f.related.message})`);
    if (f.fix) out.push(`    fix: ${f.fix.title}: ${f.fix.text}`);
  }
  for (const p of problems) out.push(`${p.file}: not checked: ${p.message}`);
  const errors = findings.filter((f) => f.severity === 'error').length;
  const warnings = findings.filter((f) => f.severity === 'warning').length;
  out.push(`${filesChecked} file(s) checked: ${errors} error(s), ${warnings} warning(s)${problems.length ? `, ${problems.length} file(s) not readable` : ''}`);
  return out.join('\n') + '\n';
}

export function formatFormulasText(formulas: readonly FormulaRecord[], problems: readonly Problem[], filesScanned: number): string {
  const out: string[] = [];
  for (const f of formulas) {
    const name = f.name ? ` ${f.name}` : '';
    out.push(`${f.file}:${f.line}:${f.column}  ${f.role}${name}  (${f.origin}, ${f.language})  ${f.expression}`);
  }
  for (const p of problems) out.push(`${p.file}: not scanned: ${p.message}`);
  out.push(`${filesScanned} file(s) scanned: ${formulas.length} formula(s)`);
  return out.join('\n') + '\n';
}
