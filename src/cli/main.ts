import { Command, CommanderError } from 'commander';
import { NavassayError } from '../ingest/errors.js';
import { checkCommand } from './commands/check.js';
import { demoCommand } from './commands/demo.js';

import { ingestCommand } from './commands/ingest.js';
import { metricsCommand } from './commands/metrics.js';
import { reconcileCommand } from './commands/reconcile.js';
import { runCommand } from './commands/run.js';
import { packageVersion } from './version.js';

export function buildProgram(): Command {
  const program = new Command('navassay')
    .description('Audits fund data feeds: validates NAV and benchmark files and recomputes risk figures.')
    .version(packageVersion(), '--version', 'print the version')
    .helpOption('--help', 'show help')
    .showHelpAfterError('(add --help for usage)')
    .exitOverride();
  for (const command of [demoCommand(), runCommand(), checkCommand(), metricsCommand(), reconcileCommand(), ingestCommand()]) {
    command.version(packageVersion(), '--version', 'print the version').helpOption('--help', 'show help').exitOverride();
    program.addCommand(command);
  }
  return program;
}

/** Runs the command line and returns the exit status of interface.md. */
export async function main(argv: readonly string[]): Promise<number> {
  process.exitCode = 0;
  try {
    await buildProgram().parseAsync([...argv], { from: 'user' });
    return Number(process.exitCode ?? 0);
  } catch (error) {
    if (error instanceof CommanderError) {
      return error.code === 'commander.helpDisplayed' || error.code === 'commander.version' || error.exitCode === 0 ? 0 : 2;
    }
    if (error instanceof NavassayError) {
      process.stderr.write(`navassay: ${error.message}\n`);
      return error.exitCode;
    }
    throw error;
  }
}

