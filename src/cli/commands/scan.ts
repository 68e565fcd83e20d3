/**
 * `slopewise scan <files or folders…> [--format text|json]`: the formulas found in each file.
 *
 * Also the file walker shared with `check`: folders recurse, skipping `node_modules`, `.git` and
 * binary files (a NUL byte in the first 8 kB); a file that cannot be read, is not UTF-8, or is larger
 * than the size limit is reported as a problem in the output, never fatal. A path that does not
 * exist is a usage error (exit 2). A progress line goes to stderr only when stderr is a terminal.
 */
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';
import type { CommandContext, CommandSpec } from '../main';
import { languageInfo, scanText } from '../../core/detect/index';
import { LIMITS } from '../../core/limits';
import { formatFormulasText, formulaRecords, type FormulaRecord, type Problem } from '../../core/report';

const SKIP_DIRS = new Set(['node_modules', '.git', '.hg', '.svn']);
const BINARY_PROBE = 8192;
/** Files before a progress line is worth showing. */
const PROGRESS_FROM = 40;

export interface SourceFile {
  /** Path as shown (relative to the working directory when inside it). */
  file: string;
  text: string;
}

export interface Sources {
  files: SourceFile[];
  problems: Problem[];
  /** Binary files skipped silently (counted). */
  binary: number;
}

function shown(path: string): string {
  const rel = relative(process.cwd(), path);
  return rel && !rel.startsWith('..') ? rel.split('\\').join('/') : path;
}

/** Every text file under the given paths. Throws a usage error for a path that does not exist. */
export function collectSources(paths: readonly string[], ctx: CommandContext): Sources {
  const files: string[] = [];
  const problems: Problem[] = [];
  const walk = (p: string, depth: number): void => {
    let st;
    try {
      st = statSync(p);
    } catch (e) {
      problems.push({ file: shown(p), message: ioMessage(e) });
      return;
    }
    if (st.isDirectory()) {
      if (depth > 64) return;
      let entries: string[];
      try {
        entries = readdirSync(p).sort();
      } catch (e) {
        problems.push({ file: shown(p), message: ioMessage(e) });
        return;
      }
      for (const name of entries) {
        if (SKIP_DIRS.has(name)) continue;
        walk(join(p, name), depth + 1);
      }
    } else if (st.isFile()) files.push(p);
  };
  // A file named on the command line that cannot be read is the caller's mistake (exit 2, nothing
  // written); files met while walking a folder are reported and skipped, never fatal.
  const named = new Set<string>();
  for (const p of paths) {
    try {
      if (statSync(p).isFile()) named.add(p);
    } catch {
      ctx.usageError(`No such file or folder: ${p}`);
    }
    walk(p, 0);
  }
  const skip = (p: string, message: string): void => {
    if (named.has(p)) ctx.usageError(`${shown(p)}: ${message}`);
    problems.push({ file: shown(p), message });
  };
  const out: SourceFile[] = [];
  let binary = 0;
  const progress = process.stderr.isTTY && files.length >= PROGRESS_FROM;
  files.forEach((p, i) => {
    if (progress && i % 10 === 0) process.stderr.write(`\rreading ${i + 1}/${files.length} ${shown(p).slice(-60).padEnd(60)}`);
    let buf: Buffer;
    try {
      buf = readFileSync(p);
    } catch (e) {
      skip(p, ioMessage(e));
      return;
    }
    if (buf.subarray(0, BINARY_PROBE).includes(0)) {
      if (named.has(p)) ctx.usageError(`${shown(p)}: binary file, not source text`);
      binary++;
      return;
    }
    if (buf.length > LIMITS.maxFileBytes) {
      skip(p, `larger than ${LIMITS.maxFileBytes} bytes: skipped`);
      return;
    }
    let text: string;
    try {
      text = new TextDecoder('utf-8', { fatal: true }).decode(buf);
    } catch {
      skip(p, 'not valid UTF-8: skipped');
      return;
    }
    if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
    out.push({ file: shown(p), text });
  });
  if (progress) process.stderr.write('\r' + ' '.repeat(80) + '\r');
  return { files: out, problems, binary };
}

function ioMessage(e: unknown): string {
  const code = (e as { code?: string }).code;
  if (code === 'EACCES' || code === 'EPERM') return 'permission denied';
  if (code === 'ENOENT') return 'no such file';
  if (code === 'EISDIR') return 'is a folder';
  return e instanceof Error ? e.message : String(e);
}

export const command: CommandSpec = {
  name: 'scan',
  summary: 'List the activation, loss and derivative formulas found in source files.',
  usage: 'scan <files or folders…> [--format text|json]',
  options: [
    { name: 'format', kind: 'string', value: '<text|json>', help: 'output format (default text)', choices: ['text', 'json'] },
  ],
  run(ctx) {
    if (ctx.positionals.length === 0) ctx.usageError('scan needs at least one file or folder');
    const src = collectSources(ctx.positionals, ctx);
    const formulas: FormulaRecord[] = [];
    for (const f of src.files) {
      const info = languageInfo(undefined, f.file);
      try {
        const r = scanText(f.text, { fileName: f.file });
        formulas.push(...formulaRecords(f.file, f.text, r.formulas, info.label));
        for (const s of r.skipped) src.problems.push({ file: f.file, message: s });
      } catch (e) {
        src.problems.push({ file: f.file, message: `could not be scanned: ${e instanceof Error ? e.message : String(e)}` });
      }
    }
    if (ctx.options.format === 'json') ctx.write(JSON.stringify({ formulas, problems: src.problems }, null, 2) + '\n');
    else ctx.write(formatFormulasText(formulas, src.problems, src.files.length));
    return 0;
  },
};
