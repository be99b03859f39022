import { Command } from 'commander';
import { join } from 'node:path';
import { formatIsoDate, lastMonthEndOnOrBefore } from '../../calendar/days.js';
import { runChecks } from '../../checks/run.js';
import { loadRunConfig, type RunConfig } from '../../config/run-config.js';
import type { Finding } from '../../findings.js';
import { loadFeed, loadPreviousNav, type LoadedFeed } from '../../ingest/feed.js';
import { computeMetrics, type MetricsAnswer } from '../../metrics/compute.js';
import { checkAnswer, checkView, failsOn, type CheckAnswer } from '../../report/check-answer.js';
import { buildDailyReport, dailyFiles, navChart, renderDailyCsv, renderDailyHtml, renderDailyMarkdown, renderDailyTerminal, type DailyReport, type NavChart } from '../../report/daily/index.js';
import { metricsView } from '../../report/metrics-answer.js';
import { render, type OutputFormat } from '../../report/render.js';
import { adjustForCorporateActions } from '../../series/adjust.js';
import type { SeriesFrame } from '../../series/frame.js';
import { ticketStage, type TicketRecord } from '../../tickets/index.js';
import { asOfOption, chosenFormat, failOnOption, formatOption, loadOptionsOf, outOption, parseAsOf, parseFailOn } from '../options.js';
import { emit, writeFileAtomically, writeQuarantine } from '../output.js';
import { colourWanted, progressLine, type Progress } from '../progress.js';
import { pinnedPreviousNotice, previousNavFromStore, storeSnapshot } from '../snapshots.js';

interface RunOptions {
  asOf?: string;
  format?: string;
  out?: string;
  failOn?: string;
  quiet?: boolean;
}

export function runCommand(): Command {
  return new Command('run')
    .description("the daily job from a run configuration: read the feed, check it, recompute risk figures, store the snapshot, carry the tickets, write the day's report")
    .argument('<config>', 'run configuration (YAML)')
    .addOption(asOfOption("the configuration's as_of, else today"))
    .addOption(formatOption())
    .addOption(outOption())
    .addOption(failOnOption().default(undefined))
    .option('--quiet', 'no progress line and no notes on standard error')
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
  readonly report: DailyReport;
  readonly reportFiles: string[];
}

export async function runDailyJob(configPath: string, options: RunOptions): Promise<number> {
  const progress = progressLine(options.quiet === true);
  const run = await executeRun(configPath, options, progress);
  const format = chosenFormat(options.format);
  emit(renderDay(format, run), options.out);
  if (!options.quiet) process.stderr.write(`navassay: reports written to ${run.config.output.dir} (${run.reportFiles.length} files); snapshot stored in ${run.config.store}\n`);
  const failOn = parseFailOn(options.failOn ?? run.config.fail_on);
  return failsOn(run.check.findings, failOn) ? 1 : 0;
}

/** The whole day on standard output, in the chosen format. */
function renderDay(format: OutputFormat, run: DailyRun): string {
  switch (format) {
    case 'json':
      return JSON.stringify(run.report, null, 2) + '\n';
    case 'html':
      return renderDailyHtml(run.report);
    case 'markdown':
      return renderDailyMarkdown(run.report);
    case 'csv':
      return renderDailyCsv(run.report);
    case 'table':
      return renderDailyTerminal(run.report, { colour: colourWanted() }, [join(run.config.output.dir, 'report.html')]);
  }
}

