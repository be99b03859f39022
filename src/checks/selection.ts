/**
 * Order statistics for the robust statistics of the checks (medians, robust scales, the top
 * of a series' |z| values): a quickselect, and a quicker median for long arrays that selects
 * among the few values a sample says lie near the middle. Both give the same numbers.
 */

/**
 * Rearranges `work` in place so that position k holds the k-th smallest value (0-based), every
 * value before it is no larger and every value after it no smaller; returns it. Linear time.
 */
export function kthSmallest(work: Float64Array, k: number): number {
  let low = 0;
  let high = work.length - 1;
  while (high > low) {
    const pivot = work[(low + high) >> 1];
    let i = low;
    let j = high;
    while (i <= j) {
      while (work[i] < pivot) i++;
      while (work[j] > pivot) j--;
      if (i <= j) {
        const t = work[i];
        work[i++] = work[j];
        work[j--] = t;
      }
    }
    if (k <= j) high = j;
    else if (k >= i) low = i;
    else break;
  }
  return work[k];
}

/** After kthSmallest(work, k): the largest value left of k, the (k − 1)-th smallest. */
function maxBelow(work: Float64Array, k: number): number {
  let max = -Infinity;
  for (let i = 0; i < k; i++) if (work[i] > max) max = work[i];
  return max;
}

/** The median of `work` by quickselect, which changes its order (for arrays made to be summarised). */
export function medianInPlace(work: Float64Array): number {
  const n = work.length;
  if (n === 0) return NaN;
  const upper = kthSmallest(work, n >> 1);
  return n % 2 === 1 ? upper : (maxBelow(work, n >> 1) + upper) / 2;
}

/** Shorter arrays take the quickselect alone: the sample would cost more than it saves. */
const MIN_BRACKETED = 512;
/** Values in the evenly spaced sample whose middle ranks bracket the median. */
const SAMPLE = 128;
/**
 * Sample ranks taken on each side of the median's: nearly 3 standard deviations of its rank
 * (√(128 / 4) ≈ 5.7), so the bracket misses under one time in a hundred. Samples of 64 to
 * 512 values cost about the same in trials on arrays of 2,500 moves.
 */
const MARGIN = 16;

const sample = new Float64Array(SAMPLE);
let between = new Float64Array(0);

/**
 * The median of `values` (left as they are), as `medianInPlace` gives it, or undefined when
 * it must decide. Two bounds, order statistics of an evenly spaced sample of the values,
 * bracket the middle; one pass counts the values below the lower bound and keeps those between
 * the bounds (about a quarter of them), and the quickselect runs on those alone. The
 * quickselect on a random array spends most of its time on mispredicted branches; the pass has
 * none. The k-th smallest value is one number whatever the method, with two exceptions, both
 * left to `medianInPlace`: a zero, whose sign depends on how the values were arranged, and an
 * array with a NaN, which has no order. Also left to it: a bracket that misses the middle.
 */
export function bracketedMedian(values: ArrayLike<number>): number | undefined {
  const n = values.length;
  if (n < MIN_BRACKETED) return undefined;
  for (let i = 0; i < SAMPLE; i++) sample[i] = values[Math.floor((i * n) / SAMPLE)];
  const k = n >> 1;
  const rank = (k * SAMPLE) / n;
  // Two selections in the sample (quicker than sorting it): any bounds are safe, as the counts below check them.
  const lowRank = Math.max(0, Math.floor(rank) - MARGIN);
  const low = kthSmallest(sample, lowRank);
  const high = kthSmallest(sample.subarray(lowRank), Math.min(SAMPLE - 1, Math.ceil(rank) + MARGIN) - lowRank);
  if (between.length < n) between = new Float64Array(n);
  let below = 0, above = 0, kept = 0;
  for (let i = 0; i < n; i++) {
    const x = values[i];
    below += +(x < low);
    above += +(x > high);
    between[kept] = x;
    kept += +(x >= low) & +(x <= high);
  }
  // A NaN counts nowhere. The k-th smallest, and for an even count the one below it, must be kept.
  const lowest = n % 2 === 1 ? k : k - 1;
  if (below + kept + above !== n || lowest < below || k >= below + kept) return undefined;
  const middle = between.subarray(0, kept);
  const upper = kthSmallest(middle, k - below);
  const lower = n % 2 === 1 ? upper : maxBelow(middle, k - below);
  if (upper === 0 || lower === 0) return undefined;
  return n % 2 === 1 ? upper : (lower + upper) / 2;
}

