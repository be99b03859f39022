import { epochDay, isoWeekday } from './days.js';

/**
 * Every day from 1900-01-01 to 2199-12-31 has a slot in a calendar's day table; lookups outside
 * that range take the plain path (weekday arithmetic and the holiday set).
 */
const TABLE_FIRST_DAY = epochDay(1900, 1, 1);
const TABLE_DAYS = epochDay(2200, 1, 1) - TABLE_FIRST_DAY;

/**
 * One calendar's business days as flags over epoch days, with running counts: a lookup is an
 * array read and the business days between two dates one subtraction, instead of a weekday
 * computation and a hash lookup per day walked.
 */
interface DayTable {
  /** 1 when TABLE_FIRST_DAY + i is a business day. */
  readonly business: Uint8Array;
  /** Business days in [TABLE_FIRST_DAY, TABLE_FIRST_DAY + i). */
  readonly before: Int32Array;
}

/** The calendars as plain data: weekend weekdays and each calendar's holidays (epoch days). */
export interface CalendarDescription {
  readonly weekendDays: readonly number[];
  readonly holidays: ReadonlyArray<readonly [string, readonly number[]]>;
}

/**
 * A business calendar: weekend weekdays plus named holiday lists. Series name their calendar
 * in the master; a series without one uses the default calendar (weekends only, plus any
 * holidays filed under the default name).
 */
export class BusinessCalendars {
  static readonly DEFAULT = 'default';
  private readonly holidaysByCalendar = new Map<string, Set<number>>();
  /** Day tables built on first use per calendar name; adding a holiday discards them. */
  private readonly tables = new Map<string, DayTable>();
  /** The table asked for last: the checks ask for one series' calendar day after day, and a hash lookup per day was a cost of its own. */
  private last: { readonly name: string; readonly table: DayTable } | undefined;

  constructor(private readonly weekendDays: readonly number[] = [6, 7]) {}

  addHoliday(calendar: string, day: number): void {
    let days = this.holidaysByCalendar.get(calendar);
    if (!days) this.holidaysByCalendar.set(calendar, (days = new Set()));
    days.add(day);
    this.tables.clear();
    this.last = undefined;
  }

  /** Plain data that rebuilds these calendars (`BusinessCalendars.from`), for a worker thread. */
  describe(): CalendarDescription {
    return { weekendDays: [...this.weekendDays], holidays: [...this.holidaysByCalendar].map(([name, days]) => [name, [...days]]) };
  }

  static from(description: CalendarDescription): BusinessCalendars {
    const calendars = new BusinessCalendars(description.weekendDays);
    for (const [name, days] of description.holidays) for (const day of days) calendars.addHoliday(name, day);
    return calendars;
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
    const slot = day - TABLE_FIRST_DAY;
    if (slot >= 0 && slot < TABLE_DAYS) return this.tableOf(calendar).business[slot] === 1;
    return !this.isWeekend(day) && !this.isHoliday(calendar, day);
  }

  /**
   * The calendar's business days as flags over epoch days, for a caller that looks up every day
   * of a history in one calendar (a look-up per day also finds the calendar's table per day):
   * `flags[day − first]` is 1 for a business day when `first` ≤ day < `first + flags.length`;
   * `isBusinessDay` answers for other days.
   */
  businessDayFlags(calendar: string | undefined): { readonly first: number; readonly flags: Uint8Array } {
    return { first: TABLE_FIRST_DAY, flags: this.tableOf(calendar).business };
  }

  /** Business days strictly after `from` and strictly before `to`. */
  businessDaysBetween(calendar: string | undefined, from: number, to: number): number[] {
    const days: number[] = [];
    for (let day = from + 1; day < to; day++) if (this.isBusinessDay(calendar, day)) days.push(day);
    return days;
  }

  /** Count of business days in (from, to]: the business-day distance from `from` to `to`. */
  businessDayDistance(calendar: string | undefined, from: number, to: number): number {
    if (to <= from) return 0;
    const low = from + 1 - TABLE_FIRST_DAY;
    const high = to + 1 - TABLE_FIRST_DAY;
    if (low >= 0 && high <= TABLE_DAYS) {
      const before = this.tableOf(calendar).before;
      return (high === TABLE_DAYS ? before[high - 1] + this.tableOf(calendar).business[high - 1] : before[high]) - before[low];
    }
    let count = 0;
    for (let day = from + 1; day <= to; day++) if (this.isBusinessDay(calendar, day)) count++;
    return count;
  }

  previousBusinessDay(calendar: string | undefined, day: number): number {
    let candidate = day - 1;
    while (!this.isBusinessDay(calendar, candidate)) candidate--;
    return candidate;
  }

  private tableOf(calendar: string | undefined): DayTable {
    const name = calendar ?? BusinessCalendars.DEFAULT;
    if (this.last !== undefined && this.last.name === name) return this.last.table;
    let table = this.tables.get(name);
    if (table === undefined) this.tables.set(name, (table = this.buildTable(name)));
    this.last = { name, table };
    return table;
  }

  private buildTable(name: string): DayTable {
    const business = new Uint8Array(TABLE_DAYS);
    const before = new Int32Array(TABLE_DAYS);
    const holidays = this.holidaysByCalendar.get(name);
    const weekend = new Uint8Array(8);
    for (const weekday of this.weekendDays) weekend[weekday] = 1;
    let count = 0;
    for (let slot = 0; slot < TABLE_DAYS; slot++) {
      const day = TABLE_FIRST_DAY + slot;
      before[slot] = count;
      if (weekend[isoWeekday(day)] === 1 || holidays?.has(day)) continue;
      business[slot] = 1;
      count++;
    }
    return { business, before };
  }
}
