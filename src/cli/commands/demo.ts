import { Command } from 'commander';
import { mkdirSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { formatIsoDate } from '../../calendar/days.js';
import { DEMO_AS_OF, DEMO_DAYS, demoConfig, demoFiles } from '../../demo/scenario.js';
import { formatOption } from '../options.js';
import { writeFileAtomically } from '../output.js';
import { executeRun, runDailyJob } from './run.js';

export function demoCommand(): Command {
  return new Command('demo')
    .description('write three business days of the invented Bramblecourt Funds feed to a directory and run the daily job on each in order')
    .option('--dir <dir>', 'where to write the demo feed, configuration, store and reports', 'navassay-demo')
    .addOption(formatOption())
    .option('--quiet', 'no progress line and no notes on standard error')
    .action(async (options: { dir: string; format?: string; quiet?: boolean }) => {
      const directory = resolve(options.dir);
      const configs = writeDemo(directory);
      if (!options.quiet) process.stderr.write(`navassay: demo feed and configurations written to ${directory}\n`);
      // The earlier days run quietly: they build the store and the ticket history the last day reports against.
      for (const config of configs.slice(0, -1)) await executeRun(config, { quiet: true });
      process.exitCode = await runDailyJob(configs[configs.length - 1], { format: options.format ?? 'table', quiet: options.quiet });
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
