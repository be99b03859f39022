import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { formatIsoDate, isoWeekday, lastMonthEndOnOrBefore, monthEndDay, monthIndex, parseIsoDate } from '../../src/calendar/days.js';

const DAY_MS = 86_400_000;
const anyDay = fc.integer({ min: -40_000, max: 80_000 }); // 1860 to 2189

/** JavaScript's own calendar (proleptic Gregorian, UTC) as the independent reference. */
const dateOf = (day: number) => new Date(day * DAY_MS);

describe('epoch-day calendar against JavaScript Date', () => {
  it('weekday, ISO text and month-end agree with Date', () => {
    fc.assert(
      fc.property(anyDay, (day) => {
        const date = dateOf(day);
        expect(isoWeekday(day)).toBe(((date.getUTCDay() + 6) % 7) + 1);
        expect(formatIsoDate(day)).toBe(date.toISOString().slice(0, 10));
        expect(parseIsoDate(formatIsoDate(day))).toBe(day);
        const nextMonthFirst = Date.UTC(date.getUTCFullYear(), date.getUTCMonth() + 1, 1) / DAY_MS;
        expect(monthEndDay(monthIndex(day))).toBe(nextMonthFirst - 1);
      }),
      { numRuns: 2000 },
    );
  });

  it('lastMonthEndOnOrBefore is the day itself at a month-end, else the previous month-end', () => {
    fc.assert(
      fc.property(anyDay, (day) => {
        const date = dateOf(day);
        const thisMonthFirst = Date.UTC(date.getUTCFullYear(), date.getUTCMonth(), 1) / DAY_MS;
        const isMonthEnd = dateOf(day + 1).getUTCDate() === 1;
        expect(lastMonthEndOnOrBefore(day)).toBe(isMonthEnd ? day : thisMonthFirst - 1);
      }),
      { numRuns: 2000 },
    );
    expect(formatIsoDate(lastMonthEndOnOrBefore(parseIsoDate('2026-12-02')!))).toBe('2026-11-30');
    expect(formatIsoDate(lastMonthEndOnOrBefore(parseIsoDate('2028-02-29')!))).toBe('2028-02-29');
  });
});
