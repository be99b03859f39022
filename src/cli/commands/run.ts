import { Command } from 'commander';
import { checkOutputsApart } from '../../config/output-paths.js';
import { loadRunConfig, runInputs } from '../../config/run-config.js';
import { runDailyJob } from '../../job/daily-job.js';
import { join } from 'node:path';
import { failsOn } from '../../report/check-answer.js';
import { DAILY_FILES, renderDailyCsv, renderDailyHtml, renderDailyMarkdown, renderDailyTerminal, type DailyReport } from '../../report/daily/index.js';
import { jsonAnswerInPieces, type OutputFormat } from '../../report/render.js';
import { requireDirectoryLocation, requireFileLocation } from '../locations.js';
import { annualizationNotices, printNotices, unknownSeriesNotices } from '../notices.js';
import { asOfOption, chosenFormat, failOnOption, formatOption, outOption, parseAsOf, parseFailOn, parseThreads, threadsOption } from '../options.js';
import { emit } from '../output.js';
import { colourWanted, progressLine } from '../progress.js';
import { reconcileFailsOn } from './reconcile.js';

interface RunOptions {
  asOf?: string;
  format?: string;
  out?: string;
  failOn?: string;
  threads?: string;
  quiet?: boolean;
}

export function runCommand(): Command {
  return new Command('run')
    .description("the daily job from a run configuration: read the feed, check it, recompute risk figures, reconcile the vendor's, carry the tickets, store the snapshot, write the day's report")
    .argument('<config>', 'run configuration (YAML)')
    .addOption(asOfOption("the configuration's as_of, else today"))
    .addOption(formatOption())
    .addOption(outOption())
    .addOption(failOnOption().default(undefined))
    .addOption(threadsOption())
    .option('--quiet', 'no progress line and no notes on standard error')
    .action(async (configPath: string, options: RunOptions) => {
      process.exitCode = await runCommandLine(configPath, options);
    });
}

/** `navassay run` (and `demo`): the daily job, its answer printed, its exit status returned. */
export async function runCommandLine(configPath: string, options: RunOptions): Promise<number> {
  const threads = parseThreads(options.threads); // a wrong command line fails before any file is read
  const configFile = loadRunConfig(configPath);
  const config = threads === undefined ? configFile : { ...configFile, threads };
  const asOf = parseAsOf(options.asOf ?? config.as_of);
  const failOn = parseFailOn(options.failOn ?? config.fail_on);
  requireDirectoryLocation(config.output.dir, 'output.dir');
  requireDirectoryLocation(config.store, 'store');
  if (options.out !== undefined) {
    requireFileLocation(options.out, '--out');
    checkOutputsApart('--out', runInputs(config), [{ key: '--out', path: options.out }]);
  }
  const quiet = options.quiet === true;
  if (!quiet) printNotices(annualizationNotices(config.methodology));

  const progress = progressLine(quiet);
  const run = await runDailyJob(config, asOf, (text) => progress.stage(text));
  progress.done();

  if (!quiet) printNotices([...unknownSeriesNotices(config.checks, run.day.feed), ...run.notices]);
  emit(renderDay(chosenFormat(options.format), run.report, config.output.dir), options.out);
  if (!quiet) process.stderr.write(`navassay: reports written to ${config.output.dir} (${run.reportFiles.length} files); snapshot stored in ${config.store}\n`);
  const reconcileFails = run.reconciliation !== null && reconcileFailsOn(run.reconciliation, failOn);
  return failsOn(run.check.findings, failOn) || reconcileFails ? 1 : 0;
}

/** The whole day on standard output, in the chosen format: the day's report. */
function renderDay(format: OutputFormat, report: DailyReport, outputDir: string): string | Iterable<string> {
  switch (format) {
    case 'json':
      return jsonAnswerInPieces(report);
    case 'html':
      return renderDailyHtml(report);
    case 'markdown':
      return renderDailyMarkdown(report);
    case 'csv':
      return renderDailyCsv(report);
    case 'table':
      return renderDailyTerminal(report, { colour: colourWanted() }, [join(outputDir, DAILY_FILES.html)]);
  }
}
