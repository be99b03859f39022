import { parseIsoDate, formatIsoDate } from '../calendar/days.js';
import { findingKey, severityRank, type Finding, type Severity } from '../findings.js';

/**
 * Findings grouped as a person thinks: the same fact seen in many series at once is one
 * feed-level finding that names the pattern and lists the series, not thousands of copies.
 * The individual findings stay in the check answer; a pattern only says which ones it absorbs.
 */

/** What the grouping needs to know of each series: its calendar and the span of its rows. */
export interface SeriesSpan {
  readonly series_id: string;
  /** The master's calendar; null for the default calendar. */
  readonly calendar: string | null;
  readonly category: string | null;
  readonly first: string;
  readonly last: string;
}

export interface FeedPattern {
  /** The feed-level finding (series_id null, evidence.series_ids lists the series). */
  readonly finding: Finding;
  /** Keys of the individual findings it stands for. */
  readonly absorbed: readonly string[];
}

/** Every rule of the grouping in one place. */
export const PATTERN_RULES = {
  /** A date is a calendar-wide gap when missing from at least this share of the series that span it … */
  calendarShare: 0.9,
  /** … and from at least this many series (a gap in two series is two problems, not a pattern). */
  minSeries: 3,
} as const;

const SERIES_LISTED = 200;

export function findFeedPatterns(findings: readonly Finding[], spans: readonly SeriesSpan[]): FeedPattern[] {
  return [...calendarGaps(findings, spans), ...sharedStaleDays(findings, spans), ...sharedDateShifts(findings)];
}

/** Keys of the findings some pattern absorbs. */
export function absorbedKeys(patterns: readonly FeedPattern[]): Set<string> {
  return new Set(patterns.flatMap((pattern) => pattern.absorbed));
}

/** A date missing from (nearly) every series of a calendar: a holiday the calendar lacks, or a whole-feed gap. */
function calendarGaps(findings: readonly Finding[], spans: readonly SeriesSpan[]): FeedPattern[] {
  const calendarOf = new Map(spans.map((span) => [span.series_id, span.calendar ?? 'default']));
  const missing = findings.filter((f) => f.check === 'missing_dates' && f.series_id !== null);
  const seriesByDate = new Map<string, Map<string, Set<string>>>(); // calendar → date → series
  for (const finding of missing) {
    const calendar = calendarOf.get(finding.series_id!) ?? 'default';
    const byDate = seriesByDate.get(calendar) ?? new Map<string, Set<string>>();
    seriesByDate.set(calendar, byDate);
    for (const date of missingDatesOf(finding)) {
      const series = byDate.get(date) ?? new Set<string>();
      byDate.set(date, series);
      series.add(finding.series_id!);
    }
  }
  const patterns: FeedPattern[] = [];
  for (const [calendar, byDate] of seriesByDate) {
    const members = spans.filter((span) => (span.calendar ?? 'default') === calendar);
    const gapDates = [...byDate.entries()]
      .filter(([date, series]) => {
        const spanning = members.filter((span) => span.first <= date && date <= span.last).length;
        return series.size >= PATTERN_RULES.minSeries && series.size >= Math.ceil(PATTERN_RULES.calendarShare * spanning);
      })
      .map(([date]) => date)
      .sort();
    if (gapDates.length === 0) continue;
    const gapSet = new Set(gapDates);
    const absorbedFindings = missing.filter((f) => (calendarOf.get(f.series_id!) ?? 'default') === calendar && missingDatesOf(f).every((d) => gapSet.has(d)));
    const series = [...new Set(gapDates.flatMap((date) => [...byDate.get(date)!]))].sort();
    const dates = gapDates.length === 1 ? gapDates[0] : `${gapDates.length} dates`;
    patterns.push(
      pattern(
        'calendar_gap',
        calendar,
        absorbedFindings,
        series,
        `${dates} missing from ${series.length} series of calendar ${calendar} (${gapDates.slice(0, 5).join(', ')}${gapDates.length > 5 ? ', …' : ''}): holidays the calendar lacks, or a gap in the whole feed; add the holidays to the calendar or ask the provider for the days.`,
        { calendar, dates: gapDates },
      ),
    );
  }
  return patterns;
}

