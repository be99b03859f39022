import { isoWeekday } from './days.js';

/**
 * A business calendar: weekend weekdays plus named holiday lists. Series name their calendar
 * in the master; a series without one uses the default calendar (weekends only, plus any
 * holidays filed under the default name).
 */
export class BusinessCalendars {
  static readonly DEFAULT = 'default';
  private readonly holidaysByCalendar = new Map<string, Set<number>>();

  constructor(private readonly weekendDays: readonly number[] = [6, 7]) {}

  addHoliday(calendar: string, day: number): void {
    let days = this.holidaysByCalendar.get(calendar);
    if (!days) this.holidaysByCalendar.set(calendar, (days = new Set()));
    days.add(day);
  }

  knows(calendar: string): boolean {
    return calendar === BusinessCalendars.DEFAULT || this.holidaysByCalendar.has(calendar);
  }

  isWeekend(day: number): boolean {
    return this.weekendDays.includes(isoWeekday(day));
  }

  isHoliday(calendar: string | undefined, day: number): boolean {
    return this.holidaysByCalendar.get(calendar ?? BusinessCalendars.DEFAULT)?.has(day) ?? false;
  }

  isBusinessDay(calendar: string | undefined, day: number): boolean {
    return !this.isWeekend(day) && !this.isHoliday(calendar, day);
  }

  /** Business days strictly after `from` and strictly before `to`. */
  businessDaysBetween(calendar: string | undefined, from: number, to: number): number[] {
    const days: number[] = [];
    for (let day = from + 1; day < to; day++) if (this.isBusinessDay(calendar, day)) days.push(day);
    return days;
  }

  /** Count of business days in (from, to]: the business-day distance from `from` to `to`. */
  businessDayDistance(calendar: string | undefined, from: number, to: number): number {
    let count = 0;
    for (let day = from + 1; day <= to; day++) if (this.isBusinessDay(calendar, day)) count++;
    return count;
  }

  previousBusinessDay(calendar: string | undefined, day: number): number {
    let candidate = day - 1;
    while (!this.isBusinessDay(calendar, candidate)) candidate--;
    return candidate;
  }
}
