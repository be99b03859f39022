/**
 * The series frame: every observation of a set of time series, sorted by (series id, date),
 * in parallel typed arrays. Series `i` occupies rows `offsets[i]` to `offsets[i + 1] - 1`, so a
 * check or a metric looks at one series through `subarray` views and copies nothing.
 *
 * Rows with the same (series, date) are kept, adjacent and in file order: duplicates are for
 * the checks to judge, never silently collapsed here.
 */
import { isShared, onSharedMemory, sharedFloat64Array, sharedInt32Array } from '../ingest/shared-columns.js';

/**
 * The dates and values of a set of series without the source line of each row: the previous
 * snapshot's NAVs, which today's feed is compared with by date and value only (its lines would
 * be 4 bytes a row, 100 MB at 25 M rows, that no check reads).
 */
export interface DatedFrame {
  /** Series ids in ascending order; the position of an id is its series index. */
  readonly ids: readonly string[];
  /** `ids.length + 1` row offsets. */
  readonly offsets: Int32Array;
  /** Epoch days, ascending within each series. */
  readonly dates: Int32Array;
  readonly values: Float64Array;
  readonly indexById: ReadonlyMap<string, number>;
}

export interface SeriesFrame extends DatedFrame {
  /** Source line of each row (1-based, the header is line 1 of a CSV) for evidence. */
  readonly lines: Int32Array;
}

/** One series of a dated frame, as views into the frame's arrays. */
export interface DatedSlice {
  readonly id: string;
  readonly dates: Int32Array;
  readonly values: Float64Array;
}

/** One series of a frame, as views into the frame's arrays. */
export interface SeriesSlice extends DatedSlice {
  readonly lines: Int32Array;
}

/** Observations in file order with dictionary-coded series ids, as ingestion produces them. */
export interface UnsortedObservations {
  readonly codes: Int32Array;
  readonly dictionary: readonly string[];
  readonly dates: Int32Array;
  readonly values: Float64Array;
  readonly lines: Int32Array;
}

// Each slice is written as one object literal, not a dated slice spread into another: the checks
// read these objects in their hottest loops, and the spread's objects took them 1.5 s longer at
// 10,000 series (measured; the checks' property loads lose their one shape).
export function seriesAt(frame: SeriesFrame, index: number): SeriesSlice {
  const start = frame.offsets[index];
  const end = frame.offsets[index + 1];
  return {
    id: frame.ids[index],
    dates: frame.dates.subarray(start, end),
    values: frame.values.subarray(start, end),
    lines: frame.lines.subarray(start, end),
  };
}

export function datedSeriesAt(frame: DatedFrame, index: number): DatedSlice {
  const start = frame.offsets[index];
  const end = frame.offsets[index + 1];
  return { id: frame.ids[index], dates: frame.dates.subarray(start, end), values: frame.values.subarray(start, end) };
}

export function findSeries(frame: SeriesFrame, id: string): SeriesSlice | undefined {
  const index = frame.indexById.get(id);
  return index === undefined ? undefined : seriesAt(frame, index);
}

export function findDatedSeries(frame: DatedFrame, id: string): DatedSlice | undefined {
  const index = frame.indexById.get(id);
  return index === undefined ? undefined : datedSeriesAt(frame, index);
}

export function* eachSeries(frame: SeriesFrame): Generator<SeriesSlice> {
  for (let i = 0; i < frame.ids.length; i++) yield seriesAt(frame, i);
}

export function* eachDatedSeries(frame: DatedFrame): Generator<DatedSlice> {
  for (let i = 0; i < frame.ids.length; i++) yield datedSeriesAt(frame, i);
}

/** The frame without its lines: what is kept of a previous snapshot read whole. */
export function datedFrameOf(frame: DatedFrame): DatedFrame {
  const { ids, offsets, dates, values, indexById } = frame;
  return { ids, offsets, dates, values, indexById };
}

export function rowCount(frame: DatedFrame): number {
  return frame.dates.length;
}

/**
 * Sorts observations by (id, date) with a counting sort on the id rank, then a date sort
 * only inside the series that arrive out of order. The common feed, already sorted, is
 * recognised in one pass and keeps its columns as they are.
 */
export function buildSeriesFrame(input: UnsortedObservations): SeriesFrame {
  return framedInFileOrder(input) ?? sortedFrame(input);
}

/**
 * The frame of a feed that arrives sorted (series in ascending id order, dates ascending within
 * each), or null. It reads the ingested columns as they are instead of a second copy of every
 * row (16 bytes a row, 400 MB at 25 M rows), and needs no row order array. Nothing writes to a
 * frame's arrays; adjusted values are a copy (src/series/adjust.ts).
 */
function framedInFileOrder(input: UnsortedObservations): SeriesFrame | null {
  const { codes, dates } = input;
  const rankOfCode = rankOfEveryCode(input.dictionary);
  const starts: number[] = [];
  const runCodes: number[] = [];
  let previousRank = -1;
  for (let row = 0; row < codes.length; row++) {
    const rank = rankOfCode[codes[row]];
    if (rank === previousRank) {
      if (dates[row] < dates[row - 1]) return null;
      continue;
    }
    if (rank < previousRank) return null;
    previousRank = rank;
    starts.push(row);
    runCodes.push(codes[row]);
  }
  starts.push(codes.length);
  return frameOfRuns(runCodes, starts, input);
}

/**
 * The frame of rows already in (id, date) order, given where each series' run of rows starts
 * (`starts` ends with the row count) and the code of each run.
 */
export function frameOfRuns(runCodes: readonly number[], starts: readonly number[], input: Omit<UnsortedObservations, 'codes'>): SeriesFrame {
  const { ids, offsets, indexById } = seriesOfRuns(runCodes, starts, input.dictionary);
  return { ids, offsets, dates: input.dates, values: input.values, lines: input.lines, indexById };
}

