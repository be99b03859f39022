import { lastMonthEndOnOrBefore } from '../calendar/days.js';
import type { RunConfig } from '../config/run-config.js';
import type { Finding } from '../findings.js';
import type { LoadOptions } from '../ingest/feed.js';
import { readLimits } from '../ingest/limits.js';
import type { MetricsAnswer } from '../metrics/compute.js';
import type { CheckAnswer } from '../report/check-answer.js';
import type { ReconcileAnswer } from '../reconcile/reconcile.js';
import type { SnapshotRef } from '../store/index.js';
import { loadDay, type Day, type PreviousSource } from './day.js';
import { answersStage } from './stages/answers.js';
import { checkStage } from './stages/checks.js';
import { metricsStage } from './stages/metrics.js';
import { reconcileStage } from './stages/reconcile.js';
import { snapshotStage } from './stages/snapshot.js';

/**
 * The daily job: load → checks → metrics → reconcile → tickets → snapshot → answers. Each stage
 * takes the day (and what earlier stages produced) and returns typed output; commands only
 * parse options, call the job, render and set the exit status.
 *
 * Tickets (src/tickets/) are not built yet: their place is the optional stage below, and its
 * output type is tightened here when it lands.
 */

/** What carrying findings across days as tickets will produce (src/tickets/, not built yet). */
export type TicketsOutput = unknown;

export interface LaterStages {
  /** Tickets stage: today's findings against the open tickets of earlier days. */
  readonly tickets?: (day: Day, findings: readonly Finding[]) => TicketsOutput;
}

/** What one daily run produced, stage by stage. */
export interface DailyRun {
  readonly config: RunConfig;
  readonly day: Day;
  readonly check: CheckAnswer;
  readonly metrics: MetricsAnswer | null;
  /** The vendor's figures reconciled; null when the configuration names no vendor file (or no benchmarks and master). */
  readonly reconciliation: ReconcileAnswer | null;
  readonly tickets?: TicketsOutput;
  readonly snapshot: SnapshotRef;
  readonly reportFiles: readonly string[];
}

export async function runDailyJob(config: RunConfig, asOf: number, later: LaterStages = {}): Promise<DailyRun> {
  const day = await loadDay({ paths: config.paths, asOf, load: loadOptionsOf(config, asOf), previous: previousSourceOf(config) });
  const check = checkStage(day, config.checks);
  // Risk figures stand at the last month-end on or before the as-of date.
  const metrics = metricsStage(day, { asOf: lastMonthEndOnOrBefore(asOf), windows: config.windows, methodology: config.methodology }, check.findings);
  const reconciliation = reconcileStage(day, check.findings, { methodology: config.methodology, tolerances: config.reconcile.tolerances });
  const tickets = later.tickets?.(day, check.findings);
  const snapshot = snapshotStage(day, config);
  const reportFiles = answersStage(day, { check, metrics, reconciliation }, config.output);
  return { config, day, check, metrics, reconciliation, tickets, snapshot, reportFiles };
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