/** The same first stale day across several series: one price source that stopped, not many funds. */
function sharedStaleDays(findings: readonly Finding[], spans: readonly SeriesSpan[]): FeedPattern[] {
  const categoryOf = new Map(spans.map((span) => [span.series_id, span.category]));
  const byDay = groupBy(findings.filter((f) => f.check === 'stale_value' && f.series_id !== null && f.start !== null), (f) => f.start!);
  return [...byDay.entries()]
    .filter(([, group]) => group.length >= PATTERN_RULES.minSeries)
    .map(([day, group]) => {
      const series = group.map((f) => f.series_id!).sort();
      const categories = [...new Set(series.map((id) => categoryOf.get(id) ?? null))];
      const family = categories.length === 1 && categories[0] ? ` (all ${categories[0]})` : '';
      return pattern(
        'shared_stale_day',
        day,
        group,
        series,
        `${series.length} series${family} stop changing on the same day, ${day}: one price source looks stuck; ask the provider before chasing each fund.`,
        { first_stale_day: day, categories },
      );
    });
}

/** Several series stamped the same number of business days off: the feed, not the funds, is shifted. */
function sharedDateShifts(findings: readonly Finding[]): FeedPattern[] {
  const byLag = groupBy(findings.filter((f) => f.check === 'date_shift' && f.series_id !== null), (f) => String(f.evidence.stamped_late_by_business_days ?? '?'));
  return [...byLag.entries()]
    .filter(([, group]) => group.length >= PATTERN_RULES.minSeries)
    .map(([lag, group]) => {
      const series = group.map((f) => f.series_id!).sort();
      return pattern(
        'feed_date_shift',
        lag,
        group,
        series,
        `${series.length} series look stamped ${lag} business day(s) off their valuation dates: the feed's dates are shifted; ask the provider which date the file carries.`,
        { stamped_late_by_business_days: Number(lag) },
      );
    });
}

function pattern(check: string, identity: string, members: readonly Finding[], series: readonly string[], message: string, extra: Record<string, unknown>): FeedPattern {
  const starts = members.map((f) => f.start).filter((d): d is string => d !== null).sort();
  const ends = members.map((f) => f.end).filter((d): d is string => d !== null).sort();
  const finding: Finding = {
    check,
    severity: worstSeverity(members.map((f) => f.severity)),
    series_id: null,
    start: starts[0] ?? null,
    end: ends[ends.length - 1] ?? null,
    message,
    evidence: { ...extra, series_count: series.length, series_ids: series.slice(0, SERIES_LISTED), findings: members.length },
    key: findingKey(check, null, identity),
  };
  return { finding, absorbed: members.map((f) => f.key) };
}

export function worstSeverity(severities: readonly Severity[]): Severity {
  return severities.reduce<Severity>((worst, s) => (severityRank(s) > severityRank(worst) ? s : worst), 'info');
}

function missingDatesOf(finding: Finding): string[] {
  const listed = finding.evidence.missing_dates;
  if (Array.isArray(listed) && listed.length === Number(finding.evidence.missing_days ?? listed.length)) return listed.map(String);
  // A long run lists only its first dates; every calendar day of the span stands in for it.
  const from = parseIsoDate(finding.start ?? '');
  const to = parseIsoDate(finding.end ?? '');
  if (from === null || to === null) return [];
  const dates: string[] = [];
  for (let day = from; day <= to; day++) dates.push(formatIsoDate(day));
  return dates;
}

function groupBy<T>(items: readonly T[], keyOf: (item: T) => string): Map<string, T[]> {
  const groups = new Map<string, T[]>();
  for (const item of items) {
    const key = keyOf(item);
    const group = groups.get(key);
    if (group) group.push(item);
    else groups.set(key, [item]);
  }
  return groups;
}
