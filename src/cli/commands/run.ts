import { Command } from 'commander';
import { join } from 'node:path';
import { lastMonthEndOnOrBefore } from '../../calendar/days.js';
import { runChecks } from '../../checks/run.js';
import { loadRunConfig, type RunConfig } from '../../config/run-config.js';
import type { Finding } from '../../findings.js';
import { loadFeed, loadPreviousNav, type LoadedFeed } from '../../ingest/feed.js';
import { computeMetrics, type MetricsAnswer } from '../../metrics/compute.js';
import { checkAnswer, checkView, failsOn, type CheckAnswer } from '../../report/check-answer.js';
import { metricsView } from '../../report/metrics-answer.js';
import { reconcile, type ReconcileAnswer } from '../../reconcile/reconcile.js';
import { markSuspectFigures } from '../../reconcile/suspect-data.js';
import { reconcileView } from '../../report/reconcile-answer.js';
import { reconcileFailsOn } from './reconcile.js';
import { render, type OutputFormat } from '../../report/render.js';
import { adjustForCorporateActions } from '../../series/adjust.js';
import type { SeriesFrame } from '../../series/frame.js';
import { asOfOption, chosenFormat, failOnOption, formatOption, loadOptionsOf, outOption, parseAsOf, parseFailOn } from '../options.js';
import { emit, writeFileAtomically, writeQuarantine } from '../output.js';
import { previousNavFromStore, storeSnapshot } from '../snapshots.js';

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
      process.exitCode = await runDailyJob(configPath, options);
    });
}

/** What one daily run produced. */
export interface DailyRun {
  readonly config: RunConfig;
  readonly asOf: number;
  readonly feed: LoadedFeed;
  readonly check: CheckAnswer;
  readonly metrics: MetricsAnswer | null;
  /** The vendor's figures reconciled, when the configuration names a vendor file. */
  readonly reconciliation: ReconcileAnswer | null;
  readonly reportFiles: string[];
}

export async function runDailyJob(configPath: string, options: RunOptions): Promise<number> {
  const run = await executeRun(configPath, options);
  const format = chosenFormat(options.format);
  let text = render(format, run.check, checkView(run.check));
  if (format === 'table' && run.metrics) text += '\n' + render(format, run.metrics, metricsView(run.metrics));
  if (format === 'table' && run.reconciliation) text += '\n' + render(format, run.reconciliation, reconcileView(run.reconciliation));
  emit(text, options.out);
  process.stderr.write(`navassay: reports written to ${run.config.output.dir} (${run.reportFiles.length} files); snapshot stored in ${run.config.store}\n`);
  const failOn = parseFailOn(options.failOn ?? run.config.fail_on);
  const reconcileFails = run.reconciliation !== null && reconcileFailsOn(run.reconciliation, failOn);
  return failsOn(run.check.findings, failOn) || reconcileFails ? 1 : 0;
}

export async function executeRun(configPath: string, options: RunOptions): Promise<DailyRun> {
  const config = loadRunConfig(configPath);
  const asOf = parseAsOf(options.asOf ?? config.as_of);
  const feed = await loadFeed(config.paths, loadOptionsOf(config));
  const previous = await previousNav(config, asOf);
  const findings: Finding[] = runChecks({ ...feed, previous, asOf }, config.checks);
  const check = checkAnswer(asOf, feed.rows, findings);
  const metrics = feed.benchmarks && feed.master ? markSuspectFigures(runMetrics(config, feed, asOf), findings, feed.master) : null;
  const reconciliation = feed.vendor && feed.benchmarks && feed.master ? runReconcile(config, feed, findings) : null;
  storeSnapshot(config, asOf, feed);
  const reportFiles = writeReports(config, check, metrics, reconciliation, feed);
  return { config, asOf, feed, check, metrics, reconciliation, reportFiles };
}

async function previousNav(config: RunConfig, asOf: number): Promise<SeriesFrame | undefined> {
  if (config.previous !== undefined) return loadPreviousNav(config.previous, config.profiles.nav);
  return previousNavFromStore(config, asOf);
}

/** Risk figures at the last month-end on or before the as-of date, on NAVs adjusted for announced splits and distributions. */
function runMetrics(config: RunConfig, feed: LoadedFeed, asOf: number): MetricsAnswer {
  return computeMetrics({
    nav: adjustForCorporateActions(feed.nav, feed.actions ?? []),
    benchmarks: feed.benchmarks!,
    master: feed.master!,
    rates: feed.rates,
    asOf: lastMonthEndOnOrBefore(asOf),
    windows: config.windows,
    methodology: config.methodology,
  });
}

/** Every vendor figure judged against navassay's, on the same adjusted NAVs and the checks' findings. */
function runReconcile(config: RunConfig, feed: LoadedFeed, findings: readonly Finding[]): ReconcileAnswer {
  const data = { nav: adjustForCorporateActions(feed.nav, feed.actions ?? []), benchmarks: feed.benchmarks!, master: feed.master!, rates: feed.rates };
  return reconcile({ vendor: feed.vendor!, data, findings }, { methodology: config.methodology, tolerances: config.reconcile.tolerances });
}

const EXTENSIONS: Record<OutputFormat, string> = { json: 'json', html: 'html', markdown: 'md', csv: 'csv', table: 'txt' };

function writeReports(config: RunConfig, check: CheckAnswer, metrics: MetricsAnswer | null, reconciliation: ReconcileAnswer | null, feed: LoadedFeed): string[] {
  const written: string[] = [];
  const write = (name: string, text: string) => {
    const path = join(config.output.dir, name);
    writeFileAtomically(path, text);
    written.push(path);
  };
  for (const format of config.output.formats) {
    write(`check.${EXTENSIONS[format]}`, render(format, check, checkView(check)));
    if (metrics) write(`metrics.${EXTENSIONS[format]}`, render(format, metrics, metricsView(metrics)));
    if (reconciliation) write(`reconcile.${EXTENSIONS[format]}`, render(format, reconciliation, reconcileView(reconciliation)));
  }
  const quarantine = join(config.output.dir, 'quarantine.csv');
  writeQuarantine(quarantine, feed.rejected);
  written.push(quarantine);
  return written;
}
