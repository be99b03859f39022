import type { SeriesCheck } from '../src/checks/check.js';
import type { SeriesSlice } from '../src/series/frame.js';
import type { BusinessCalendars } from '../src/calendar/business-calendar.js';
import { calendarOf, capped, isoDate, makeFinding } from '../src/checks/support.js';

/**
 * Business days absent inside a series' life, against the series' own calendar: between its
 * first and last observation up to the as-of, and, when the master gives an inception date,
 * from inception to the first observation (a feed that starts a day late loses the inception
 * NAV, the base of every since-inception figure). One finding per run of consecutive missing
 * business days. Days after the last observation are `late_series`' business.
 */
export const missingDates: SeriesCheck<{ min_days: number }> = {
  id: 'missing_dates',
  scope: 'series',
  purpose: 'Business days missing inside a series’ life (from its inception when the master gives it), one finding per run of missing days.',
  defaults: { min_days: 1 },
  readsMoves: true,
  run(series, context, params) {
    const calendar = calendarOf(context);
    const findings = [];
    const inception = context.master?.inception ?? null;
    // A history stamped late from its first row also leaves the inception date empty; the shift
    // is the cause and date_shift reports it. A span needs a quarter of steps to be judged, so
    // one found within the first two quarters' worth may well have started with the first row.
    const moves = context.moves;
    // A lag the whole history shows may be that same stamping from the first row (date_shift
    // says so as information), so its inception gap is left to that finding too.
    const shiftedFromFirst = moves?.shiftParams !== undefined && (moves.constantLag !== undefined || moves.shifts.some((shift) => shift.firstStep < 2 * moves.shiftParams!.min_steps));
    if (inception !== null && series.dates.length > 0 && series.dates[0] > inception && inception <= context.asOf && !shiftedFromFirst) {
      const missing = [...(context.calendars.isBusinessDay(calendar, inception) ? [inception] : []), ...context.calendars.businessDaysBetween(calendar, inception, series.dates[0])];
      if (missing.length >= params.min_days && missing.length > 0) findings.push(describe(series, missing, calendar, null, 0, inception));
    }
    let previous = -1;
    for (let i = 0; i < series.dates.length; i++) {
      const day = series.dates[i];
      if (day > context.asOf) break;
      // Consecutive days leave no day between them; most other gaps are weekends: the list of
      // missing days is built only when a gap holds a business day.
      if (previous >= 0 && day > series.dates[previous] + 1 && someBusinessDayBetween(context.calendars, calendar, series.dates[previous], day)) {
        const missing = context.calendars.businessDaysBetween(calendar, series.dates[previous], day);
        if (missing.length >= params.min_days && missing.length > 0) findings.push(describe(series, missing, calendar, previous, i, null));
      }
      if (previous < 0 || day !== series.dates[previous]) previous = i;
    }
    return findings;
  },
};

/** One run of missing days between row `previous` (null: from the inception date) and row `next`. */
function describe(series: SeriesSlice, missing: number[], calendar: string | undefined, previous: number | null, next: number, inception: number | null) {
  const first = missing[0];
  const last = missing[missing.length - 1];
  const fromInception = inception === null ? '' : `, from its inception on ${isoDate(inception)} (series master) to its first value`;
  return makeFinding({
    check: 'missing_dates',
    severity: 'warning',
    seriesId: series.id,
    start: first,
    end: last,
    message:
      missing.length === 1
        ? `${series.id} has no value for business day ${isoDate(first)}${inception === null ? '' : `, its inception date in the series master; the inception NAV is missing`}.`
        : `${series.id} has no values for ${missing.length} business days in a row, ${isoDate(first)} to ${isoDate(last)}${fromInception}.`,
    evidence: {
      missing_days: missing.length,
      missing_dates: capped(missing.map(isoDate), 31),
      calendar: calendar ?? 'default',
      ...(inception === null ? {} : { inception: isoDate(inception) }),
      before: previous === null ? null : { date: isoDate(series.dates[previous]), line: series.lines[previous] },
      after: { date: isoDate(series.dates[next]), line: series.lines[next] },
    },
    identity: [isoDate(first)],
  });
}

/**
 * True when `businessDaysBetween(calendar, from, to)` would list any day: the business days in
 * (from, to − 1], counted by the calendar's running counts instead of a look-up per day.
 */
function someBusinessDayBetween(calendars: BusinessCalendars, calendar: string | undefined, from: number, to: number): boolean {
  return calendars.businessDayDistance(calendar, from, to - 1) > 0;
}
