/**
 * The check runner: every enabled check over every series and the feed as a whole, findings
 * sorted so that two runs on the same input print the same report.
 */
import type { BusinessCalendars } from '../calendar/business-calendar.js';
import { severityRank, type Finding } from '../findings.js';
import type { CorporateActionRecord, RejectedRow, SeriesMasterRecord, VendorFigureRecord } from '../ingest/records.js';
import type { DatedFrame, SeriesFrame } from '../series/frame.js';
import type { FeedCheck, FeedContext } from './check.js';
import { CHECKS } from './registry.js';
import { runSeriesChecks } from './series-runner.js';
import { parseCheckSettings, SettingsResolver, type CheckSettings } from './settings.js';

export { runSeriesChecks, seriesChecker } from './series-runner.js';

export interface CheckInput {
  readonly nav: SeriesFrame;
  readonly benchmarks?: SeriesFrame;
  readonly master?: readonly SeriesMasterRecord[];
  readonly actions?: readonly CorporateActionRecord[];
  readonly previous?: DatedFrame;
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

/** The latest NAV date of the whole feed on or before the as-of (what "up to date" means). */
export function latestDateUpTo(frame: SeriesFrame, asOf: number): number | undefined {
  let latest: number | undefined;
  for (let i = 0; i < frame.dates.length; i++) {
    const day = frame.dates[i];
    if (day <= asOf && (latest === undefined || day > latest)) latest = day;
  }
  return latest;
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
