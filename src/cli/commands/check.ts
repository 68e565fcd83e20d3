/**
 * `slopewise check <files or folders…> [--format text|json|sarif]`: hand-written derivatives against
 * their forwards, comment formulas against code, unstable forms, vanishing pairs.
 * Exit 0 when no error-level finding, 1 when there is one, 2 for usage or I/O problems.
 */
import type { CommandSpec } from '../main';
import pkg from '../../../package.json';
import { checkSource } from '../../core/check/index';
import { findingRecords, formatFindingsText, type FindingRecord } from '../../core/report';
import { toSarif } from '../../core/sarif';
import { collectSources } from './scan';

export const command: CommandSpec = {
  name: 'check',
  summary: 'Check hand-written derivatives and comment formulas in source files.',
  usage: 'check <files or folders…> [--format text|json|sarif]',
  options: [
    { name: 'format', kind: 'string', value: '<text|json|sarif>', help: 'output format (default text)', choices: ['text', 'json', 'sarif'] },
  ],
  run(ctx) {
    if (ctx.positionals.length === 0) ctx.usageError('check needs at least one file or folder');
    const src = collectSources(ctx.positionals, ctx);
    const findings: FindingRecord[] = [];
    for (const f of src.files) {
      try {
        const r = checkSource(f.text, { fileName: f.file });
        findings.push(...findingRecords(f.file, f.text, r.findings));
        // limits and budgets that cut the check short (not per-formula notes such as "no forward found")
        for (const n of r.notes) if (/budget|longer than|larger than/.test(n)) src.problems.push({ file: f.file, message: n });
      } catch (e) {
        src.problems.push({ file: f.file, message: `could not be checked: ${e instanceof Error ? e.message : String(e)}` });
      }
    }
    const format = ctx.options.format ?? 'text';
    if (format === 'json') {
      const plain = findings.map(({ related: _r, fix, endColumn: _e, ...rest }) => (fix ? { ...rest, fix: { title: fix.title, line: fix.line, column: fix.column, endLine: fix.endLine, endColumn: fix.endColumn, text: fix.text } } : rest));
      ctx.write(JSON.stringify({ findings: plain, problems: src.problems }, null, 2) + '\n');
    } else if (format === 'sarif') {
      ctx.write(JSON.stringify(toSarif(findings, src.problems, { toolVersion: (pkg as { version: string }).version }), null, 2) + '\n');
    } else {
      ctx.write(formatFindingsText(findings, src.problems, src.files.length));
    }
    return findings.some((f) => f.severity === 'error') ? 1 : 0;
  },
};
