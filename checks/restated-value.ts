import type { SeriesCheck } from '../src/checks/check.js';
import { capped, consecutiveRuns, firstRowOfEachDate, isoDate, makeFinding, round } from '../src/checks/support.js';

interface Restatement {
  position: number;
  date: number;
  previous: number;
  today: number;
  line: number;
}

/**
 * A value that today's snapshot and the previous one both hold, changed by more than
 * `tolerance` (relative; the default only forgives floating-point representation noise,
 * since any restated NAV is news to someone). Consecutive restated dates make one finding.
 */
export const restatedValue: SeriesCheck<{ tolerance: number }> = {
  id: 'restated_value',
  scope: 'series',
  purpose: 'A historical value changed since the previous snapshot.',
  defaults: { tolerance: 1e-9 },
  run(series, context, params) {
    const previous = context.previous;
    if (!previous) return [];
    const todayRows = firstRowOfEachDate(series);
    const previousRows = firstRowOfEachDate(previous);
    const changes: Restatement[] = [];
    let t = 0;
    previousRows.forEach((p, position) => {
      const day = previous.dates[p];
      while (t < todayRows.length && series.dates[todayRows[t]] < day) t++;
      if (t >= todayRows.length || series.dates[todayRows[t]] !== day) return;
      const before = previous.values[p];
      const now = series.values[todayRows[t]];
      if (Math.abs(now - before) > params.tolerance * Math.max(Math.abs(before), Math.abs(now))) {
        changes.push({ position, date: day, previous: before, today: now, line: series.lines[todayRows[t]] });
      }
    });
    return consecutiveRuns(changes, (a, b) => b.position === a.position + 1).map((run) => {
      const first = run[0];
      const last = run[run.length - 1];
      const largest = Math.max(...run.map((c) => Math.abs(c.today / c.previous - 1)));
      return makeFinding({
        check: 'restated_value',
        severity: 'warning',
        seriesId: series.id,
        start: first.date,
        end: last.date,
        message:
          run.length === 1
            ? `${series.id}'s NAV for ${isoDate(first.date)} was ${first.previous} in the previous snapshot and is ${first.today} today.`
            : `${series.id}'s NAVs for ${run.length} dates from ${isoDate(first.date)} to ${isoDate(last.date)} differ from the previous snapshot (largest change ${round(largest * 100, 4)} %).`,
        evidence: {
          restated: capped(run).map((c) => ({ date: isoDate(c.date), previous: c.previous, today: c.today, line: c.line })),
          count: run.length,
          largest_relative_change: round(largest, 8),
        },
        identity: [isoDate(first.date)],
      });
    });
  },
};
