import { daysInMonth, epochDay, isValidCivilDate } from '../calendar/days.js';
import type { DateFormat } from './profile.js';

/**
 * Scalar parsers that read straight from the bytes of a file, so the CSV hot path builds no
 * string per value. Each returns NaN (numbers) or null (dates) for text that is not valid.
 */

const POWERS_OF_TEN = Array.from({ length: 23 }, (_, k) => 10 ** k);
const SPACE = 32;
const TAB = 9;
const MINUS = 45;
const PLUS = 43;
const PERCENT = 37;
const ZERO = 48;
const NINE = 57;

export interface NumberStyle {
  /** Byte code of the decimal mark. */
  readonly decimal: number;
  /** Byte code of the thousands separator, or −1 for none. */
  readonly thousands: number;
}

export const PLAIN_NUMBERS: NumberStyle = { decimal: 46, thousands: -1 };

export function numberStyle(decimal: string, thousands: string): NumberStyle {
  return { decimal: decimal.charCodeAt(0), thousands: thousands === '' ? -1 : thousands.charCodeAt(0) };
}

/**
 * Parses a decimal number such as `-1,234.56`, `12.3%` (read as 0.123) or `1.5e-3`.
 * Up to 15 significant digits take an exact integer path: the digits form an exact integer m
 * and the value is m / 10^k with k the number of decimals (plus 2 for a percent sign), one
 * correctly rounded division, so it equals `Number()` of the same text. Longer or exponent forms
 * fall back to `Number()` on cleaned text. Thousands separators must group exactly three digits
 * (the first group one to three, not starting with 0) and may only appear before the decimal mark.
 */
export function parseNumberBytes(bytes: Uint8Array, start: number, end: number, style: NumberStyle): number {
  return parseNumberInto(bytes, start, end, style, scratch, 0) ? scratch[0] : NaN;
}

const scratch = new Float64Array(1);

/**
 * `parseNumberBytes` writing its result into `out[index]` and returning whether the text was a
 * number. The hot path uses this form: returning a double from a call that is not inlined boxes
 * it on the heap, one garbage object per row; a store into a Float64Array does not.
 */
export function parseNumberInto(bytes: Uint8Array, start: number, end: number, style: NumberStyle, out: Float64Array, index: number): boolean {
  while (start < end && (bytes[start] === SPACE || bytes[start] === TAB)) start++;
  while (end > start && (bytes[end - 1] === SPACE || bytes[end - 1] === TAB)) end--;
  let percent = false;
  if (end > start && bytes[end - 1] === PERCENT) {
    percent = true;
    end--;
    while (end > start && (bytes[end - 1] === SPACE || bytes[end - 1] === TAB)) end--;
  }
  if (start === end) return false;
  let i = start;
  const negative = bytes[i] === MINUS;
  if (negative || bytes[i] === PLUS) i++;
  let mantissa = 0;
  let digits = 0;
  let fractionDigits = 0;
  let seenDecimal = false;
  let groupDigits = -1; // digits since the last thousands separator; −1 before the first one
  for (; i < end; i++) {
    const c = bytes[i];
    if (c >= ZERO && c <= NINE) {
      mantissa = mantissa * 10 + (c - ZERO);
      digits++;
      if (seenDecimal) fractionDigits++;
      else if (groupDigits >= 0) groupDigits++;
    } else if (c === style.decimal && !seenDecimal) {
      if (groupDigits >= 0 && groupDigits !== 3) return false;
      seenDecimal = true;
    } else if (c === style.thousands && !seenDecimal && digits > 0) {
      if (groupDigits >= 0) {
        if (groupDigits !== 3) return false;
      } else if (digits > 3 || mantissa === 0) {
        return false; // the first group is 1 to 3 digits and does not start with 0
      }
      groupDigits = 0;
    } else if ((c === 101 || c === 69) && digits > 0) {
      if (!seenDecimal && groupDigits >= 0 && groupDigits !== 3) return false;
      return storeSlowNumber(bytes, start, end, style, percent, out, index);
    } else {
      return false;
    }
  }
  if (digits === 0 || (!seenDecimal && groupDigits >= 0 && groupDigits !== 3)) return false;
  if (digits > 15) return storeSlowNumber(bytes, start, end, style, percent, out, index);
  // A percent sign moves the decimal point two places: one exact division, never two roundings.
  const exponent = percent ? fractionDigits + 2 : fractionDigits;
  const magnitude = exponent === 0 ? mantissa : mantissa / POWERS_OF_TEN[exponent];
  out[index] = negative ? -magnitude : magnitude;
  return true;
}

