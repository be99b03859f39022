/**
 * Tables over the series of a frame that many funds read again and again (every fund of a
 * benchmark looks up the same benchmark dates and the same day-to-day moves), each built the first
 * time it is asked for. The series runner makes one `FrameTables` for the feed's benchmarks and
 * hands it to every series in the check context; nothing is kept anywhere else. Each lookup gives
 * exactly what the plain computation gives.
 */
import type { SeriesContext } from './check.js';
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
  spans?: SpanMoves;
}

/** `move[p]` = ln(values[to[p]] / values[p]) for the last `to[p]` asked (−1: none yet). */
interface SpanMoves {
  readonly to: Int32Array;
  readonly move: Float64Array;
}

/** The tables of one frame's series, built on first use (frames never change once built). */
export class FrameTables {
  private readonly bySeries: Array<Tables | undefined>;
  /** `spansMoves` rows by span key (see `spanKey`). */
  private readonly spanRows = new Map<number, Float64Array>();

  constructor(readonly frame: SeriesFrame) {
    this.bySeries = new Array<Tables | undefined>(frame.ids.length);
  }

  /** The day table of series `index`. */
  dayTable(index: number): DayTable {
    const tables = (this.bySeries[index] ??= {});
    return (tables.days ??= buildDayTable(seriesAt(this.frame, index).dates));
  }

  /**
   * `moves[p]` = ln(values[p + 1] / values[p]) of series `index`, computed as that very
   * expression (so it is bit for bit what a check computing it itself would get).
   */
  stepLogMoves(index: number): Float64Array {
    const tables = (this.bySeries[index] ??= {});
    if (!tables.moves) {
      const values = seriesAt(this.frame, index).values;
      const moves = new Float64Array(Math.max(0, values.length - 1));
      for (let p = 0; p + 1 < values.length; p++) moves[p] = Math.log(values[p + 1] / values[p]);
      tables.moves = moves;
    }
    return tables.moves;
  }

  /** The moves of every series over days `start` to `end` (see `spansMoves`). */
  spanRow(start: number, end: number): Float64Array {
    const key = spanKey(start, end);
    let row = key === undefined ? undefined : this.spanRows.get(key);
    if (!row) {
      row = this.computeSpanRow(start, end);
      if (key !== undefined) this.spanRows.set(key, row);
    }
    return row;
  }

  private computeSpanRow(start: number, end: number): Float64Array {
    const { ids, offsets, values } = this.frame;
    const row = new Float64Array(ids.length);
    for (let s = 0; s < ids.length; s++) {
      const days = this.dayTable(s);
      const p = days.at(start);
      const q = days.at(end);
      const first = offsets[s];
      row[s] = p >= 0 && q > p && values[first + p] > 0 && values[first + q] > 0 ? Math.log(values[first + q] / values[first + p]) : NaN;
    }
    return row;
  }

  /** The remembered span moves of series `index` (see `spanLogMove`). */
  spanMoves(index: number): SpanMoves {
    const tables = (this.bySeries[index] ??= {});
    if (!tables.spans) {
      const n = this.frame.offsets[index + 1] - this.frame.offsets[index];
      tables.spans = { to: new Int32Array(n).fill(-1), move: new Float64Array(n) };
    }
    return tables.spans;
  }
}

/**
 * The key of the span from day `start` to day `end` for `spansMoves`' rows: a small integer for
 * spans of under 64 days ending before day 2^24 (every ordinary week), undefined otherwise.
 */
function spanKey(start: number, end: number): number | undefined {
  const length = end - start;
  return length >= 0 && length < 64 && end >= 0 && end < 1 << 24 ? end * 64 + length : undefined;
}

/**
 * The log move of every series of the frame over exactly the days `start` to `end`:
 * `moves[s]` = ln(values[q] / values[p]) of series `s`, computed as that very expression, where
 * `p` and `q` are its first rows on those two days, both levels positive and q > p; NaN when it
 * lacks either day. Funds of one calendar ask for the same weeks: the row is remembered per span
 * (spans of 64 days or more are computed afresh each time). The caller must not change it.
 */
export function spansMoves(tables: FrameTables, start: number, end: number): Float64Array {
  return tables.spanRow(start, end);
}

/**
 * ln(values[q] / values[p]) of series `index` of `tables`' frame, computed as that very expression and
 * remembered with `p` for the last `q` asked: every fund of a calendar asks for the same weeks
 * of every benchmark, and most funds share their calendar. This serves one benchmark at a time
 * (an index fund's assigned one, all most index funds ever read); `spansMoves` serves the search
 * over every benchmark, and an active fund, which reads every row anyway, takes its assigned
 * benchmark's moves from the rows too. Reading an index fund's assigned benchmark from
 * `spansMoves`' rows as well, to keep one mechanism, cost more checks CPU at 1,000 series (2.35 s
 * against 2.03 s, medians of 4 and 3 alternating runs, 2026-12-03): rows of every benchmark made
 * for funds that need one.
 */
export function spanLogMove(tables: FrameTables, index: number, p: number, q: number): number {
  const spans = tables.spanMoves(index);
  if (spans.to[p] !== q) {
    const values = tables.frame.values;
    const start = tables.frame.offsets[index];
    spans.move[p] = Math.log(values[start + q] / values[start + p]);
    spans.to[p] = q;
  }
  return spans.move[p];
}

/**
 * The day-to-day log moves of a series' benchmark from the runner's tables (the same for every
 * fund of that benchmark), or undefined for a check run without them, which then computes each
 * move itself.
 */
export function benchmarkStepMoves(context: SeriesContext, benchmark: SeriesSlice): Float64Array | undefined {
  const tables = context.benchmarkTables;
  const index = tables ? indexInFrame(tables.frame, benchmark) : -1;
  return index >= 0 ? tables!.stepLogMoves(index) : undefined;
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

/** The index in `frame` of the series `slice` views (same rows of the same arrays), or -1. */
export function indexInFrame(frame: SeriesFrame | undefined, slice: SeriesSlice): number {
  const index = frame?.indexById.get(slice.id);
  if (frame === undefined || index === undefined) return -1;
  // The views `seriesAt(frame, index)` would make, compared without making them (three per call).
  const start = frame.offsets[index];
  const end = frame.offsets[index + 1];
  return viewsRows(frame.dates, slice.dates, start, end) && viewsRows(frame.values, slice.values, start, end) ? index : -1;
}

/** True when `part` views rows `start` to `end − 1` of `whole`, as `whole.subarray(start, end)` does. */
function viewsRows(whole: Int32Array | Float64Array, part: ArrayBufferView, start: number, end: number): boolean {
  const size = whole.BYTES_PER_ELEMENT;
  return part.buffer === whole.buffer && part.byteOffset === whole.byteOffset + start * size && part.byteLength === (end - start) * size;
}