const NO_VALUES = new Float64Array(0);

/**
 * The median of `work`, which it may rearrange: the bracket's answer when it gives one, else the
 * quickselect's. The quickselect is called on every path, on no values when the bracket answered,
 * because optimised code that reaches a call it has never seen made deoptimises each time it gets
 * there: called only when the bracket failed, the fallback cost about 2,000 deoptimisations a run
 * of the standard universe.
 */
export function medianOfWork(work: Float64Array): number {
  const bracketed = bracketedMedian(work);
  const selected = medianInPlace(bracketed === undefined ? work : NO_VALUES);
  return bracketed ?? selected;
}

/** Top-rank selections of shorter arrays take the quickselect alone (see `MIN_BRACKETED`). */
const MIN_BRACKETED_TOP = 512;
/**
 * Sample ranks taken below the sample rank of `from`: the rank of the 95th percentile in a
 * sample of 128 has a standard deviation of √(128 · 0.05 · 0.95) ≈ 2.5, so 10 ranks (4 standard
 * deviations) keep a bound that misses under one time in ten thousand.
 */
const TOP_MARGIN = 10;

let above = new Float64Array(0);

/**
 * The values of ranks `from` … n − 1 of `values` (0-based, ascending order), sorted ascending, as
 * a fresh array: what `kthSmallest(values, from)` followed by a sort of `values.slice(from)`
 * gives. For long arrays a bound from an evenly spaced sample (an order statistic of the sample
 * just below the rank of `from`) splits off the values at or above it in one pass, and the
 * quickselect runs on those few (about one in eight for the top 5 %) instead of on all of
 * them; the pass counts the values below the bound, and when more than `from` are (the bound
 * missed), the plain quickselect answers. The top ranks are one multiset of numbers whatever the
 * method, and sorted they are one array. For finite values without −0 or NaN (as the
 * magnitudes it serves): a NaN has no rank and the two zeros no order between them. `values`
 * may be rearranged either way.
 */
export function topRanks(values: Float64Array, from: number): Float64Array {
  const n = values.length;
  if (from >= n) return new Float64Array(0);
  if (n >= MIN_BRACKETED_TOP) {
    for (let i = 0; i < SAMPLE; i++) sample[i] = values[Math.floor((i * n) / SAMPLE)];
    const bound = kthSmallest(sample, Math.max(0, Math.floor((from * SAMPLE) / n) - TOP_MARGIN));
    if (above.length < n) above = new Float64Array(n);
    let below = 0, kept = 0;
    for (let i = 0; i < n; i++) {
      const x = values[i];
      above[kept] = x;
      const high = +(x >= bound);
      kept += high;
      below += 1 - high;
    }
    if (below <= from) {
      const top = above.subarray(0, kept);
      const first = from - below;
      kthSmallest(top, first);
      return sortAscending(top.slice(first));
    }
  }
  kthSmallest(values, from);
  return sortAscending(values.slice(from));
}

/** Ranges this short are sorted by insertion. */
const INSERTION_RANGE = 16;

/**
 * Sorts `values` ascending in place and returns it: the typed array's own `sort()` for values
 * without NaN or −0 (which it alone orders: NaN last, −0 before +0), by a quicksort with
 * the comparisons written out. The built-in sort of a typed array compares through a generic
 * path and took as long for the top 5 % of a series' |z| values as selecting them.
 */
export function sortAscending(values: Float64Array): Float64Array {
  quicksort(values, 0, values.length - 1);
  return values;
}

function quicksort(values: Float64Array, low: number, high: number): void {
  while (high - low >= INSERTION_RANGE) {
    const pivot = values[(low + high) >> 1];
    let i = low;
    let j = high;
    while (i <= j) {
      while (values[i] < pivot) i++;
      while (values[j] > pivot) j--;
      if (i <= j) {
        const t = values[i];
        values[i++] = values[j];
        values[j--] = t;
      }
    }
    // The shorter side by recursion, the longer by the loop: the stack stays shallow.
    if (j - low < high - i) {
      quicksort(values, low, j);
      low = i;
    } else {
      quicksort(values, i, high);
      high = j;
    }
  }
  for (let i = low + 1; i <= high; i++) {
    const x = values[i];
    let j = i - 1;
    while (j >= low && values[j] > x) {
      values[j + 1] = values[j];
      j--;
    }
    values[j + 1] = x;
  }
}
