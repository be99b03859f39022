/**
 * Small helpers every check shares: building findings, grouping days into runs, robust
 * statistics. Nothing here knows about a particular check.
 */
import { formatIsoDate } from '../calendar/days.js';
import { findingKey, type Finding, type Severity } from '../findings.js';
import type { SeriesContext } from './check.js';
import type { DatedSlice } from '../series/frame.js';
import { indexOfSorted } from '../numeric/search.js';
import { bracketedMedian, kthSmallest, medianInPlace, medianOfWork } from './selection.js';

export const isoDate = formatIsoDate;

export interface FindingDraft {
  readonly check: string;
  readonly severity: Severity;
  readonly seriesId: string | null;
  readonly start: number | null;
  readonly end: number | null;
  readonly message: string;
  readonly evidence: Record<string, unknown>;
  /** Facts that identify the problem tomorrow too: dates, ids, kinds; never line numbers. */
  readonly identity: ReadonlyArray<string | number | null>;
}

export function makeFinding(draft: FindingDraft): Finding {
  return {
    check: draft.check,
    severity: draft.severity,
    series_id: draft.seriesId,
    start: draft.start === null ? null : isoDate(draft.start),
    end: draft.end === null ? null : isoDate(draft.end),
    message: draft.message,
    evidence: draft.evidence,
    key: findingKey(draft.check, draft.seriesId, ...draft.identity),
  };
}

export function calendarOf(context: Pick<SeriesContext, 'master'>): string | undefined {
  return context.master?.calendar ?? undefined;
}

/** Index of the first row of each distinct date (duplicates beyond the first are skipped). */
export function firstRowOfEachDate(series: DatedSlice, upTo = Infinity): number[] {
  const rows: number[] = [];
  for (let i = 0; i < series.dates.length; i++) {
    if (series.dates[i] > upTo) break;
    if (i === 0 || series.dates[i] !== series.dates[i - 1]) rows.push(i);
  }
  return rows;
}

/** Splits ascending positions into runs of consecutive ones (`next` says what follows what). */
export function consecutiveRuns<T>(items: readonly T[], follows: (previous: T, current: T) => boolean): T[][] {
  const runs: T[][] = [];
  for (const item of items) {
    const run = runs[runs.length - 1];
    if (run && follows(run[run.length - 1], item)) run.push(item);
    else runs.push([item]);
  }
  return runs;
}

/** At most `limit` items, so evidence stays readable when a problem spans months. */
export function capped<T>(items: readonly T[], limit = 20): T[] {
  return items.slice(0, limit);
}

/**
 * The median, in linear time (which matters at thousands of series): from a bracket when the
 * array is long (`bracketedMedian`), else by quickselect on a copy.
 */
export function median(values: ArrayLike<number>): number {
  const n = values.length;
  if (n === 0) return NaN;
  const bracketed = bracketedMedian(values);
  if (bracketed !== undefined) return bracketed;
  const work = scratch(n, 0); // a plain copy loop: Float64Array.from walks an iterator
  for (let i = 0; i < n; i++) work[i] = values[i];
  return medianInPlace(work);
}

/**
 * Working arrays reused from call to call (a fresh array per median and robust scale was a
 * steady share of the checks' garbage collection): `scratch(n, slot)` is a view of `n` values,
 * valid until the next call for the same slot. Slot 0 serves `median`, slot 1 `robustScale`.
 */
const scratchArrays = [new Float64Array(0), new Float64Array(0)];

function scratch(n: number, slot: 0 | 1): Float64Array {
  if (scratchArrays[slot].length < n) scratchArrays[slot] = new Float64Array(Math.max(n, 2 * scratchArrays[slot].length));
  return scratchArrays[slot].subarray(0, n);
}

export { kthSmallest };

/**
 * `indices` ordered by ascending `keys[index]`, ties kept in the order given: exactly what
 * `indices.sort((a, b) => keys[a] - keys[b])` gives for finite keys, by a merge sort with the
 * comparison written out (a comparator called per comparison was a large cost of the checks;
 * this is about 2.5 times quicker). −0 and +0 compare equal, as for the comparator. Keys that
 * are not finite make the subtraction inconsistent, so those orders take the plain sort.
 */
export function orderByKey(indices: readonly number[], keys: Float64Array): Int32Array {
  const n = indices.length;
  // Each index travels with its key, so comparisons read one array.
  let order = Int32Array.from(indices);
  let sorted = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    sorted[i] = keys[order[i]];
    if (!Number.isFinite(sorted[i])) return Int32Array.from([...indices].sort((a, b) => keys[a] - keys[b]));
  }
  let spareOrder = new Int32Array(n);
  let spareSorted = new Float64Array(n);
  // Short runs by insertion, then merges of neighbouring runs; the left run wins ties (stable).
  for (let start = 0; start < n; start += INSERTION_RUN) insertionSort(order, sorted, start, Math.min(n, start + INSERTION_RUN));
  for (let width = INSERTION_RUN; width < n; width *= 2) {
    for (let left = 0; left < n; left += 2 * width) mergeRuns(order, sorted, spareOrder, spareSorted, left, Math.min(n, left + width), Math.min(n, left + 2 * width));
    [order, spareOrder] = [spareOrder, order];
    [sorted, spareSorted] = [spareSorted, sorted];
  }
  return order;
}

const INSERTION_RUN = 16;

function insertionSort(order: Int32Array, sorted: Float64Array, start: number, end: number): void {
  for (let i = start + 1; i < end; i++) {
    const item = order[i];
    const key = sorted[i];
    let j = i - 1;
    while (j >= start && sorted[j] > key) {
      order[j + 1] = order[j];
      sorted[j + 1] = sorted[j];
      j--;
    }
    order[j + 1] = item;
    sorted[j + 1] = key;
  }
}

/** Merges runs [left, middle) and [middle, end) of (order, sorted) into (toOrder, toSorted); ties from the left run first. */
function mergeRuns(order: Int32Array, sorted: Float64Array, toOrder: Int32Array, toSorted: Float64Array, left: number, middle: number, end: number): void {
  let i = left, j = middle, out = left;
  while (i < middle && j < end) {
    if (sorted[j] < sorted[i]) {
      toOrder[out] = order[j];
      toSorted[out++] = sorted[j++];
    } else {
      toOrder[out] = order[i];
      toSorted[out++] = sorted[i++];
    }
  }
  for (; i < middle; i++, out++) {
    toOrder[out] = order[i];
    toSorted[out] = sorted[i];
  }
  for (; j < end; j++, out++) {
    toOrder[out] = order[j];
    toSorted[out] = sorted[j];
  }
}

/** Median absolute deviation scaled by 1.4826, so it estimates the standard deviation of normal data. */
export function robustScale(values: ArrayLike<number>, centre = median(values)): number {
  const deviations = scratch(values.length, 1);
  for (let i = 0; i < values.length; i++) deviations[i] = Math.abs(values[i] - centre);
  return 1.4826 * medianOfWork(deviations);
}

/** Pearson's correlation, from the one helper (`src/numeric/correlation.ts`). */
export { correlation } from '../numeric/correlation.js';

export function round(value: number, digits = 6): number {
  if (!Number.isFinite(value)) return value;
  const factor = 10 ** digits;
  return Math.round(value * factor) / factor;
}

/** Position of the first entry of ascending `dates` equal to `day`, or -1. */
export function exactPosition(dates: Int32Array, day: number): number {
  return indexOfSorted(dates, day);
}

export function percent(ratio: number, digits = 2): string {
  return `${(ratio * 100).toFixed(digits)} %`;
}
