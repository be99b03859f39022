import type { SeriesCheck } from '../src/checks/check.js';
import { calendarOf, capped, isoDate, makeFinding } from '../src/checks/support.js';

/**
 * Business days absent inside a series' life (between its first and last observation up to
 * the as-of), against the series' own calendar. One finding per run of consecutive missing
 * business days. Days after the last observation are `late_series`' business.
 */
export const missingDates: SeriesCheck<{ min_days: number }> = {
  id: 'missing_dates',
  scope: 'series',
  purpose: 'Business days missing inside a series’ life, one finding per run of missing days.',
  defaults: { min_days: 1 },
  run(series, context, params) {
    const calendar = calendarOf(context);
    const findings = [];
    let previous = -1;
    for (let i = 0; i < series.dates.length; i++) {
      const day = series.dates[i];
      if (day > context.asOf) break;
      if (previous >= 0 && day > previous + 1) {
        const missing = context.calendars.businessDaysBetween(calendar, series.dates[previous], day);
        if (missing.length >= params.min_days && missing.length > 0) {
          const first = missing[0];
          const last = missing[missing.length - 1];
          findings.push(
            makeFinding({
              check: 'missing_dates',
              severity: 'warning',
              seriesId: series.id,
              start: first,
              end: last,
              message:
                missing.length === 1
                  ? `${series.id} has no value for business day ${isoDate(first)}.`
                  : `${series.id} has no values for ${missing.length} business days in a row, ${isoDate(first)} to ${isoDate(last)}.`,
              evidence: {
                missing_days: missing.length,
                missing_dates: capped(missing.map(isoDate), 31),
                calendar: calendar ?? 'default',
                before: { date: isoDate(series.dates[previous]), line: series.lines[previous] },
                after: { date: isoDate(day), line: series.lines[i] },
              },
              identity: [isoDate(first)],
            }),
          );
        }
      }
      if (previous < 0 || day !== series.dates[previous]) previous = i;
    }
    return findings;
  },
};
