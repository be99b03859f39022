import { formatIsoDate, monthEndDay, monthIndex } from '../calendar/days.js';

/**
 * Windows are written as a count of years or months: `1y`, `3y`, `5y`, `6m`, `18m`.
 * A window of M months at an as-of month holds the M monthly periods ending at that month,
 * so it needs M + 1 month-end values: the one before its first month and one for each month.
 */

/**
 * The one rule for a window label, wherever one is read (command line, run configuration,
 * vendor file): a whole positive count without leading zeros and `y` or `m`, either case
 * (`3y`, `3Y`, `18m`). Spaces, `03y` and `0y` are not windows. Labels are kept as written;
 * compare two labels by their months (`parseWindow`), never as text.
 */
export const WINDOW_LABEL = /^([1-9]\d*)([ym])$/i;

/** Months in a window label, or null when the label is not a window. */
export function parseWindow(label: string): number | null {
  const match = WINDOW_LABEL.exec(label);
  if (!match) return null;
  const count = Number(match[1]);
  const months = match[2].toLowerCase() === 'y' ? 12 * count : count;
  return months > 0 ? months : null;
}

export function isWindowLabel(label: string): boolean {
  return parseWindow(label) !== null;
}

/** The months a window spans, as month indices (months since 1970-01). */
export interface WindowMonths {
  /** The month whose month-end value starts the window (before its first period). */
  readonly startMonth: number;
  /** The window's last month. */
  readonly endMonth: number;
  /** Monthly periods in the window. */
  readonly months: number;
  /**
   * Last calendar day of each month from the one before `startMonth` to `endMonth`:
   * month `startMonth + k` runs from `lastDays[k] + 1` to `lastDays[k + 1]`.
   */
  readonly lastDays: Int32Array;
}

export function windowMonths(asOf: number, months: number, windowEnd: number): WindowMonths {
  const endMonth = monthIndex(asOf) + windowEnd;
  const startMonth = endMonth - months;
  const lastDays = new Int32Array(months + 2);
  for (let k = 0; k < lastDays.length; k++) lastDays[k] = monthEndDay(startMonth - 1 + k);
  return { startMonth, endMonth, months, lastDays };
}

/** `2026-03` for a month index. */
export function formatMonth(month: number): string {
  return formatIsoDate(monthEndDay(month)).slice(0, 7);
}

/** First calendar day of a month index, as an epoch day. */
export function monthStartDay(month: number): number {
  return monthEndDay(month - 1) + 1;
}
