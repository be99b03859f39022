import type { FeedCheck, FeedContext } from '../src/checks/check.js';
import type { Finding } from '../src/findings.js';
import { BusinessCalendars } from '../src/calendar/business-calendar.js';
import { findSeries, seriesAt } from '../src/series/frame.js';
import { capped, consecutiveRuns, isoDate, makeFinding } from '../src/checks/support.js';

/**
 * Loose ends between the files: NAV series the master does not know, master rows whose
 * benchmark has no levels, and benchmarks with missing business days (default calendar) over
 * the window their funds cover, one finding per run of missing days.
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

/** Each benchmark's window: from the earliest to the latest NAV date (up to the as-of) of the funds using it. */
function benchmarkWindows(context: FeedContext): Map<string, { from: number; to: number }> {
  const windows = new Map<string, { from: number; to: number }>();
  const benchmarkOf = new Map((context.master ?? []).map((record) => [record.series_id, record.benchmark_id]));
  for (let i = 0; i < context.nav.ids.length; i++) {
    const benchmarkId = benchmarkOf.get(context.nav.ids[i]);
    if (!benchmarkId || !context.benchmarks?.indexById.has(benchmarkId)) continue;
    const dates = seriesAt(context.nav, i).dates;
    let last = dates.length - 1;
    while (last >= 0 && dates[last] > context.asOf) last--;
    if (last < 0) continue;
    const window = windows.get(benchmarkId);
    windows.set(benchmarkId, { from: Math.min(window?.from ?? Infinity, dates[0]), to: Math.max(window?.to ?? -Infinity, dates[last]) });
  }
  return windows;
}

function benchmarkGaps(context: FeedContext, minGapDays: number): Finding[] {
  if (!context.benchmarks) return [];
  const findings: Finding[] = [];
  for (const [benchmarkId, window] of benchmarkWindows(context)) {
    const levels = findSeries(context.benchmarks, benchmarkId)!;
    const present = new Set(levels.dates);
    const missing = context.calendars
      .businessDaysBetween(BusinessCalendars.DEFAULT, window.from - 1, window.to + 1)
      .filter((day) => !present.has(day));
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
          message: `Benchmark ${benchmarkId} has no level for ${run.length === 1 ? `business day ${isoDate(first)}` : `${run.length} business days from ${isoDate(first)} to ${isoDate(last)}`}, inside the period its funds cover.`,
          evidence: { kind: 'benchmark_gap', missing_days: run.length, missing_dates: capped(run.map(isoDate), 31), window: { from: isoDate(window.from), to: isoDate(window.to) } },
          identity: ['benchmark_gap', isoDate(first)],
        }),
      );
    }
  }
  return findings;
}
