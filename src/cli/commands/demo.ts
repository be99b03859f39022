import { Command } from 'commander';
import { mkdirSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { demoConfig, demoFiles } from '../../demo/scenario.js';
import { requireDirectoryLocation } from '../locations.js';
import { formatOption } from '../options.js';
import { writeFileAtomically } from '../../report/files.js';
import { runCommandLine } from './run.js';

export function demoCommand(): Command {
  return new Command('demo')
    .description('write the invented Bramblecourt Funds feed to a directory and run the daily job on it')
    .option('--dir <dir>', 'where to write the demo feed, configuration, store and reports', 'navassay-demo')
    .addOption(formatOption())
    .action(async (options: { dir: string; format?: string }) => {
      requireDirectoryLocation(options.dir, '--dir');
      const configPath = writeDemo(resolve(options.dir));
      process.stderr.write(`navassay: demo feed and configuration written to ${resolve(options.dir)}\n`);
      process.exitCode = await runCommandLine(configPath, { format: options.format });
    });
}

/** Writes the demo's files and its run configuration; returns the configuration's path. */
export function writeDemo(directory: string): string {
  mkdirSync(directory, { recursive: true });
  for (const [name, text] of Object.entries(demoFiles())) writeFileAtomically(join(directory, name), text);
  const configPath = join(directory, 'navassay.yaml');
  writeFileAtomically(configPath, demoConfig());
  return configPath;
}
