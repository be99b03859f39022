import type { SeriesCheck } from '../src/checks/check.js';
import { calendarOf, isoDate, makeFinding } from '../src/checks/support.js';

interface LateParams {
  max_lag_business_days: number;
  max_as_of_lag_business_days: number;
  closed_after_business_days: number;
  [key: string]: number;
}

/**
 * The latest value is older than the feed allows. "Up to date" means having a value for the
 * feed's own latest valuation date (the newest date any series has, up to the as-of), so a
 * series missing just the latest day is late, whether the feed is checked the evening of the
 * valuation day or the next morning. When the whole feed trails the as-of by more than
 * `max_as_of_lag_business_days`, every series is late. Lags count business days of the
 * series' own calendar, so its holidays never make it late.
 */
export const lateSeries: SeriesCheck<LateParams> = {
  id: 'late_series',
  scope: 'series',
  purpose: 'The latest value is more business days behind the feed’s latest date (or the as-of) than allowed.',
  defaults: { max_lag_business_days: 0, max_as_of_lag_business_days: 1, closed_after_business_days: 65 },
  run(series, context, params) {
    // A series' dates ascend (the frame sorts them): its last row up to the as-of is found from the end.
    let lastRow = series.dates.length - 1;
    while (lastRow >= 0 && series.dates[lastRow] > context.asOf) lastRow--;
    if (lastRow < 0) return [];
    const calendar = calendarOf(context);
    const last = series.dates[lastRow];
    const lagFromFeed = context.feedLatest === undefined ? 0 : context.calendars.businessDayDistance(calendar, last, context.feedLatest);
    const lagFromAsOf = context.calendars.businessDayDistance(calendar, last, context.asOf);
    const lateForFeed = lagFromFeed > params.max_lag_business_days;
    if (!lateForFeed && lagFromAsOf <= params.max_as_of_lag_business_days) return [];
    const expected = lateForFeed ? context.feedLatest! : context.asOf;
    const firstMissing = context.calendars.businessDaysBetween(calendar, last, expected + 1)[0];
    const lag = lateForFeed ? lagFromFeed : lagFromAsOf;
    const against = lateForFeed ? `the feed's latest date ${isoDate(expected)}` : `the as-of ${isoDate(expected)}`;
    // A quarter and more without a value while the rest of the feed is current: the fund has
    // most likely closed or merged (its ticket, under the same key, was raised months ago).
    const closed = lateForFeed && lag > params.closed_after_business_days;
    return [
      makeFinding({
        check: 'late_series',
        severity: closed ? 'info' : 'error',
        seriesId: series.id,
        start: firstMissing,
        end: expected,
        message: closed
          ? `${series.id} has had no value since ${isoDate(last)}, ${lag} business days behind ${against}; it looks closed or merged. Close it in the master, or chase it if it should still be priced.`
          : `${series.id}'s latest value is dated ${isoDate(last)}, ${lag} business day${lag > 1 ? 's' : ''} behind ${against}.`,
        evidence: {
          latest_date: isoDate(last),
          latest_value: series.values[lastRow],
          latest_line: series.lines[lastRow],
          feed_latest_date: context.feedLatest === undefined ? null : isoDate(context.feedLatest),
          as_of: isoDate(context.asOf),
          lag_business_days: lag,
          lag_from_as_of_business_days: lagFromAsOf,
          looks_closed: closed,
        },
        identity: [isoDate(last)],
      }),
    ];
  },
};