/**
 * The common case of `parseNumberInto` read in the pass that finds where the number ends: an
 * optional minus, then digits with at most one `decimal` mark, 1 to 15 digits in all. Writes the
 * value (formed exactly as `parseNumberInto` forms it) into `out[index]` and returns the position
 * of the first byte after the number, or −1 when the text does not start with such a number
 * (the caller then reads the field with `parseNumberInto`). The caller checks what follows.
 */
export function readPlainDecimal(bytes: Uint8Array, position: number, decimal: number, out: Float64Array, index: number): number {
  const length = bytes.length;
  const negative = position < length && bytes[position] === MINUS;
  if (negative) position++;
  let mantissa = 0;
  let digits = 0;
  let fractionDigits = -1; // −1 until the decimal mark
  for (; position < length; position++) {
    const digit = bytes[position] - ZERO;
    if (digit >= 0 && digit <= 9) {
      mantissa = mantissa * 10 + digit;
      digits++;
      if (fractionDigits >= 0) fractionDigits++;
    } else if (bytes[position] === decimal && fractionDigits < 0) {
      fractionDigits = 0;
    } else break;
  }
  if (digits === 0 || digits > 15) return -1;
  const magnitude = fractionDigits <= 0 ? mantissa : mantissa / POWERS_OF_TEN[fractionDigits];
  out[index] = negative ? -magnitude : magnitude;
  return position;
}

function storeSlowNumber(bytes: Uint8Array, start: number, end: number, style: NumberStyle, percent: boolean, out: Float64Array, index: number): boolean {
  const value = slowNumber(bytes, start, end, style, percent);
  out[index] = value;
  return value === value;
}

const PLAIN_NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

function slowNumber(bytes: Uint8Array, start: number, end: number, style: NumberStyle, percent: boolean): number {
  let text = '';
  let afterMark = false;
  for (let i = start; i < end; i++) {
    const c = bytes[i];
    if (c === style.thousands) {
      if (afterMark) return NaN; // a separator after the decimal mark or in the exponent
      continue;
    }
    if (c === style.decimal || c === 101 || c === 69) afterMark = true;
    text += c === style.decimal ? '.' : String.fromCharCode(c);
  }
  const match = PLAIN_NUMBER.exec(text);
  if (!match) return NaN;
  let value: number;
  if (percent) {
    // Shift the exponent rather than divide by 100, so `1.2345678901234567%` rounds once.
    const exponentAt = match[2] === undefined ? text.length : text.length - match[2].length;
    const exponent = match[2] === undefined ? 0 : Number(match[2].slice(1));
    value = Number(`${text.slice(0, exponentAt)}e${exponent - 2}`);
  } else {
    value = Number(text);
  }
  return Number.isFinite(value) ? value : NaN;
}

export function parseNumberText(text: string, style: NumberStyle = PLAIN_NUMBERS): number {
  const bytes = Buffer.from(text, 'utf8');
  return parseNumberBytes(bytes, 0, bytes.length, style);
}

/** `YYYY-MM-DD` straight from bytes; null when it is not that shape or not a real date. */
export function parseIsoDateBytes(bytes: Uint8Array, start: number, end: number): number | null {
  while (start < end && (bytes[start] === SPACE || bytes[start] === TAB)) start++;
  while (end > start && (bytes[end - 1] === SPACE || bytes[end - 1] === TAB)) end--;
  if (end - start !== 10) return null;
  const day = isoDateAt(bytes, start);
  return day === INVALID_DAY ? null : day;
}

