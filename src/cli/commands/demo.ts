import { Command } from 'commander';
import { mkdirSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { formatIsoDate } from '../../calendar/days.js';
import { DEMO_AS_OF, DEMO_DAYS, demoConfig, demoFiles } from '../../demo/scenario.js';
import { writeFileAtomically } from '../../report/files.js';
import { requireDirectoryLocation } from '../locations.js';
import { loadRunConfig } from '../../config/run-config.js';
import { runDailyJob } from '../../job/daily-job.js';
import { formatOption, parseAsOf } from '../options.js';
import { runCommandLine } from './run.js';

export function demoCommand(): Command {
  return new Command('demo')
    .description('write three business days of the invented Bramblecourt Funds feed to a directory and run the daily job on each in order')
    .option('--dir <dir>', 'where to write the demo feed, configuration, store and reports', 'navassay-demo')
    .addOption(formatOption())
    .option('--quiet', 'no progress line and no notes on standard error')
    .action(async (options: { dir: string; format?: string; quiet?: boolean }) => {
      requireDirectoryLocation(options.dir, '--dir');
      const directory = resolve(options.dir);
      const configs = writeDemo(directory);
      if (!options.quiet) process.stderr.write(`navassay: demo feed and configurations written to ${directory}\n`);
      // The earlier days run quietly, their answers unread: they build the store and the ticket history the last day reports against.
      for (const path of configs.slice(0, -1)) {
        const config = loadRunConfig(path);
        await runDailyJob(config, parseAsOf(config.as_of));
      }
      process.exitCode = await runCommandLine(configs[configs.length - 1], { format: options.format, quiet: options.quiet });
    });
}

/** Writes the demo's files and one run configuration a day; returns the configurations' paths, oldest day first. */
export function writeDemo(directory: string): string[] {
  mkdirSync(directory, { recursive: true });
  for (const [name, text] of Object.entries(demoFiles())) writeFileAtomically(join(directory, name), text);
  return DEMO_DAYS.map((day) => {
    const configPath = day === DEMO_AS_OF ? join(directory, 'navassay.yaml') : join(directory, 'days', formatIsoDate(day), 'navassay.yaml');
    mkdirSync(dirname(configPath), { recursive: true });
    writeFileAtomically(configPath, demoConfig(day));
    return configPath;
  });
}
