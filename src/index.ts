/**
 * navassay as a library: the stable, typed entry (`import { … } from 'navassay'`). Anything not
 * exported here is internal and may change between versions.
 */
export { loadFeed, loadPreviousNav, type FeedPaths, type FeedProfiles, type LoadedFeed, type LoadOptions } from './ingest/feed.js';
export type { FeedProfile } from './ingest/profile.js';
export { checkFeed, computeFigures, runDay, type CheckFeedOptions, type ComputeFiguresOptions, type RunDayOptions } from './library/api.js';
export type { DailyRun, StageListener } from './job/daily-job.js';
export type { TicketRecord } from './tickets/ticket.js';
export type { DailyReport } from './report/daily/index.js';
export type { ReconcileAnswer, ReconcileResult, ReconcileSummary } from './reconcile/reconcile.js';
export type { Day, FigureSource } from './job/day.js';
export type { DateInput } from './library/dates.js';
export { NavassayError, ConfigError, InputError } from './ingest/errors.js';
export type { CheckAnswer } from './report/check-answer.js';
export type { MetricsAnswer, MetricRow } from './metrics/compute.js';
export type { Methodology, MethodologyInput } from './metrics/methodology.js';
export type { MetricId } from './metrics/kernels.js';
export type { CheckSettings } from './checks/settings.js';
export type { Finding, FindingSummary, Severity } from './findings.js';
export type { RejectedRow, RowAccounting } from './ingest/records.js';
export type { DatedFrame, SeriesFrame } from './series/frame.js';
