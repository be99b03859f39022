import type { FeedCheck, FeedContext } from '../src/checks/check.js';
import type { Finding } from '../src/findings.js';
import { BusinessCalendars } from '../src/calendar/business-calendar.js';
import { findSeries } from '../src/series/frame.js';
import { capped, consecutiveRuns, isoDate, makeFinding } from '../src/checks/support.js';

/**
 * Loose ends between the files: NAV series the master does not know, master rows whose
 * benchmark has no levels, and benchmarks missing levels on business days when funds mapped
 * to them have NAVs (one finding per run of missing days).
 */
export const unknownSeries: FeedCheck<{ min_gap_days: number }> = {
  id: 'unknown_series',
  scope: 'feed',
  purpose: 'NAV series missing from the master, benchmarks without levels, and gaps in benchmark levels.',
  defaults: { min_gap_days: 1 },
  run(context, params) {
    return [...seriesNotInMaster(context), ...benchmarksWithoutLevels(context), ...benchmarkGaps(context, params.min_gap_days)];
  },
};

function seriesNotInMaster({ nav, master }: FeedContext): Finding[] {
  if (!master) return [];
  const known = new Set(master.map((record) => record.series_id));
  return nav.ids
    .filter((id) => !known.has(id))
    .map((id) => {
      const slice = findSeries(nav, id)!;
      return makeFinding({
        check: 'unknown_series',
        severity: 'warning',
        seriesId: id,
        start: slice.dates[0],
        end: slice.dates[slice.dates.length - 1],
        message: `${id} has NAV rows but is not in the series master, so its calendar, benchmark and category are unknown.`,
        evidence: { kind: 'not_in_master', rows: slice.dates.length, first_line: slice.lines[0] },
        identity: ['not_in_master'],
      });
    });
}

function benchmarksWithoutLevels({ master, benchmarks }: FeedContext): Finding[] {
  if (!master || !benchmarks) return [];
  return master
    .filter((record) => record.benchmark_id !== null && !benchmarks.indexById.has(record.benchmark_id))
    .map((record) =>
      makeFinding({
        check: 'unknown_series',
        severity: 'warning',
        seriesId: record.series_id,
        start: null,
        end: null,
        message: `${record.series_id}'s benchmark ${record.benchmark_id} has no levels in the benchmark file, so nothing can be compared with it.`,
        evidence: { kind: 'benchmark_without_levels', benchmark_id: record.benchmark_id, master_line: record.line },
        identity: ['benchmark_without_levels', record.benchmark_id],
      }),
    );
}

/**
 * For each benchmark, the business days (default calendar) on which at least one fund mapped
 * to it has a NAV: the days a comparison needs a level. A benchmark's own holidays, on which
 * its funds are closed too, are therefore never gaps.
 */
function daysFundsNeed(context: FeedContext): Map<string, Set<number>> {
  // Flags over the feed's span of days, one array per benchmark, instead of a set insertion per
  // NAV row (25 million at universe scale); the sets are built once at the end.
  const { first, last } = daySpan(context.nav.dates, context.asOf);
  const flagsById = new Map<string, Uint8Array>();
  const benchmarkOf = new Map((context.master ?? []).map((record) => [record.series_id, record.benchmark_id]));
  const { ids, offsets, dates } = context.nav;
  const asOf = context.asOf;
  for (let i = 0; i < ids.length; i++) {
    const benchmarkId = benchmarkOf.get(ids[i]);
    if (!benchmarkId || !context.benchmarks?.indexById.has(benchmarkId)) continue;
    let flags = flagsById.get(benchmarkId);
    if (!flags) flagsById.set(benchmarkId, (flags = new Uint8Array(Math.max(0, last - first + 1))));
    flagDays(flags, dates, offsets[i], offsets[i + 1], first, asOf);
  }
  const needed = new Map<string, Set<number>>();
  for (const [benchmarkId, flags] of flagsById) {
    const days = new Set<number>();
    for (let slot = 0; slot < flags.length; slot++) {
      if (flags[slot] === 1 && context.calendars.isBusinessDay(BusinessCalendars.DEFAULT, first + slot)) days.add(first + slot);
    }
    needed.set(benchmarkId, days);
  }
  return needed;
}

/** Flags the days of rows `start` to `end − 1` on or before the as-of, slot 0 being day `first`. */
function flagDays(flags: Uint8Array, dates: Int32Array, start: number, end: number, first: number, asOf: number): void {
  for (let row = start; row < end; row++) {
    const day = dates[row];
    if (day <= asOf) flags[day - first] = 1;
  }
}

/** The earliest and latest day on or before the as-of (an empty span when there is none). */
function daySpan(dates: Int32Array, asOf: number): { first: number; last: number } {
  let first = Infinity;
  let last = -Infinity;
  for (let row = 0; row < dates.length; row++) {
    const day = dates[row];
    if (day > asOf) continue;
    if (day < first) first = day;
    if (day > last) last = day;
  }
  return first <= last ? { first, last } : { first: 0, last: -1 };
}

function benchmarkGaps(context: FeedContext, minGapDays: number): Finding[] {
  if (!context.benchmarks) return [];
  const findings: Finding[] = [];
  // An index is not computed on its own market's holidays. The feed does not say which market
  // an index belongs to, so a missing level on a holiday of any calendar the master uses is
  // taken for an index holiday, not a gap.
  const calendars = [...new Set((context.master ?? []).map((record) => record.calendar).filter((c): c is string => c !== null))];
  const marketHoliday = (day: number) => calendars.some((calendar) => context.calendars.isHoliday(calendar, day));
  for (const [benchmarkId, needed] of daysFundsNeed(context)) {
    const levels = findSeries(context.benchmarks, benchmarkId)!;
    const present = new Set(levels.dates);
    const missing = [...needed].filter((day) => !present.has(day) && !marketHoliday(day)).sort((a, b) => a - b);
    const runs = consecutiveRuns(missing, (a, b) => context.calendars.businessDaysBetween(BusinessCalendars.DEFAULT, a, b).length === 0);
    for (const run of runs.filter((r) => r.length >= minGapDays)) {
      const first = run[0];
      const last = run[run.length - 1];
      findings.push(
        makeFinding({
          check: 'unknown_series',
          severity: 'warning',
          seriesId: benchmarkId,
          start: first,
          end: last,
          message: `Benchmark ${benchmarkId} has no level for ${run.length === 1 ? `business day ${isoDate(first)}` : `${run.length} business days from ${isoDate(first)} to ${isoDate(last)}`}, when funds mapped to it have NAVs.`,
          evidence: { kind: 'benchmark_gap', missing_days: run.length, missing_dates: capped(run.map(isoDate), 31) },
          identity: ['benchmark_gap', isoDate(first)],
        }),
      );
    }
  }
  return findings;
}
