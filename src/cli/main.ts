import { Command, CommanderError } from 'commander';
import { NavassayError } from '../ingest/errors.js';
import { unusableLocation } from './locations.js';
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
    .configureOutput({ outputError: parserErrorWriter('navassay --help') })
    .exitOverride();
  for (const command of [demoCommand(), runCommand(), checkCommand(), metricsCommand(), reconcileCommand(), ingestCommand()]) {
    command
      .version(packageVersion(), '--version', 'print the version')
      .helpOption('--help', 'show help')
      .configureOutput({ outputError: parserErrorWriter(`navassay ${command.name()} --help`) })
      .exitOverride();
    program.addCommand(command);
  }
  return program;
}

/**
 * The argument parser's errors read like every other error: one sentence after `navassay:`
 * that says what to do (the parser's own form is `error: …` with no remedy).
 */
export function parserErrorWriter(helpCommand: string): (text: string, write: (text: string) => void) => void {
  return (text, write) => {
    const problem = text.trim().replace(/^error:\s*/, '').replace(/\.$/, '');
    write(`navassay: ${problem}; see ${helpCommand} for the usage.\n`);
  };
}

/** Runs the command line and returns the exit status of docs/interface.md. */
export async function main(argv: readonly string[]): Promise<number> {
  process.exitCode = 0;
  try {
    await buildProgram().parseAsync([...argv], { from: 'user' });
    return Number(process.exitCode ?? 0);
  } catch (error) {
    if (error instanceof CommanderError) {
      return error.code === 'commander.helpDisplayed' || error.code === 'commander.version' || error.exitCode === 0 ? 0 : 2;
    }
    const known = error instanceof NavassayError ? error : unusableLocation(error);
    if (known) {
      process.stderr.write(`navassay: ${known.message}\n`);
      return known.exitCode;
    }
    throw error;
  }
}

