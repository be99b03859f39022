import { epochDay, parseIsoDate } from '../calendar/days.js';
import { ConfigError } from '../ingest/errors.js';

/** A calendar date as a library caller writes it: `'2026-11-30'` or a `Date` (its UTC date). */
export type DateInput = string | Date;

/**
 * The epoch day of a caller's date. A `Date` counts by its UTC calendar date, as `new
 * Date('2026-11-30')` means; anything else that is not a real YYYY-MM-DD date is refused,
 * never guessed (a day number passed by mistake would silently shift every finding).
 */
export function epochDayOf(date: DateInput, what = 'asOf'): number {
  if (date instanceof Date) {
    if (Number.isNaN(date.getTime())) throw new ConfigError(`${what} is an invalid Date; pass a valid Date or a YYYY-MM-DD string.`);
    return epochDay(date.getUTCFullYear(), date.getUTCMonth() + 1, date.getUTCDate());
  }
  const day = typeof date === 'string' ? parseIsoDate(date) : null;
  if (day === null) throw new ConfigError(`${what} ${JSON.stringify(date)} is not a date; pass a YYYY-MM-DD string such as '2026-11-30' or a Date.`);
  return day;
}
