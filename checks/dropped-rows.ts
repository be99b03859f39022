import type { FeedCheck } from '../src/checks/check.js';
import type { Finding } from '../src/findings.js';
import type { DatedSlice } from '../src/series/frame.js';
import { eachDatedSeries, findDatedSeries } from '../src/series/frame.js';
import { capped, consecutiveRuns, isoDate, makeFinding } from '../src/checks/support.js';

/**
 * Rows the previous snapshot had and today's has lost. Dates before today's first date for
 * the series are not counted (a rolling window legitimately lets old rows go). A series that
 * vanished entirely is one `error`; lost dates are `warning`s, one per run of consecutive
 * dates of the previous snapshot.
 */
export const droppedRows: FeedCheck<Record<string, never>> = {
  id: 'dropped_rows',
  scope: 'feed',
  purpose: 'Rows (or whole series) present in the previous snapshot and missing today.',
  defaults: {},
  run(context) {
    if (!context.previous) return [];
    const findings: Finding[] = [];
    for (const before of eachDatedSeries(context.previous)) {
      if (before.dates.length === 0) continue;
      const today = findDatedSeries(context.nav, before.id);
      if (!today || today.dates.length === 0) findings.push(vanished(before));
      else findings.push(...lostDates(before, today));
    }
    return findings;
  },
};

function vanished(before: DatedSlice): Finding {
  const first = before.dates[0];
  const last = before.dates[before.dates.length - 1];
  return makeFinding({
    check: 'dropped_rows',
    severity: 'error',
    seriesId: before.id,
    start: first,
    end: last,
    message: `${before.id} had ${before.dates.length} rows in the previous snapshot and has none today.`,
    evidence: { kind: 'series_dropped', previous_rows: before.dates.length, previous_first: isoDate(first), previous_last: isoDate(last) },
    identity: ['series'],
  });
}

function lostDates(before: DatedSlice, today: DatedSlice): Finding[] {
  const lost: Array<{ position: number; day: number; value: number }> = [];
  let t = 0;
  for (let i = 0; i < before.dates.length; i++) {
    const day = before.dates[i];
    while (t < today.dates.length && today.dates[t] < day) t++;
    const present = t < today.dates.length && today.dates[t] === day;
    if (day < today.dates[0] || present || (i > 0 && before.dates[i - 1] === day)) continue;
    lost.push({ position: i, day, value: before.values[i] });
  }
  return consecutiveRuns(lost, (a, b) => b.position === a.position + 1).map((run) => {
    const first = run[0].day;
    const last = run[run.length - 1].day;
    return makeFinding({
      check: 'dropped_rows',
      severity: 'warning',
      seriesId: before.id,
      start: first,
      end: last,
      message:
        run.length === 1
          ? `${before.id}'s row for ${isoDate(first)} was in the previous snapshot and is missing today.`
          : `${before.id}'s ${run.length} rows from ${isoDate(first)} to ${isoDate(last)} were in the previous snapshot and are missing today.`,
      evidence: { kind: 'rows_dropped', count: run.length, dropped: capped(run).map((r) => ({ date: isoDate(r.day), previous_value: r.value })) },
      identity: [isoDate(first)],
    });
  });
}
