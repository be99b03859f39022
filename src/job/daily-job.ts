import { lastMonthEndOnOrBefore } from '../calendar/days.js';
import { checkWorkersAhead } from '../checks/check-workers.js';
import { defaultThreads } from '../checks/parallel.js';
import type { RunConfig } from '../config/run-config.js';
import type { LoadOptions } from '../ingest/feed.js';
import { readLimits } from '../ingest/limits.js';
import type { MetricsAnswer } from '../metrics/compute.js';
import type { ReconcileAnswer } from '../reconcile/reconcile.js';
import type { CheckAnswer } from '../report/check-answer.js';
import type { DailyReport } from '../report/daily/index.js';
import type { SnapshotRef } from '../store/index.js';
import { loadDay, type Day, type PreviousSource } from './day.js';
import { answersStage } from './stages/answers.js';
import { checkStage } from './stages/checks.js';
import { computeFigures, markFigures } from './stages/metrics.js';
import { reconcileStage } from './stages/reconcile.js';
import { startSnapshotInBackground } from './stages/snapshot.js';
import { ticketsStage, type TicketsStageResult } from './stages/tickets.js';

/**
 * The daily job: load → checks → metrics → reconcile → tickets → snapshot → answers. Two stages
 * run beside others: the figures are computed on this thread while worker threads run the
 * checks, and the snapshot is written on a worker thread from the end of the checks while this
 * one reconciles, carries the tickets and writes the reports. Each stage
 * takes the day (and what earlier stages produced) and returns typed output; commands only
 * parse options, call the job, render and set the exit status.
 */

/** What one daily run produced, stage by stage. */
export interface DailyRun {
  readonly config: RunConfig;
  readonly day: Day;
  readonly check: CheckAnswer;
  readonly metrics: MetricsAnswer | null;
  /** The vendor's figures reconciled; null when the configuration names no vendor file (or no benchmarks and master). */
  readonly reconciliation: ReconcileAnswer | null;
  readonly tickets: TicketsStageResult;
  readonly snapshot: SnapshotRef;
  /** The day's report, built from every stage; what `run` prints. */
  readonly report: DailyReport;
  readonly reportFiles: readonly string[];
  /** What a person should know about the run, in the order the stages said it. */
  readonly notices: readonly string[];
}

/** Told as each long stage starts, for a progress line on a terminal. */
export type StageListener = (text: string) => void;

export async function runDailyJob(config: RunConfig, asOf: number, onStage: StageListener = () => {}): Promise<DailyRun> {
  const { day, figures, check } = await readAndCheck(config, asOf, onStage);
  // The snapshot is written on another thread while this one marks the figures, reconciles,
  // carries the tickets and writes the reports; its notices are known before it is written.
  const storing = startSnapshotInBackground(day, { store: config.store, feed: config.feed, previous: config.previous });
  const { metrics, reconciliation, tickets } = await beside(storing.stored, () => {
    const metrics = markFigures(day, figures, check.findings);
    if (day.feed.vendor) onStage(`reconciling ${day.feed.vendor.length} vendor figures …`);
    // A vendor figure dated after the day cannot be judged on the day's data: it waits for its own day.
    const reconciliation = reconcileStage(day, check.findings, { methodology: config.methodology, tolerances: config.reconcile.tolerances, through: asOf });
    onStage('carrying the tickets …');
    const tickets = ticketsStage(day, check.findings, reconciliation, { store: config.store, feed: config.feed, acknowledgements: config.acknowledgements });
    return { metrics, reconciliation, tickets };
  });
  onStage('writing the reports and storing the snapshot …');
  // A snapshot that cannot be written still fails the run (exit 2), after the reports are on the disk.
  const answers = await beside(storing.stored, () =>
    answersStage(day, { feed: config.feed, check, metrics, reconciliation, tickets, notices: storing.notices }, config.output),
  );
  const snapshot = await storing.stored;
  return {
    config,
    day,
    check,
    metrics,
    reconciliation,
    tickets,
    snapshot: snapshot.ref,
    report: answers.report,
    reportFiles: answers.files,
    notices: answers.report.notices,
  };
}

/**
 * The load stage, then the checks with the risk figures computed beside them. A large feed's
 * check workers start with the reading, so their start-up is not paid inside the checks; those
 * no check took (a small feed, or a run that failed first) are ended here.
 */
async function readAndCheck(config: RunConfig, asOf: number, onStage: StageListener) {
  onStage('reading the feed …');
  const threads = config.threads ?? defaultThreads();
  const workers = checkWorkersAhead(config.paths.nav, threads);
  try {
    const day = await loadDay({ paths: config.paths, asOf, load: loadOptionsOf(config, asOf), previous: previousSourceOf(config) });
    onStage(`checking ${day.feed.nav.ids.length} series, ${day.feed.rows.accepted} rows, and computing their risk figures …`);
    const checking = checkStage(day, config.checks, { threads, workers });
    // Risk figures stand at the last month-end on or before the as-of date.
    const figureRequest = { asOf: lastMonthEndOnOrBefore(asOf), windows: config.windows, methodology: config.methodology };
    // The figures need no finding (only their marks do): this thread computes them while the check workers run, then takes its share of the series checks (src/checks/parallel.ts).
    const figures = await beside(checking, () => computeFigures(day, figureRequest));
    return { day, figures, check: await checking };
  } finally {
    workers.release();
  }
}

/**
 * Runs `work` on this thread while `pending` work (check workers, the snapshot's writer) goes on
 * elsewhere. When `work` fails, its error is the one told (as when the stages ran one after the
 * other), but only once the pending work has settled, so nothing is left running behind it.
 */
export async function beside<T>(pending: Promise<unknown>, work: () => T): Promise<T> {
  // Awaited by the caller; this keeps a quick failure from counting as unhandled meanwhile.
  pending.catch(() => {});
  try {
    return work();
  } catch (error) {
    await pending.catch(() => {});
    throw error;
  }
}

/**
 * Feed profiles, weekend and reading limits of a run configuration. The limits' plausible date
 * range ends a year after `asOf` (default: today) unless the configuration says otherwise.
 */
export function loadOptionsOf(config: Pick<RunConfig, 'profiles' | 'weekend' | 'limits'> | undefined, asOf?: number): LoadOptions {
  const limits = readLimits(config?.limits, asOf);
  return config ? { profiles: config.profiles, weekendDays: config.weekend, limits } : { limits };
}

/** A configured previous file, else the store's latest earlier snapshot. */
function previousSourceOf(config: RunConfig): PreviousSource {
  if (config.previous !== undefined) return { kind: 'file', path: config.previous, profile: config.profiles.nav };
  return { kind: 'store', store: config.store, feed: config.feed };
}
