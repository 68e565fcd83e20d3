/**
 * The `slopewise` command line: a table of verbs, shared option parsing, and the one place that
 * turns failures into exit codes. Output goes to stdout only (the requested text or JSON); errors
 * are JSON `{ "error": { "message", "position"? } }` on stdout with exit code 2, never a stack trace.
 *
 * Exit codes: 0 ok, 1 error findings (scan/check), 2 usage or I/O error.
 *
 * Adding a verb is one line in COMMANDS below: `name: () => import('./commands/name'),` where the
 * module exports `command: CommandSpec` (see commands/inspect.ts for an example). The frame parses
 * the options the spec declares and handles --help for it.
 */
import pkg from '../../package.json';
import { isSlopewiseError } from '../core/errors';

export type OptionKind = 'string' | 'number' | 'repeat' | 'flag';

export interface OptionSpec {
  /** Long name without dashes: `var` for --var. */
  name: string;
  kind: OptionKind;
  /** Placeholder in the usage text (`<name=value>`). */
  value?: string;
  help: string;
  /** Allowed values, checked by the frame. */
  choices?: readonly string[];
}

export type OptionValues = Record<string, string | number | boolean | string[] | undefined>;

export interface CommandContext {
  positionals: string[];
  options: OptionValues;
  /** Writes to stdout (the command's requested output). */
  write(text: string): void;
  /** Throws a usage error (exit 2); `position` is an offset into the formula or argument, if any. */
  usageError(message: string, position?: number): never;
}

export interface CommandSpec {
  name: string;
  summary: string;
  /** e.g. `inspect "<formula>" [options]` */
  usage: string;
  options: readonly OptionSpec[];
  run(ctx: CommandContext): number | Promise<number>;
}

/** Verb → lazily loaded module. One line per verb. */
const COMMANDS: Record<string, () => Promise<{ command: CommandSpec }>> = {
  inspect: () => import('./commands/inspect'),
  scan: () => import('./commands/scan'),
  check: () => import('./commands/check'),
};

export class UsageError extends Error {
  readonly position?: number;
  constructor(message: string, position?: number) {
    super(message);
    this.name = 'UsageError';
    if (position !== undefined) this.position = position;
  }
}

const GLOBAL_HELP = `Usage: slopewise <command> [options]

Commands:
{commands}

Options:
  --help       show help (also: slopewise <command> --help)
  --version    print the version
`;

function commandHelp(spec: CommandSpec): string {
  const lines = [`Usage: slopewise ${spec.usage}`, '', spec.summary, '', 'Options:'];
  const width = Math.max(...spec.options.map((o) => o.name.length + (o.value ? o.value.length + 1 : 0)), 4) + 4;
  for (const o of spec.options) {
    const left = `--${o.name}${o.value ? ` ${o.value}` : ''}`;
    lines.push(`  ${left.padEnd(width)}${o.help}`);
  }
  lines.push(`  ${'--help'.padEnd(width)}show this help`);
  return lines.join('\n') + '\n';
}

/** Parses argv against the spec: `--name value`, `--name=value`, flags, repeats, `--` ends options. */
export function parseOptions(argv: readonly string[], spec: readonly OptionSpec[]): { positionals: string[]; options: OptionValues; help: boolean } {
  const positionals: string[] = [];
  const options: OptionValues = {};
  let help = false;
  let i = 0;
  while (i < argv.length) {
    const a = argv[i] as string;
    i++;
    if (a === '--') { positionals.push(...argv.slice(i)); break; }
    if (a === '--help' || a === '-h') { help = true; continue; }
    if (!a.startsWith('--') || a === '-') { positionals.push(a); continue; }
    const eq = a.indexOf('=');
    const name = a.slice(2, eq < 0 ? undefined : eq);
    const o = spec.find((s) => s.name === name);
    if (!o) throw new UsageError(`Unknown option --${name}`);
    if (o.kind === 'flag') {
      if (eq >= 0) throw new UsageError(`--${name} takes no value`);
      options[name] = true;
      continue;
    }
    let value: string;
    if (eq >= 0) value = a.slice(eq + 1);
    else {
      if (i >= argv.length) throw new UsageError(`--${name} needs a value${o.value ? ` ${o.value}` : ''}`);
      value = argv[i] as string;
      i++;
    }
    if (o.choices && !o.choices.includes(value)) throw new UsageError(`--${name} must be one of: ${o.choices.join(', ')}`);
    if (o.kind === 'number') {
      const v = Number(value);
      if (value.trim() === '' || !Number.isFinite(v)) throw new UsageError(`--${name} needs a number, got '${value}'`);
      options[name] = v;
    } else if (o.kind === 'repeat') {
      const list = (options[name] as string[] | undefined) ?? [];
      list.push(value);
      options[name] = list;
    } else {
      if (options[name] !== undefined) throw new UsageError(`--${name} given twice`);
      options[name] = value;
    }
  }
  return { positionals, options, help };
}

function errorJson(message: string, position?: number, code?: string): string {
  const error: { message: string; position?: number; code?: string } = { message };
  if (position !== undefined) error.position = position;
  if (code !== undefined) error.code = code;
  return JSON.stringify({ error }, null, 2) + '\n';
}

export interface CliIO {
  stdout(text: string): void;
}

/** Runs the command line; returns the exit code. Never throws. */
export async function runCli(argv: readonly string[], io: CliIO): Promise<number> {
  try {
    const [verb, ...rest] = argv;
    if (verb === undefined) throw new UsageError(`No command given. Commands: ${Object.keys(COMMANDS).join(', ')} (see slopewise --help)`);
    if (verb === '--help' || verb === '-h' || verb === 'help') {
      const names = Object.keys(COMMANDS);
      const specs = await Promise.all(names.map(async (n) => (await (COMMANDS[n] as () => Promise<{ command: CommandSpec }>)()).command));
      const list = specs.map((s) => `  ${s.name.padEnd(10)} ${s.summary}`).join('\n');
      io.stdout(GLOBAL_HELP.replace('{commands}', list));
      return 0;
    }
    if (verb === '--version' || verb === '-V') {
      io.stdout(`${(pkg as { version: string }).version}\n`);
      return 0;
    }
    const load = Object.prototype.hasOwnProperty.call(COMMANDS, verb) ? COMMANDS[verb] : undefined;
    if (!load) throw new UsageError(`Unknown command '${verb}'. Commands: ${Object.keys(COMMANDS).join(', ')}`);
    const { command } = await load();
    const parsed = parseOptions(rest, command.options);
    if (parsed.help) {
      io.stdout(commandHelp(command));
      return 0;
    }
    const ctx: CommandContext = {
      positionals: parsed.positionals,
      options: parsed.options,
      write: (t) => io.stdout(t),
      usageError: (message, position) => { throw new UsageError(message, position); },
    };
    return await command.run(ctx);
  } catch (e) {
    if (e instanceof UsageError) { io.stdout(errorJson(e.message, e.position)); return 2; }
    if (isSlopewiseError(e)) { io.stdout(errorJson(e.message, e.position, e.code)); return 2; }
    const message = e instanceof Error ? e.message : String(e);
    io.stdout(errorJson(`Internal error: ${message}`));
    return 2;
  }
}

/** Entry point when bundled as out/cli.js (required by bin/slopewise.js) or run directly. */
function main(): void {
  void runCli(process.argv.slice(2), { stdout: (t) => { process.stdout.write(t); } }).then((code) => {
    process.exitCode = code;
  });
}

// SLOPEWISE_CLI_NO_MAIN=1 lets a test import runCli without running the command line.
if (process.env.SLOPEWISE_CLI_NO_MAIN !== '1') main();
