import type { SeriesCheck } from '../src/checks/check.js';
import { calendarOf, isoDate, makeFinding } from '../src/checks/support.js';

/**
 * The latest value is older than the as-of allows. A daily NAV is normally published the
 * evening of its valuation day or the next morning, so by default the latest value may be at
 * most one business day behind the as-of.
 */
export const lateSeries: SeriesCheck<{ max_lag_business_days: number }> = {
  id: 'late_series',
  scope: 'series',
  purpose: 'The latest value is more business days behind the as-of than allowed.',
  defaults: { max_lag_business_days: 1 },
  run(series, context, params) {
    let lastRow = -1;
    for (let i = 0; i < series.dates.length && series.dates[i] <= context.asOf; i++) lastRow = i;
    if (lastRow < 0) return [];
    const calendar = calendarOf(context);
    const last = series.dates[lastRow];
    const lag = context.calendars.businessDayDistance(calendar, last, context.asOf);
    if (lag <= params.max_lag_business_days) return [];
    const firstMissing = context.calendars.businessDaysBetween(calendar, last, context.asOf + 1)[0];
    return [
      makeFinding({
        check: 'late_series',
        severity: 'error',
        seriesId: series.id,
        start: firstMissing,
        end: context.asOf,
        message: `${series.id}'s latest value is dated ${isoDate(last)}, ${lag} business days before the as-of ${isoDate(context.asOf)} (at most ${params.max_lag_business_days} allowed).`,
        evidence: {
          latest_date: isoDate(last),
          latest_value: series.values[lastRow],
          latest_line: series.lines[lastRow],
          as_of: isoDate(context.asOf),
          lag_business_days: lag,
          max_lag_business_days: params.max_lag_business_days,
        },
        identity: [isoDate(last)],
      }),
    ];
  },
};