/** `frameOfRuns` without the rows' lines. */
export function datedFrameOfRuns(runCodes: readonly number[], starts: readonly number[], input: Omit<UnsortedObservations, 'codes' | 'lines'>): DatedFrame {
  const { ids, offsets, indexById } = seriesOfRuns(runCodes, starts, input.dictionary);
  return { ids, offsets, dates: input.dates, values: input.values, indexById };
}

/** The ids, row offsets and id map of runs of rows, as a frame holds them. */
function seriesOfRuns(runCodes: readonly number[], starts: readonly number[], dictionary: readonly string[]) {
  const ids = runCodes.map((code) => dictionary[code]);
  const indexById = new Map(ids.map((id, i) => [id, i]));
  const offsets = sharedInt32Array(starts.length);
  offsets.set(starts);
  return { ids, offsets, indexById };
}

/** The rank of every dictionary entry in ascending id order (as `rankDictionary` compares them). */
export function rankOfEveryCode(dictionary: readonly string[]): Int32Array {
  const order = [...dictionary.keys()].sort(compareIdsOf(dictionary));
  const rankOfCode = new Int32Array(dictionary.length);
  order.forEach((code, rank) => (rankOfCode[code] = rank));
  return rankOfCode;
}

function compareIdsOf(dictionary: readonly string[]) {
  return (a: number, b: number) => (dictionary[a] < dictionary[b] ? -1 : dictionary[a] > dictionary[b] ? 1 : 0);
}

function sortedFrame(input: UnsortedObservations): SeriesFrame {
  const { rankOfCode, sortedIds } = rankDictionary(input.dictionary, input.codes);
  const seriesCount = sortedIds.length;
  const offsets = sharedInt32Array(seriesCount + 1);
  for (let row = 0; row < input.codes.length; row++) offsets[rankOfCode[input.codes[row]] + 1]++;
  for (let s = 0; s < seriesCount; s++) offsets[s + 1] += offsets[s];

  const order = new Int32Array(input.codes.length);
  const cursor = offsets.slice(0, seriesCount);
  for (let row = 0; row < input.codes.length; row++) order[cursor[rankOfCode[input.codes[row]]]++] = row;
  for (let s = 0; s < seriesCount; s++) sortByDateWithin(order.subarray(offsets[s], offsets[s + 1]), input.dates);

  const indexById = new Map(sortedIds.map((id, i) => [id, i]));
  const dates = sharedInt32Array(order.length);
  const values = sharedFloat64Array(order.length);
  const lines = sharedInt32Array(order.length);
  for (let i = 0; i < order.length; i++) {
    const row = order[i];
    dates[i] = input.dates[row];
    values[i] = input.values[row];
    lines[i] = input.lines[row];
  }
  return { ids: sortedIds, offsets, dates, values, lines, indexById };
}

/** Ranks the dictionary's ids that occur, in ascending order; codes that never occur are dropped. */
function rankDictionary(dictionary: readonly string[], codes: Int32Array) {
  const used = new Uint8Array(dictionary.length);
  for (let row = 0; row < codes.length; row++) used[codes[row]] = 1;
  const usedCodes = [...dictionary.keys()].filter((code) => used[code] === 1);
  usedCodes.sort(compareIdsOf(dictionary));
  const rankOfCode = new Int32Array(dictionary.length).fill(-1);
  usedCodes.forEach((code, rank) => (rankOfCode[code] = rank));
  return { rankOfCode, sortedIds: usedCodes.map((code) => dictionary[code]) };
}

function sortByDateWithin(rows: Int32Array, dates: Int32Array): void {
  let sorted = true;
  for (let i = 1; i < rows.length && sorted; i++) sorted = dates[rows[i - 1]] <= dates[rows[i]];
  if (sorted) return;
  // Row index as the tie-break keeps same-date duplicates in file order.
  rows.sort((a, b) => dates[a] - dates[b] || a - b);
}

/** True when every array of the frame is on shared memory, so a worker thread can read it without a copy. */
export function isSharedFrame(frame: DatedFrame): boolean {
  return isShared(frame.offsets) && isShared(frame.dates) && isShared(frame.values) && (!hasLines(frame) || isShared(frame.lines));
}

/**
 * The frame itself when it is on shared memory (as the readers build it), else one copy of it
 * on shared memory: a frame a library caller made from ordinary arrays.
 */
export function sharedFrame<Frame extends DatedFrame>(frame: Frame): Frame {
  if (isSharedFrame(frame)) return frame;
  const shared = { ...frame, offsets: onSharedMemory(frame.offsets), dates: onSharedMemory(frame.dates), values: onSharedMemory(frame.values) };
  return hasLines(frame) ? { ...shared, lines: onSharedMemory(frame.lines) } : shared;
}

function hasLines(frame: DatedFrame): frame is SeriesFrame {
  return 'lines' in frame;
}

/** A frame built from per-series arrays; convenient for tests and generated data. */
export function frameFromSeries(
  series: ReadonlyArray<{ id: string; dates: ArrayLike<number>; values: ArrayLike<number> }>,
): SeriesFrame {
  const total = series.reduce((sum, s) => sum + s.dates.length, 0);
  const codes = new Int32Array(total);
  const dates = new Int32Array(total);
  const values = new Float64Array(total);
  const lines = new Int32Array(total);
  let row = 0;
  series.forEach((s, code) => {
    for (let i = 0; i < s.dates.length; i++, row++) {
      codes[row] = code;
      dates[row] = s.dates[i];
      values[row] = s.values[i];
      lines[row] = row + 2;
    }
  });
  return buildSeriesFrame({ codes, dictionary: series.map((s) => s.id), dates, values, lines });
}
