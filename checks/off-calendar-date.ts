import type { SeriesCheck } from '../src/checks/check.js';
import { isoWeekday } from '../src/calendar/days.js';
import { calendarOf, firstRowOfEachDate, isoDate, makeFinding } from '../src/checks/support.js';

const WEEKDAY_NAMES = ['', 'Monday', 'Tuesday', 'Wednesday', 'Thursday', 'Friday', 'Saturday', 'Sunday'];

/** A value dated on a weekend or on a holiday of the series' calendar: one finding per date. */
export const offCalendarDate: SeriesCheck<Record<string, never>> = {
  id: 'off_calendar_date',
  scope: 'series',
  purpose: 'A value dated on a weekend or a holiday of the series’ calendar.',
  defaults: {},
  run(series, context) {
    const calendar = calendarOf(context);
    return firstRowOfEachDate(series)
      .filter((row) => !context.calendars.isBusinessDay(calendar, series.dates[row]))
      .map((row) => {
        const day = series.dates[row];
        const weekend = context.calendars.isWeekend(day);
        const why = weekend ? `a ${WEEKDAY_NAMES[isoWeekday(day)]}` : `a holiday of calendar ${calendar ?? 'default'}`;
        return makeFinding({
          check: 'off_calendar_date',
          severity: 'warning',
          seriesId: series.id,
          start: day,
          end: day,
          message: `${series.id} has a value (${series.values[row]}) dated ${isoDate(day)}, ${why}, when no valuation is expected.`,
          evidence: { date: isoDate(day), value: series.values[row], line: series.lines[row], reason: weekend ? 'weekend' : 'holiday', calendar: calendar ?? 'default' },
          identity: [isoDate(day)],
        });
      });
  },
};
