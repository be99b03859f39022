/**
 * The check runner: every enabled check over every series and the feed as a whole, findings
 * sorted so that two runs on the same input print the same report.
 */
import type { BusinessCalendars } from '../calendar/business-calendar.js';
import { severityRank, type Finding } from '../findings.js';
import type { CorporateActionRecord, RejectedRow, SeriesMasterRecord, VendorFigureRecord } from '../ingest/records.js';
import { findSeries, seriesAt, type SeriesFrame } from '../series/frame.js';
import type { FeedCheck, FeedContext, SeriesCheck, SeriesContext } from './check.js';
import { analyseMoves, type ClaimingParams } from './move-analysis.js';
import { CHECKS } from './registry.js';
import { parseCheckSettings, SettingsResolver, type CheckSettings, type ResolvedCheck } from './settings.js';

export interface CheckInput {
  readonly nav: SeriesFrame;
  readonly benchmarks?: SeriesFrame;
  readonly master?: readonly SeriesMasterRecord[];
  readonly actions?: readonly CorporateActionRecord[];
  readonly previous?: SeriesFrame;
  readonly rejected: readonly RejectedRow[];
  readonly vendor?: readonly VendorFigureRecord[];
  readonly calendars: BusinessCalendars;
  /** Epoch day. */
  readonly asOf: number;
}

/** Runs the catalogue. `settings` is validated here too, so a bad key fails before any work. */
export function runChecks(input: CheckInput, settings: CheckSettings = {}): Finding[] {
  const resolver = new SettingsResolver(parseCheckSettings(settings));
  const findings = runSeriesChecks(input, resolver, 0, input.nav.ids.length, latestDateUpTo(input.nav, input.asOf));
  findings.push(...runFeedChecks(input, resolver));
  return findings.sort(compareFindings);
}

/**
 * The series-level checks over series `first` to `end − 1` of the NAV frame, unsorted. The
 * worker threads (src/checks/parallel.ts) call this on disjoint ranges; `feedLatest` is the whole
 * feed's, not the range's.
 */
export function runSeriesChecks(input: CheckInput, resolver: SettingsResolver, first: number, end: number, feedLatest: number | undefined): Finding[] {
  const findings: Finding[] = [];
  const seriesChecks = CHECKS.filter((check): check is SeriesCheck => check.scope === 'series');
  const masterById = new Map((input.master ?? []).map((record) => [record.series_id, record]));
  const actionsById = groupActions(input.actions ?? []);

  for (let i = first; i < end; i++) {
    const series = seriesAt(input.nav, i);
    const master = masterById.get(series.id);
    const base: SeriesContext = {
      asOf: input.asOf,
      calendars: input.calendars,
      master,
      benchmark: master?.benchmark_id && input.benchmarks ? findSeries(input.benchmarks, master.benchmark_id) : undefined,
      benchmarks: input.benchmarks,
      actions: actionsById.get(series.id) ?? [],
      previous: input.previous ? findSeries(input.previous, series.id) : undefined,
      feedLatest,
    };
    const resolved = seriesChecks.map((check) => resolver.resolve(check, master?.category, series.id));
    const readsMoves = seriesChecks.some((check, c) => check.readsMoves && resolved[c].enabled);
    const context = readsMoves ? { ...base, moves: analyseMoves(series, base, claimingParams(seriesChecks, resolved)) } : base;
    seriesChecks.forEach((check, c) => {
      if (resolved[c].enabled) findings.push(...check.run(series, context, resolved[c].params));
    });
  }
  return findings;
}

/** The feed-level checks, unsorted. */
export function runFeedChecks(input: CheckInput, resolver: SettingsResolver): Finding[] {
  const findings: Finding[] = [];
  const feedChecks = CHECKS.filter((check): check is FeedCheck => check.scope === 'feed');
  const feed: FeedContext = {
    asOf: input.asOf,
    calendars: input.calendars,
    nav: input.nav,
    benchmarks: input.benchmarks,
    master: input.master,
    previous: input.previous,
    rejected: input.rejected,
    vendor: input.vendor,
  };
  for (const check of feedChecks) {
    const { enabled, params } = resolver.resolve(check, null, null);
    if (enabled) findings.push(...check.run(feed, params));
  }
  return findings;
}

/** The series' resolved parameters of the checks that claim steps from others, when enabled. */
function claimingParams(checks: readonly SeriesCheck[], resolved: readonly ResolvedCheck[]): ClaimingParams {
  const claiming: Record<string, unknown> = {};
  checks.forEach((check, c) => {
    if (resolved[c].enabled && (check.id === 'date_shift' || check.id === 'split_like_jump' || check.id === 'spike_reversal')) claiming[check.id] = resolved[c].params;
  });
  return claiming as ClaimingParams;
}

/** The latest NAV date of the whole feed on or before the as-of (what "up to date" means). */
export function latestDateUpTo(frame: SeriesFrame, asOf: number): number | undefined {
  let latest: number | undefined;
  for (let i = 0; i < frame.dates.length; i++) {
    const day = frame.dates[i];
    if (day <= asOf && (latest === undefined || day > latest)) latest = day;
  }
  return latest;
}

function groupActions(actions: readonly CorporateActionRecord[]): Map<string, CorporateActionRecord[]> {
  const byId = new Map<string, CorporateActionRecord[]>();
  for (const action of actions) {
    const list = byId.get(action.series_id);
    if (list) list.push(action);
    else byId.set(action.series_id, [action]);
  }
  for (const list of byId.values()) list.sort((a, b) => a.ex_date - b.ex_date);
  return byId;
}

/** Series first (file-level findings last), then date, check, severity (worst first) and key. */
/** The source line a finding points at, so dateless findings of one file read in file order. */
function evidenceLine(finding: Finding): number {
  const line = finding.evidence.line;
  return typeof line === 'number' ? line : 0;
}

export function compareFindings(a: Finding, b: Finding): number {
  return (
    compareText(a.series_id, b.series_id) ||
    compareText(a.start, b.start) ||
    compareText(a.check, b.check) ||
    severityRank(b.severity) - severityRank(a.severity) ||
    evidenceLine(a) - evidenceLine(b) ||
    compareText(a.key, b.key) ||
    compareText(a.message, b.message)
  );
}

function compareText(a: string | null, b: string | null): number {
  if (a === b) return 0;
  if (a === null) return 1;
  if (b === null) return -1;
  return a < b ? -1 : 1;
}