/** Returned by `isoDateAt` for text that is not a real `YYYY-MM-DD` date. */
export const INVALID_DAY = -2147483648;

const TABLE_FIRST_YEAR = 1900;
const TABLE_YEARS = 300;
/** Epoch day of the first of each month from 1900 to 2199, and the length of each month. */
const MONTH_STARTS = new Int32Array(TABLE_YEARS * 12);
const MONTH_LENGTHS = new Uint8Array(TABLE_YEARS * 12);
for (let k = 0; k < TABLE_YEARS * 12; k++) {
  const year = TABLE_FIRST_YEAR + Math.floor(k / 12);
  const month = (k % 12) + 1;
  MONTH_STARTS[k] = epochDay(year, month, 1);
  MONTH_LENGTHS[k] = daysInMonth(year, month);
}

/**
 * The ten bytes at `at` read as `YYYY-MM-DD`, or INVALID_DAY. Years 1900–2199 take a table
 * lookup (the hot path of every feed); others take the civil-date arithmetic.
 */
export function isoDateAt(bytes: Uint8Array, at: number): number {
  if (bytes[at + 4] !== MINUS || bytes[at + 7] !== MINUS) return INVALID_DAY;
  const y1 = bytes[at] - ZERO, y2 = bytes[at + 1] - ZERO, y3 = bytes[at + 2] - ZERO, y4 = bytes[at + 3] - ZERO;
  const m1 = bytes[at + 5] - ZERO, m2 = bytes[at + 6] - ZERO, d1 = bytes[at + 8] - ZERO, d2 = bytes[at + 9] - ZERO;
  // Unsigned comparison folds "below 0" and "above 9" into one test per digit.
  if ((y1 >>> 0) > 9 || (y2 >>> 0) > 9 || (y3 >>> 0) > 9 || (y4 >>> 0) > 9) return INVALID_DAY;
  if ((m1 >>> 0) > 9 || (m2 >>> 0) > 9 || (d1 >>> 0) > 9 || (d2 >>> 0) > 9) return INVALID_DAY;
  const year = y1 * 1000 + y2 * 100 + y3 * 10 + y4;
  const month = m1 * 10 + m2;
  const day = d1 * 10 + d2;
  if (month < 1 || month > 12 || day < 1) return INVALID_DAY;
  const k = (year - TABLE_FIRST_YEAR) * 12 + month - 1;
  if (k >= 0 && k < MONTH_STARTS.length) return day > MONTH_LENGTHS[k] ? INVALID_DAY : MONTH_STARTS[k] + day - 1;
  return isValidCivilDate(year, month, day) ? epochDay(year, month, day) : INVALID_DAY;
}

const MONTH_NAMES = ['jan', 'feb', 'mar', 'apr', 'may', 'jun', 'jul', 'aug', 'sep', 'oct', 'nov', 'dec'];
const FULL_MONTH_NAMES = [
  'january', 'february', 'march', 'april', 'may', 'june',
  'july', 'august', 'september', 'october', 'november', 'december',
];

/** 1..12 for an English month name (`Dec`, `December`, `Sept`, any case), else 0. */
function monthFromName(part: string): number {
  const word = part.toLowerCase();
  const short = MONTH_NAMES.indexOf(word);
  if (short >= 0) return short + 1;
  const full = FULL_MONTH_NAMES.indexOf(word);
  if (full >= 0) return full + 1;
  return word === 'sept' ? 9 : 0;
}

/** The parts of a date written with separators: numbers, or a month name (1..12) marked as such. */
interface DateParts {
  readonly numbers: [number, number, number];
  readonly widths: [number, number, number];
  /** Index of the part written as a month name, or −1. */
  readonly monthNameAt: number;
}

