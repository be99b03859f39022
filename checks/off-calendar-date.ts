import type { SeriesCheck } from '../src/checks/check.js';
import { isoWeekday } from '../src/calendar/days.js';
import type { SeriesSlice } from '../src/series/frame.js';
import type { BusinessCalendars } from '../src/calendar/business-calendar.js';
import { calendarOf, isoDate, makeFinding } from '../src/checks/support.js';

const WEEKDAY_NAMES = ['', 'Monday', 'Tuesday', 'Wednesday', 'Thursday', 'Friday', 'Saturday', 'Sunday'];

/** A value dated on a weekend or on a holiday of the series' calendar: one finding per date. */
export const offCalendarDate: SeriesCheck<Record<string, never>> = {
  id: 'off_calendar_date',
  scope: 'series',
  purpose: 'A value dated on a weekend or a holiday of the series’ calendar.',
  defaults: {},
  run(series, context) {
    const calendar = calendarOf(context);
    return offCalendarRows(series, context.calendars, calendar)
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

/**
 * The first row of each date that is not a business day of `calendar`, in one pass (no list of
 * every date first), reading the calendar's flags (`isBusinessDay` for days beyond them).
 */
function offCalendarRows(series: SeriesSlice, calendars: BusinessCalendars, calendar: string | undefined): number[] {
  const rows: number[] = [];
  const dates = series.dates;
  const { first, flags } = calendars.businessDayFlags(calendar);
  for (let i = 0; i < dates.length; i++) {
    if (i > 0 && dates[i] === dates[i - 1]) continue;
    const slot = dates[i] - first;
    const business = slot >= 0 && slot < flags.length ? flags[slot] === 1 : calendars.isBusinessDay(calendar, dates[i]);
    if (!business) rows.push(i);
  }
  return rows;
}
