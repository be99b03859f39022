import { join } from 'node:path';
import { QUARANTINE_FILE, reportFileName } from '../../config/output-paths.js';
import type { Finding } from '../../findings.js';
import type { MetricsAnswer } from '../../metrics/compute.js';
import type { ReconcileAnswer } from '../../reconcile/reconcile.js';
import { checkView, type CheckAnswer } from '../../report/check-answer.js';
import { buildDailyReport, dailyFiles, flagsOfMarkedFigures, navChart, type DailyReport, type NavChart } from '../../report/daily/index.js';
import { writeFileAtomically, writeQuarantine } from '../../report/files.js';
import { metricsView } from '../../report/metrics-answer.js';
import { reconcileView } from '../../report/reconcile-answer.js';
import { renderInPieces, type OutputFormat } from '../../report/render.js';
import type { TicketRecord } from '../../tickets/ticket.js';
import type { Day } from '../day.js';
import type { TicketsStageResult } from './tickets.js';

export interface ReportPlace {
  readonly dir: string;
  readonly formats: readonly OutputFormat[];
}

/** What the earlier stages answered, for the answers stage to report. */
export interface StageAnswers {
  readonly feed: string;
  readonly check: CheckAnswer;
  /** The metrics stage's answer: its figures marked against `check`'s findings and the series master. */
  readonly metrics: MetricsAnswer | null;
  readonly reconciliation: ReconcileAnswer | null;
  readonly tickets: TicketsStageResult;
  /** What a person should know about the run (snapshot re-runs, pinned previous file, ledger …). */
  readonly notices: readonly string[];
}

export interface WrittenAnswers {
  readonly report: DailyReport;
  /** Every path written. */
  readonly files: readonly string[];
  /** Notices of the answers stage itself (tables too long to be read, left out of html and markdown). */
  readonly notices: readonly string[];
}

/**
 * The answers stage: the day's report built from every stage (report.html, .md, .csv, .json,
 * tickets.jsonl and .csv, figures.csv), each command's answer in each configured format
 * (check.*, metrics.*, reconcile.*), and the quarantine.
 */
export function answersStage(day: Day, answers: StageAnswers, place: ReportPlace): WrittenAnswers {
  const { check, metrics, reconciliation, tickets } = answers;
  const tooLong = tablesTooLongToRead(place, check, metrics, reconciliation);
  const notices = tooLong.length
    ? [`${tooLong.join(' and ')} ${tooLong.length > 1 ? 'have' : 'has'} more than ${READABLE_TABLE_ROWS} rows: written as json and csv only; report.html shows what needs a person.`]
    : [];
  // Flagged once, for the day's report and for figures.csv, from the metrics stage's marks.
  const flaggedFigures = metrics && flagsOfMarkedFigures(metrics);
  const report = buildDailyReport({
    feed: answers.feed,
    previousAsOf: tickets.previousAsOf,
    check,
    patterns: tickets.patterns,
    tickets: tickets.records,
    history: tickets.history,
    metrics,
    figureFlags: flaggedFigures ?? undefined,
    reconciliation: tickets.reconciliation,
    charts: chartsOf(day, tickets.records, check.findings),
    notices: [...answers.notices, ...tickets.notices, ...notices],
  });
  const written: string[] = [];
  const write = (name: string, text: string | Iterable<string>) => {
    const path = join(place.dir, name);
    writeFileAtomically(path, text);
    written.push(path);
  };
  for (const [name, make] of Object.entries(dailyFiles(report, flaggedFigures))) write(name, make());
  const writeTable = (name: CommandAnswer, format: OutputFormat, text: () => string | Iterable<string>) => {
    if (!(FOR_READING.has(format) && tooLong.includes(name))) write(reportFileName(name, format), text());
  };
  // Each view is built at most once, and only for a format that reads it (json does not).
  const views = { check: once(() => checkView(check)), metrics: metrics && once(() => metricsView(metrics)), reconcile: reconciliation && once(() => reconcileView(reconciliation)) };
  for (const format of place.formats) {
    writeTable('check', format, () => renderInPieces(format, check, views.check));
    if (metrics && views.metrics) writeTable('metrics', format, () => renderInPieces(format, metrics, views.metrics!));
    if (reconciliation && views.reconcile) writeTable('reconcile', format, () => renderInPieces(format, reconciliation, views.reconcile!));
  }
  const quarantine = join(place.dir, QUARANTINE_FILE);
  writeQuarantine(quarantine, day.feed.rejected);
  written.push(quarantine);
  return { report, files: written, notices };
}

type CommandAnswer = 'check' | 'metrics' | 'reconcile';

function once<T>(make: () => T): () => T {
  let made: { value: T } | null = null;
  return () => (made ??= { value: make() }).value;
}

/**
 * Above this many rows a table is not written as html, markdown or text: nobody reads a table
 * that long in a browser, and the day's report shows what needs a person and links the csv.
 */
const READABLE_TABLE_ROWS = 2000;
const FOR_READING: ReadonlySet<OutputFormat> = new Set(['html', 'markdown', 'table']);

/** The per-command tables too long to be read as html, markdown or text. */
function tablesTooLongToRead(place: ReportPlace, check: CheckAnswer, metrics: MetricsAnswer | null, reconciliation: ReconcileAnswer | null): CommandAnswer[] {
  if (!place.formats.some((format) => FOR_READING.has(format))) return [];
  const rows: Array<[CommandAnswer, number]> = [
    ['check', check.findings.length],
    ['metrics', metrics?.metrics.length ?? 0],
    ['reconcile', reconciliation?.results.length ?? 0],
  ];
  return rows.filter(([, count]) => count > READABLE_TABLE_ROWS).map(([name]) => name);
}

/** Charts for the series of the worst tickets that need a person. */
const CHARTS_AT_MOST = 12;

function chartsOf(day: Day, records: readonly TicketRecord[], findings: readonly Finding[]): NavChart[] {
  const { nav, benchmarks, master } = day.feed;
  const benchmarkOf = new Map((master ?? []).map((record) => [record.series_id, record.benchmark_id]));
  const wanted = new Set<string>();
  for (const record of records) {
    if (record.state === 'resolved' || record.silenced || record.kind !== 'series') continue;
    for (const id of record.series_ids) wanted.add(id);
  }
  // Built in order until there are enough: a large universe has tickets on hundreds of series.
  const charts: NavChart[] = [];
  for (const id of wanted) {
    if (charts.length === CHARTS_AT_MOST) break;
    const chart = navChart(nav, benchmarks, id, benchmarkOf.get(id) ?? null, findings, day.asOf);
    if (chart !== null) charts.push(chart);
  }
  return charts;
}