/**
 * Splits a date written with separators. A numeric part is a year of exactly four digits or a
 * day or month of one or two; a date holds one year. So `2026-11-0027` or `0027-11-2026` is no
 * date at all, rather than 27 November read through its padding.
 */
function splitDate(text: string): DateParts | null {
  const parts = text.split(/[-/. ]/);
  if (parts.length !== 3) return null;
  let monthNameAt = -1;
  let years = 0;
  const numbers = [0, 0, 0] as [number, number, number];
  const widths = [0, 0, 0] as [number, number, number];
  for (let k = 0; k < 3; k++) {
    const part = parts[k];
    if (/^(\d{1,2}|\d{4})$/.test(part)) {
      numbers[k] = Number(part);
      widths[k] = part.length;
      if (part.length === 4) years++;
    } else {
      const month = monthFromName(part);
      if (month === 0 || monthNameAt >= 0) return null;
      monthNameAt = k;
      numbers[k] = month;
      widths[k] = part.length;
    }
  }
  return years === 1 ? { numbers, widths, monthNameAt } : null;
}

function validDay(year: number, month: number, day: number): number | null {
  return isValidCivilDate(year, month, day) ? epochDay(year, month, day) : null;
}

/**
 * How a numeric date that is not ISO could be read. `day-first` and `month-first` tell whether
 * each reading gives a real date; both true is the ambiguous case a profile must settle.
 */
export interface DateReadings {
  readonly dayFirst: boolean;
  readonly monthFirst: boolean;
}

export function numericDateReadings(text: string): DateReadings | null {
  const parts = splitDate(trimSpacesAndTabs(text));
  if (!parts || parts.monthNameAt >= 0 || parts.widths[2] !== 4) return null;
  const [a, b, year] = parts.numbers;
  return { dayFirst: isValidCivilDate(year, b, a), monthFirst: isValidCivilDate(year, a, b) };
}

/**
 * Drops the spaces and tabs around a value, as docs/ingestion.md promises for every value, and
 * nothing else: a vertical tab, form feed or no-break space beside a date is damage, not padding.
 */
export function trimSpacesAndTabs(text: string): string {
  return text.replace(/^[ \t]+|[ \t]+$/g, '');
}

/**
 * Parses a date in any accepted written form under a date format. Unambiguous forms (ISO,
 * `YYYYMMDD`, `YYYY/MM/DD`, month names) are read under every format; purely numeric
 * day–month orders need `day-first` or `month-first`.
 */
export function parseDateText(text: string, format: DateFormat): number | null {
  const trimmed = trimSpacesAndTabs(text);
  if (/^\d{8}$/.test(trimmed) && format !== 'day-first' && format !== 'month-first') {
    return validDay(Number(trimmed.slice(0, 4)), Number(trimmed.slice(4, 6)), Number(trimmed.slice(6, 8)));
  }
  const parts = splitDate(trimmed);
  if (!parts) return null;
  const [first, second, third] = parts.numbers;
  if (parts.monthNameAt === 2) return null; // a month name never comes last
  if (parts.widths[0] === 4 && parts.monthNameAt !== 0) return validDay(first, second, third);
  if (parts.widths[2] !== 4) return null;
  if (parts.monthNameAt === 1) return validDay(third, second, first);
  if (parts.monthNameAt === 0) return validDay(third, first, second);
  if (format === 'day-first') return validDay(third, second, first);
  if (format === 'month-first') return validDay(third, first, second);
  return null;
}

const TRUE_WORDS = new Set(['true', 't', 'yes', 'y', '1']);
const FALSE_WORDS = new Set(['false', 'f', 'no', 'n', '0']);

/** `true`/`t`/`yes`/`y`/`1` → 1 and `false`/`f`/`no`/`n`/`0` → 0, in any case; anything else → null. */
export function parseBooleanWord(text: string): 0 | 1 | null {
  const word = text.trim().toLowerCase();
  return TRUE_WORDS.has(word) ? 1 : FALSE_WORDS.has(word) ? 0 : null;
}
