import { Command } from 'commander';
import { checkOutputsApart } from '../../config/output-paths.js';
import { loadRunConfig, runInputs } from '../../config/run-config.js';
import { runDailyJob } from '../../job/daily-job.js';
import { checkView, failsOn } from '../../report/check-answer.js';
import { metricsView } from '../../report/metrics-answer.js';
import { reconcileView } from '../../report/reconcile-answer.js';
import { reconcileFailsOn } from './reconcile.js';
import { render } from '../../report/render.js';
import { requireDirectoryLocation, requireFileLocation } from '../locations.js';
import { annualizationNotices, printNotices, unknownSeriesNotices } from '../notices.js';
import { asOfOption, chosenFormat, failOnOption, formatOption, outOption, parseAsOf, parseFailOn } from '../options.js';
import { emit } from '../output.js';

interface RunOptions {
  asOf?: string;
  format?: string;
  out?: string;
  failOn?: string;
}

export function runCommand(): Command {
  return new Command('run')
    .description("the daily job from a run configuration: read the feed, check it, recompute risk figures, store the snapshot, write the reports")
    .argument('<config>', 'run configuration (YAML)')
    .addOption(asOfOption("the configuration's as_of, else today"))
    .addOption(formatOption())
    .addOption(outOption())
    .addOption(failOnOption().default(undefined))
    .action(async (configPath: string, options: RunOptions) => {
      process.exitCode = await runCommandLine(configPath, options);
    });
}

/** `navassay run` (and `demo`): the daily job, its answer printed, its exit status returned. */
export async function runCommandLine(configPath: string, options: RunOptions): Promise<number> {
  const config = loadRunConfig(configPath);
  const asOf = parseAsOf(options.asOf ?? config.as_of);
  const failOn = parseFailOn(options.failOn ?? config.fail_on);
  requireDirectoryLocation(config.output.dir, 'output.dir');
  requireDirectoryLocation(config.store, 'store');
  if (options.out !== undefined) {
    requireFileLocation(options.out, '--out');
    checkOutputsApart('--out', runInputs(config), [{ key: '--out', path: options.out }]);
  }
  printNotices(annualizationNotices(config.methodology));

  const run = await runDailyJob(config, asOf);

  printNotices(unknownSeriesNotices(config.checks, run.day.feed));
  const format = chosenFormat(options.format);
  let text = render(format, run.check, checkView(run.check));
  if (format === 'table' && run.metrics) text += '\n' + render(format, run.metrics, metricsView(run.metrics));
  if (format === 'table' && run.reconciliation) text += '\n' + render(format, run.reconciliation, reconcileView(run.reconciliation));
  emit(text, options.out);
  process.stderr.write(`navassay: reports written to ${config.output.dir} (${run.reportFiles.length} files); snapshot stored in ${config.store}\n`);
  const reconcileFails = run.reconciliation !== null && reconcileFailsOn(run.reconciliation, failOn);
  return failsOn(run.check.findings, failOn) || reconcileFails ? 1 : 0;
}
