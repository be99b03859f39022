/**
 * The business-day flags and running counts (src/calendar/business-calendar.ts) answer as the
 * definition does: a business day is a day that is neither a weekend weekday nor a holiday of
 * its calendar, and the business-day distance counts those days in (from, to]. The reference
 * below walks the days one by one with JavaScript's own Date weekday, independently of the
 * project's epoch-day arithmetic.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { BusinessCalendars } from '../../src/calendar/business-calendar.js';

const weekday = (day: number) => new Date(day * 86_400_000).getUTCDay() || 7; // ISO: Monday 1 … Sunday 7

describe('business calendar day tables', () => {
  it('agree with a day-by-day count, inside and outside the table years', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: -30_000, max: 90_000 }), // 1887 to 2216: crosses both ends of 1900–2199
        fc.integer({ min: -50, max: 900 }),
        fc.array(fc.integer({ min: -30_000, max: 91_000 }), { maxLength: 30 }),
        fc.constantFrom(undefined, 'north', 'elsewhere'),
        fc.constantFrom<number[]>([6, 7], [5, 6], [7]),
        (from, length, holidays, calendar, weekend) => {
          const calendars = new BusinessCalendars(weekend);
          for (const day of holidays) calendars.addHoliday('north', day);
          const isBusiness = (day: number) => !weekend.includes(weekday(day)) && !(calendar === 'north' && holidays.includes(day));
          let expected = 0;
          for (let day = from + 1; day <= from + length; day++) if (isBusiness(day)) expected++;
          expect(calendars.businessDayDistance(calendar, from, from + length)).toBe(expected);
          expect(calendars.isBusinessDay(calendar, from)).toBe(isBusiness(from));
        },
      ),
      { numRuns: 300 },
    );
  });

  it('see a holiday added after a lookup', () => {
    const calendars = new BusinessCalendars();
    const wednesday = 20_789; // 2026-12-02
    expect(calendars.isBusinessDay('north', wednesday)).toBe(true);
    calendars.addHoliday('north', wednesday);
    expect(calendars.isBusinessDay('north', wednesday)).toBe(false);
    expect(calendars.businessDayDistance('north', wednesday - 1, wednesday)).toBe(0);
  });

  it('survive the trip to a worker as plain data', () => {
    const calendars = new BusinessCalendars([5, 6]);
    calendars.addHoliday('south', 20_789);
    const copy = BusinessCalendars.from(structuredClone(calendars.describe()));
    for (let day = 20_700; day < 20_900; day++) expect(copy.isBusinessDay('south', day)).toBe(calendars.isBusinessDay('south', day));
  });
});
