import type { SeriesCheck } from '../src/checks/check.js';
import { capped, isoDate, makeFinding } from '../src/checks/support.js';

/**
 * Values dated after the as-of: one finding per series covering all of them. They usually
 * come from a swapped day/month date format or a wrong year.
 */
export const futureDate: SeriesCheck<Record<string, never>> = {
  id: 'future_date',
  scope: 'series',
  purpose: 'Values dated after the as-of date.',
  defaults: {},
  run(series, context) {
    const rows = rowsAfter(series.dates, context.asOf);
    if (rows.length === 0) return [];
    const first = series.dates[rows[0]];
    const last = series.dates[rows[rows.length - 1]];
    return [
      makeFinding({
        check: 'future_date',
        severity: 'error',
        seriesId: series.id,
        start: first,
        end: last,
        message: `${series.id} has ${rows.length} value${rows.length > 1 ? 's' : ''} dated after the as-of ${isoDate(context.asOf)}, the first on ${isoDate(first)}; check the date format and year.`,
        evidence: {
          as_of: isoDate(context.asOf),
          rows: capped(rows).map((i) => ({ date: isoDate(series.dates[i]), value: series.values[i], line: series.lines[i] })),
          count: rows.length,
        },
        identity: [isoDate(first)],
      }),
    ];
  },
};

/**
 * The rows dated after `asOf`. A series' dates ascend (the frame sorts them), so those rows
 * are its last few: found from the end, not by reading every row of the history.
 */
function rowsAfter(dates: Int32Array, asOf: number): number[] {
  let first = dates.length;
  while (first > 0 && dates[first - 1] > asOf) first--;
  return Array.from({ length: dates.length - first }, (_, i) => first + i);
}
