/**
 * The command table: short name (registered as `slopewise.<name>`) → factory `(ctx) => handler`.
 * `main.ts` registers all of them in one loop; the manifest's `contributes.commands` lists the same
 * names (a unit test keeps the two in step).
 */
import type * as vscode from 'vscode';
import type { Config } from './config';
import type { Features } from './features';

export interface CommandContext {
  readonly extension: vscode.ExtensionContext;
  readonly log: vscode.LogOutputChannel;
  config(): Config;
  features(): Promise<Features>;
}

export type CommandHandler = (...args: unknown[]) => unknown;
export type CommandFactory = (ctx: CommandContext) => CommandHandler;

export const COMMANDS = {
  /** Plot the formula under the cursor or in the selection; from a hover link, the formula in the args. */
  plotFormula: (ctx) => async (...args) => (await ctx.features()).plotFormula(args[0]),
  /** Add the formula under the cursor to the open plot, to compare it with what is already there. */
  addToPlot: (ctx) => async (...args) => (await ctx.features()).plotFormula(args[0], { add: true }),
  checkFile: (ctx) => async (...args) => (await ctx.features()).checkActiveFile(args[0]),
  checkWorkspace: (ctx) => async () => (await ctx.features()).checkWorkspace(),
  copyDerivative: (ctx) => async (...args) => (await ctx.features()).copyDerivative(args[0]),
  insertDerivativeCode: (ctx) => async (...args) => (await ctx.features()).insertDerivativeCode(args[0]),
  showLog: (ctx) => () => ctx.log.show(true),
} satisfies Record<string, CommandFactory>;

export type CommandName = keyof typeof COMMANDS;
