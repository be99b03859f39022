/**
 * Binary search over an ascending array (dates of a series, sorted magnitudes): the one helper
 * every lookup uses, so the boundary rules are written and tested once.
 */

/** The first index in [start, end) whose value is above `x`; `end` when there is none. */
export function firstAbove(sorted: ArrayLike<number>, x: number, start = 0, end = sorted.length): number {
  let low = start;
  let high = end;
  while (low < high) {
    const middle = (low + high) >>> 1;
    if (sorted[middle] <= x) low = middle + 1;
    else high = middle;
  }
  return low;
}

/** The first index in [start, end) whose value is `x` or above; `end` when there is none. */
export function firstAtOrAbove(sorted: ArrayLike<number>, x: number, start = 0, end = sorted.length): number {
  let low = start;
  let high = end;
  while (low < high) {
    const middle = (low + high) >>> 1;
    if (sorted[middle] < x) low = middle + 1;
    else high = middle;
  }
  return low;
}

/** The first index whose value is exactly `x`, or -1. */
export function indexOfSorted(sorted: ArrayLike<number>, x: number): number {
  const at = firstAtOrAbove(sorted, x);
  return at < sorted.length && sorted[at] === x ? at : -1;
}
