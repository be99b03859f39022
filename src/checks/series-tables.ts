/**
 * Tables over one series of a frame that many funds read again and again (every fund of a
 * benchmark looks up the same benchmark dates and the same day-to-day moves), built once per
 * frame and series, the first time they are asked for, and kept beside the frame (frames
 * never change once built). Each lookup gives exactly what the plain computation gives.
 */
import type { SeriesFrame, SeriesSlice } from '../series/frame.js';
import { seriesAt } from '../series/frame.js';
import { indexOfSorted } from '../numeric/search.js';

/** Positions of days in one series: `at(day)` is what `indexOfSorted(series.dates, day)` gives, in one array read. */
export interface DayTable {
  at(day: number): number;
}

/** A table wider than this many days per row is not worth its memory; lookups then search. */
const MAX_DAYS_PER_ROW = 16;

interface Tables {
  days?: DayTable;
  moves?: Float64Array;
}

const tablesOfFrame = new WeakMap<SeriesFrame, Array<Tables | undefined>>();

function tablesOf(frame: SeriesFrame, index: number): Tables {
  let tables = tablesOfFrame.get(frame);
  if (!tables) tablesOfFrame.set(frame, (tables = new Array<Tables | undefined>(frame.ids.length)));
  return (tables[index] ??= {});
}

/** The day table of series `index` of `frame`. */
export function dayTable(frame: SeriesFrame, index: number): DayTable {
  const tables = tablesOf(frame, index);
  return (tables.days ??= buildDayTable(seriesAt(frame, index).dates));
}

/** A day table for a series that is not known to belong to a frame: plain binary search. */
export function searchTable(series: SeriesSlice): DayTable {
  return { at: (day) => indexOfSorted(series.dates, day) };
}

function buildDayTable(dates: Int32Array): DayTable {
  const n = dates.length;
  if (n === 0) return { at: () => -1 };
  const first = dates[0];
  const width = dates[n - 1] - first + 1;
  if (!(width > 0) || width > MAX_DAYS_PER_ROW * n + 64) return { at: (day) => indexOfSorted(dates, day) };
  const positions = new Int32Array(width).fill(-1);
  // From the end, so a date on several rows keeps its first row.
  for (let i = n - 1; i >= 0; i--) positions[dates[i] - first] = i;
  return { at: (day) => (day >= first && day - first < width ? positions[day - first] : -1) };
}

/**
 * `moves[p]` = ln(values[p + 1] / values[p]) of series `index` of `frame`, computed as that
 * very expression (so it is bit for bit what a check computing it itself would get).
 */
export function stepLogMoves(frame: SeriesFrame, index: number): Float64Array {
  const tables = tablesOf(frame, index);
  if (!tables.moves) {
    const values = seriesAt(frame, index).values;
    const moves = new Float64Array(Math.max(0, values.length - 1));
    for (let p = 0; p + 1 < values.length; p++) moves[p] = Math.log(values[p + 1] / values[p]);
    tables.moves = moves;
  }
  return tables.moves;
}

/** The index in `frame` of the series `slice` views (same rows of the same arrays), or -1. */
export function indexInFrame(frame: SeriesFrame | undefined, slice: SeriesSlice): number {
  const index = frame?.indexById.get(slice.id);
  if (frame === undefined || index === undefined) return -1;
  const own = seriesAt(frame, index);
  return sameView(own.dates, slice.dates) && sameView(own.values, slice.values) ? index : -1;
}

function sameView(x: ArrayBufferView, y: ArrayBufferView): boolean {
  return x.buffer === y.buffer && x.byteOffset === y.byteOffset && x.byteLength === y.byteLength;
}
