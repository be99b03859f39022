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
    const rows: number[] = [];
    for (let i = 0; i < series.dates.length; i++) if (series.dates[i] > context.asOf) rows.push(i);
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