export async function executeRun(configPath: string, options: RunOptions, progress: Progress = progressLine(true)): Promise<DailyRun> {
  const config = loadRunConfig(configPath);
  const asOf = parseAsOf(options.asOf ?? config.as_of);
  progress.stage('reading the feed …');
  const feed = await loadFeed(config.paths, loadOptionsOf(config));
  const notices: string[] = [];
  const previous = await previousNav(config, asOf, notices);
  progress.stage(`checking ${feed.nav.ids.length} series, ${feed.rows.accepted} rows …`);
  const findings: Finding[] = runChecks({ ...feed, previous, asOf }, config.checks);
  const check = checkAnswer(asOf, feed.rows, findings);
  progress.stage(`computing risk figures for ${feed.nav.ids.length} series …`);
  const metrics = feed.benchmarks && feed.master ? runMetrics(config, feed, asOf) : null;
  progress.stage('storing the snapshot and the tickets …');
  const stored = storeSnapshot(config, asOf, feed);
  if (stored.notice) notices.push(stored.notice);
  const tickets = ticketStage({
    storeDir: config.store,
    feed: config.feed,
    asOf: formatIsoDate(asOf),
    findings,
    nav: feed.nav,
    master: feed.master,
    acknowledgementsPath: config.acknowledgements,
  });
  notices.push(...tickets.notices);
  progress.stage('writing the reports …');
  const tooLong = tablesTooLongToRead(config, check, metrics);
  if (tooLong.length) notices.push(`${tooLong.join(' and ')} ${tooLong.length > 1 ? 'have' : 'has'} more than ${READABLE_TABLE_ROWS} rows: written as json and csv only; report.html shows what needs a person.`);
  const report = buildDailyReport({
    feed: config.feed,
    previousAsOf: tickets.previousAsOf,
    check,
    patterns: tickets.patterns,
    tickets: tickets.records,
    history: tickets.history,
    metrics,
    charts: chartsOf(feed, tickets.records, findings, asOf),
    notices,
  });
  const reportFiles = writeReports(config, check, metrics, feed, report, new Set(tooLong));
  progress.done();
  if (!options.quiet) for (const notice of notices) process.stderr.write(`navassay: ${notice}\n`);
  return { config, asOf, feed, check, metrics, report, reportFiles };
}

async function previousNav(config: RunConfig, asOf: number, notices: string[]): Promise<SeriesFrame | undefined> {
  if (config.previous !== undefined) {
    const notice = pinnedPreviousNotice(config, asOf);
    if (notice) notices.push(notice);
    return loadPreviousNav(config.previous, config.profiles.nav);
  }
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

/** Charts for the series of the worst tickets that need a person. */
const CHARTS_AT_MOST = 12;

function chartsOf(feed: LoadedFeed, records: readonly TicketRecord[], findings: readonly Finding[], asOf: number): NavChart[] {
  const benchmarkOf = new Map((feed.master ?? []).map((m) => [m.series_id, m.benchmark_id]));
  const wanted: string[] = [];
  for (const record of records) {
    if (record.state === 'resolved' || record.silenced || record.kind !== 'series') continue;
    for (const id of record.series_ids) if (!wanted.includes(id)) wanted.push(id);
  }
  return wanted
    .map((id) => navChart(feed.nav, feed.benchmarks, id, benchmarkOf.get(id) ?? null, findings, asOf))
    .filter((chart): chart is NavChart => chart !== null)
    .slice(0, CHARTS_AT_MOST);
}

const EXTENSIONS: Record<OutputFormat, string> = { json: 'json', html: 'html', markdown: 'md', csv: 'csv', table: 'txt' };
/**
 * Above this many rows a table is not written as html, markdown or text: nobody reads a table
 * that long in a browser, and the day's report shows what needs a person and links the csv.
 */
const READABLE_TABLE_ROWS = 2000;
const FOR_READING: ReadonlySet<OutputFormat> = new Set(['html', 'markdown', 'table']);

/** The per-command tables (check, metrics) too long to be read as html, markdown or text. */
function tablesTooLongToRead(config: RunConfig, check: CheckAnswer, metrics: MetricsAnswer | null): string[] {
  if (!config.output.formats.some((format) => FOR_READING.has(format))) return [];
  const rows: Array<[string, number]> = [['check', check.findings.length], ['metrics', metrics?.metrics.length ?? 0]];
  return rows.filter(([, count]) => count > READABLE_TABLE_ROWS).map(([name]) => name);
}

function writeReports(config: RunConfig, check: CheckAnswer, metrics: MetricsAnswer | null, feed: LoadedFeed, report: DailyReport, tooLong: ReadonlySet<string>): string[] {
  const written: string[] = [];
  const write = (name: string, text: string) => {
    const path = join(config.output.dir, name);
    writeFileAtomically(path, text);
    written.push(path);
  };
  for (const [name, text] of Object.entries(dailyFiles(report, metrics, check.findings))) write(name, text);
  const writeTable = (name: string, format: OutputFormat, text: () => string) => {
    if (!(FOR_READING.has(format) && tooLong.has(name))) write(`${name}.${EXTENSIONS[format]}`, text());
  };
  for (const format of config.output.formats) {
    writeTable('check', format, () => render(format, check, checkView(check)));
    if (metrics) writeTable('metrics', format, () => render(format, metrics, metricsView(metrics)));
  }
  const quarantine = join(config.output.dir, 'quarantine.csv');
  writeQuarantine(quarantine, feed.rejected);
  written.push(quarantine);
  return written;
}
