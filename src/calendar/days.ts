/**
 * Dates inside navassay are epoch days: whole days since 1970-01-01 (UTC), held in Int32Array.
 * These helpers convert between epoch days and civil (year, month, day) without Date objects,
 * so the ingestion hot path allocates nothing.
 */

/** Epoch day of a proleptic Gregorian civil date (month 1..12). */
export function epochDay(year: number, month: number, day: number): number {
  const y = month <= 2 ? year - 1 : year;
  const era = Math.floor(y / 400);
  const yearOfEra = y - era * 400;
  const monthFromMarch = month > 2 ? month - 3 : month + 9;
  const dayOfYear = Math.floor((153 * monthFromMarch + 2) / 5) + day - 1;
  const dayOfEra = yearOfEra * 365 + Math.floor(yearOfEra / 4) - Math.floor(yearOfEra / 100) + dayOfYear;
  return era * 146097 + dayOfEra - 719468;
}

export interface CivilDate {
  year: number;
  month: number;
  day: number;
}

export function civilFromEpochDay(days: number): CivilDate {
  const z = days + 719468;
  const era = Math.floor(z / 146097);
  const dayOfEra = z - era * 146097;
  const yearOfEra = Math.floor(
    (dayOfEra - Math.floor(dayOfEra / 1460) + Math.floor(dayOfEra / 36524) - Math.floor(dayOfEra / 146096)) / 365,
  );
  const dayOfYear = dayOfEra - (365 * yearOfEra + Math.floor(yearOfEra / 4) - Math.floor(yearOfEra / 100));
  const monthFromMarch = Math.floor((5 * dayOfYear + 2) / 153);
  const day = dayOfYear - Math.floor((153 * monthFromMarch + 2) / 5) + 1;
  const month = monthFromMarch < 10 ? monthFromMarch + 3 : monthFromMarch - 9;
  const year = yearOfEra + era * 400 + (month <= 2 ? 1 : 0);
  return { year, month, day };
}

export function daysInMonth(year: number, month: number): number {
  if (month === 2) return isLeapYear(year) ? 29 : 28;
  return month === 4 || month === 6 || month === 9 || month === 11 ? 30 : 31;
}

export function isLeapYear(year: number): boolean {
  return (year % 4 === 0 && year % 100 !== 0) || year % 400 === 0;
}

/** True when (year, month, day) names a real calendar date. */
export function isValidCivilDate(year: number, month: number, day: number): boolean {
  return month >= 1 && month <= 12 && day >= 1 && day <= daysInMonth(year, month);
}

/** ISO 8601 weekday: 1 = Monday … 7 = Sunday. 1970-01-01 was a Thursday. */
export function isoWeekday(days: number): number {
  return ((((days + 3) % 7) + 7) % 7) + 1;
}

/** Months since 1970-01 (0 = January 1970); monthly sampling groups rows by this index. */
export function monthIndex(days: number): number {
  const slot = days - MONTH_TABLE_FIRST_DAY;
  if (slot >= 0 && slot < MONTH_TABLE_DAYS) return (monthTable ??= buildMonthTable())[slot];
  return civilMonthIndex(days);
}

function civilMonthIndex(days: number): number {
  const { year, month } = civilFromEpochDay(days);
  return (year - 1970) * 12 + (month - 1);
}

/**
 * The month index of every day from 1900 to 2199, built on first use: the checks ask for the
 * month of millions of dates, and a table read is far cheaper than the civil conversion.
 */
const MONTH_TABLE_FIRST_DAY = -25567; // 1900-01-01
const MONTH_TABLE_DAYS = 109573; // to 2199-12-31
let monthTable: Int16Array | undefined;

function buildMonthTable(): Int16Array {
  const table = new Int16Array(MONTH_TABLE_DAYS);
  for (let slot = 0; slot < MONTH_TABLE_DAYS; slot++) table[slot] = civilMonthIndex(MONTH_TABLE_FIRST_DAY + slot);
  return table;
}

/** The last calendar day of the month with the given month index, as an epoch day. */
export function monthEndDay(monthIdx: number): number {
  const year = 1970 + Math.floor(monthIdx / 12);
  const month = (((monthIdx % 12) + 12) % 12) + 1;
  return epochDay(year, month, daysInMonth(year, month));
}

/** The last calendar month-end on or before the day: the day itself when it is one. */
export function lastMonthEndOnOrBefore(day: number): number {
  const month = monthIndex(day);
  return monthEndDay(month) === day ? day : monthEndDay(month - 1);
}

/** Monday of the ISO week holding the day; weekly sampling groups rows by this. */
export function isoWeekStart(days: number): number {
  return days - (isoWeekday(days) - 1);
}

export function formatIsoDate(days: number): string {
  const { year, month, day } = civilFromEpochDay(days);
  return `${String(year).padStart(4, '0')}-${month < 10 ? '0' : ''}${month}-${day < 10 ? '0' : ''}${day}`;
}

/** Parses a strict `YYYY-MM-DD`; returns null when the text is not a real ISO date. */
export function parseIsoDate(text: string): number | null {
  const match = /^(\d{4})-(\d{2})-(\d{2})$/.exec(text.trim());
  if (!match) return null;
  const year = Number(match[1]);
  const month = Number(match[2]);
  const day = Number(match[3]);
  return isValidCivilDate(year, month, day) ? epochDay(year, month, day) : null;
}

/** Today's date in UTC as an epoch day. */
export function todayEpochDay(): number {
  return Math.floor(Date.now() / 86_400_000);
}
