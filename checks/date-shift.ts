import type { SeriesCheck } from '../src/checks/check.js';
import type { SeriesSlice } from '../src/series/frame.js';
import { movesOf } from '../src/checks/move-analysis.js';
import type { ResidualMoves } from '../src/checks/residual-moves.js';
import { correlation, isoDate, makeFinding, median, robustScale, round } from '../src/checks/support.js';

export interface ShiftParams {
  max_lag: number;
  min_correlation: number;
  min_gain: number;
  min_steps: number;
  [key: string]: number;
}

/** One rolling window's verdict: the lag that fits it best, or 0. */
export interface WindowVerdict {
  /** First and last position in the series' usable steps (see `usableSteps`). */
  readonly first: number;
  readonly last: number;
  readonly lag: number;
  /** The dates as stamped fit: lag 0 correlates at least `min_correlation` and no lag beats it. */
  readonly fitsAsStamped: boolean;
}

/**
 * Returns that line up with the benchmark's one or more business days earlier or later than
 * stamped, from some day on: a CHANGE of lag. Windows of `min_steps` usable returns, laid
 * back from the latest one by half a window (so the most recent months always fill a whole
 * window) plus one at the very start, are each judged: the fund's daily returns are
 * correlated with the benchmark's at lags −`max_lag`…`max_lag` (in benchmark observations),
 * and a window is shifted when another lag correlates at least `min_correlation` and beats
 * lag 0 by `min_gain`. Consecutive windows with the same lag make one finding, its edges
 * placed where the lagged fit starts and stops winning. Returns are winsorised at four robust
 * standard deviations before correlating, so fat tails do not decide the lag.
 *
 * A fund whose dates as stamped fit its benchmark in no window at all, while one lag does
 * throughout, is most likely priced that way by design (its valuation point falls before the
 * benchmark's close): a constant lag is a property of the fund, reported as information (it
 * could also be a feed stamped with publication dates since its first row; the data cannot
 * tell), never as a fault.
 */
export const dateShift: SeriesCheck<ShiftParams> = {
  id: 'date_shift',
  scope: 'series',
  purpose: 'Returns line up with the benchmark’s some business days earlier or later than stamped.',
  defaults: { max_lag: 3, min_correlation: 0.5, min_gain: 0.3, min_steps: 40 },
  readsMoves: true,
  run(series, context, params) {
    const benchmark = context.benchmark;
    if (!benchmark) return [];
    const analysis = movesOf(series, context);
    const returns = analysis.model;
    // The runner already found the spans with these very parameters.
    const shifts = analysis.shiftParams === params ? [...analysis.shifts, ...(analysis.constantLag ? [analysis.constantLag] : [])] : findShifts(series, returns, benchmark, params);
    const benchmarkId = context.master?.benchmark_id ?? benchmark.id;
    return shifts.map((shift) => (shift.constant ? describeConstant(series, returns, shift, benchmarkId) : describe(series, returns, shift, benchmarkId)));
  },
};

/** A day's log move beyond this is a jump for other checks to explain, not market timing. */
const SPLIT_SIZED_MOVE = 0.25;

export const DATE_SHIFT_DEFAULTS: ShiftParams = { max_lag: 3, min_correlation: 0.5, min_gain: 0.3, min_steps: 40 };

export interface Shift {
  /** First and last step (indices into the series' returns) that carry the shift. */
  readonly firstStep: number;
  readonly lastStep: number;
  readonly lag: number;
  /** Winsorised correlations over the span's usable steps, as stamped and at the lag. */
  readonly correlationAsStamped: number;
  readonly correlationAtLag: number;
  readonly observations: number;
  /** Rolling windows that found the lag. */
  readonly windows: number;
  /** The whole history at this lag: most likely the fund's valuation point, not a fault. */
  readonly constant?: boolean;
}

/** Shifted spans of the series, their edges placed where the lagged fit starts and stops winning. */
export function findShifts(series: SeriesSlice, returns: ResidualMoves, benchmark: SeriesSlice, params: ShiftParams, stepMoves?: Float64Array): Shift[] {
  const usable = usableSteps(returns, benchmark, params.max_lag);
  const size = Math.max(2, Math.floor(params.min_steps));
  if (usable.length < size) return [];
  const work: Work = { fund: new Float64Array(size), bench: new Float64Array(size), correlations: new Float64Array(2 * params.max_lag + 1), stepMoves };
  const verdicts = windowStarts(usable.length, size).map((first) => judgeWindow(returns, benchmark, usable, first, first + size - 1, params, work));
  // A lag is a fault only as a change: the dates as stamped must fit somewhere in the history.
  if (!verdicts.some((v) => v.fitsAsStamped)) return constantLag(returns, benchmark, usable, verdicts, params);
  return shiftedSpans(verdicts)
    .filter((span) => besideStampedFit(verdicts, span, size))
    .map((span) => placeSpan(returns, benchmark, usable, span, size, params))
    .filter((shift) => holdsOverSpan(shift, params));
}

/**
 * A z score of 4.5 for the span's lagged correlation: a chance of about 3 in a million per
 * window and lag, 0.001–0.003 over the 300–750 windows × lags searched in 2–10 years of
 * daily returns, so a loosely fitting fund's one lucky window is not a shift.
 */
const SHIFT_Z = 4.5;

/**
 * The placed span must carry the claim by itself: the lag correlating `min_correlation` and beating the dates as stamped by `min_gain`, and that
 * correlation beyond chance (Fisher's z, atanh(r)·√(n − 3), at least SHIFT_Z).
 */
function holdsOverSpan(shift: Shift, params: ShiftParams): boolean {
  const r = shift.correlationAtLag;
  return (
    shift.observations > 3 &&
    r >= params.min_correlation &&
    !(r - shift.correlationAsStamped < params.min_gain) &&
    Math.atanh(Math.min(r, 0.999999)) * Math.sqrt(shift.observations - 3) >= SHIFT_Z
  );
}

/**
 * The whole history at one lag: no window fits as stamped, at least half of them find the same
 * lag and no other, and the lag holds over all usable returns. Returned as one span marked
 * `constant`, reported as information, never as a fault (see `dateShift`).
 */
function constantLag(returns: ResidualMoves, benchmark: SeriesSlice, usable: Int32Array, verdicts: readonly WindowVerdict[], params: ShiftParams): Shift[] {
  const lags = verdicts.filter((v) => v.lag !== 0);
  const lag = lags[0]?.lag ?? 0;
  if (lag === 0 || lags.some((v) => v.lag !== lag) || 2 * lags.length < verdicts.length) return [];
  const work: Work = { fund: new Float64Array(0), bench: new Float64Array(0), correlations: new Float64Array(0) };
  const correlations = lagCorrelations(returns, benchmark, usable, 0, usable.length - 1, { ...params, min_gain: -Infinity }, work);
  const shift: Shift = {
    firstStep: 0,
    lastStep: returns.count - 1,
    lag,
    correlationAsStamped: correlations[params.max_lag],
    correlationAtLag: correlations[lag + params.max_lag],
    observations: usable.length,
    windows: lags.length,
    constant: true,
  };
  return holdsOverSpan(shift, params) ? [shift] : [];
}

/**
 * True when the dates as stamped fit a window that ends or starts within one window of the
 * span: a misdated feed changes its lag at some date, so the fit as stamped is found next to
 * it. A window of a loosely fitting fund that correlates with some lag by chance has no such
 * neighbour as a rule.
 */
function besideStampedFit(verdicts: readonly WindowVerdict[], span: readonly WindowVerdict[], size: number): boolean {
  const from = span[0].first;
  const to = span[span.length - 1].last;
  return verdicts.some((v) => v.fitsAsStamped && ((v.first < from && v.last >= from - size) || (v.last > to && v.first <= to + size)));
}

/**
 * Steps every lag can price (both dates in the benchmark, `max_lag` observations of room each
 * side), without split-sized jumps; not the z filter other checks use: against a misdated
 * benchmark every shifted day looks gross.
 */
function usableSteps(returns: ResidualMoves, benchmark: SeriesSlice, maxLag: number): Int32Array {
  const steps = new Int32Array(returns.count);
  let n = 0;
  for (let k = 0; k < returns.count; k++) {
    const p = returns.benchFrom[k];
    const q = returns.benchTo[k];
    if (p < 0 || q < 0 || p - maxLag < 0 || q + maxLag >= benchmark.values.length || Math.abs(returns.fund[k]) > SPLIT_SIZED_MOVE) continue;
    steps[n++] = k;
  }
  return steps.subarray(0, n);
}

/** Buffers one series' window judgements reuse (`lagCorrelations` writes into them). */
interface Work {
  fund: Float64Array;
  bench: Float64Array;
  correlations: Float64Array;
  /** The benchmark's day-to-day log moves when the runner has them (`stepLogMoves`): the same numbers, computed once. */
  stepMoves?: Float64Array;
}

/** Window starts, ascending: back from the latest full window by half a window, and the very first. */
function windowStarts(count: number, size: number): number[] {
  const stride = Math.max(1, size >> 1);
  const starts: number[] = [];
  for (let first = count - size; first >= 0; first -= stride) starts.push(first);
  if (starts[starts.length - 1] !== 0) starts.push(0);
  return starts.reverse();
}

function judgeWindow(returns: ResidualMoves, benchmark: SeriesSlice, usable: Int32Array, first: number, last: number, params: ShiftParams, work: Work): WindowVerdict {
  const correlations = lagCorrelations(returns, benchmark, usable, first, last, params, work);
  const atZero = correlations[params.max_lag];
  let best = 0;
  for (let lag = -params.max_lag; lag <= params.max_lag; lag++) if (correlations[lag + params.max_lag] > correlations[best + params.max_lag]) best = lag;
  const bestValue = correlations[best + params.max_lag];
  const shifted = best !== 0 && bestValue >= params.min_correlation && !(bestValue - atZero < params.min_gain);
  return { first, last, lag: shifted ? best : 0, fitsAsStamped: best === 0 && atZero >= params.min_correlation };
}

/**
 * Winsorised correlations of the fund's returns on usable steps first…last with the
 * benchmark's at every lag, indexed lag + max_lag (NaN for lags not tried). When the dates as
 * stamped already correlate above 1 − `min_gain` + 0.1, no other lag can beat them by
 * `min_gain`, and the others are not tried.
 */
function lagCorrelations(returns: ResidualMoves, benchmark: SeriesSlice, usable: Int32Array, first: number, last: number, params: ShiftParams, work: Work): Float64Array {
  const n = last - first + 1;
  // A window fills the buffers exactly (no view to make); a span placed later may be longer or shorter.
  const fund = work.fund.length === n ? work.fund : work.fund.length > n ? work.fund.subarray(0, n) : new Float64Array(n);
  const bench = work.bench.length === n ? work.bench : work.bench.length > n ? work.bench.subarray(0, n) : new Float64Array(n);
  const correlations = work.correlations.length === 2 * params.max_lag + 1 ? work.correlations.fill(NaN) : new Float64Array(2 * params.max_lag + 1).fill(NaN);
  for (let i = 0; i < n; i++) {
    fund[i] = returns.fund[usable[first + i]];
    bench[i] = returns.bench[usable[first + i]];
  }
  const asStamped = correlation(fund, bench);
  correlations[params.max_lag] = asStamped;
  if (asStamped >= 1 - params.min_gain + 0.1) return correlations;
  clipInPlace(fund, clipLimits(fund));
  const levels = benchmark.values;
  let limits: [number, number] | undefined;
  for (const lag of lagsFromZero(params.max_lag)) {
    const stepMoves = work.stepMoves;
    for (let i = 0; i < n; i++) {
      const k = usable[first + i];
      const p = returns.benchFrom[k] + lag;
      const q = returns.benchTo[k] + lag;
      bench[i] = stepMoves && q === p + 1 ? stepMoves[p] : Math.log(levels[q] / levels[p]);
    }
    limits ??= clipLimits(bench);
    clipInPlace(bench, limits);
    correlations[lag + params.max_lag] = correlation(fund, bench);
  }
  return correlations;
}

/**
 * A run of shifted windows as a span of steps: the start is placed by a change point over the
 * window before the run and the run's first window, the end over its last window and the one
 * after; a span that reaches the first or last usable step runs to the series' edge.
 */
function placeSpan(returns: ResidualMoves, benchmark: SeriesSlice, usable: Int32Array, span: WindowVerdict[], size: number, params: ShiftParams): Shift {
  const lag = span[0].lag;
  const gain = (k: number) => lagGain(returns, benchmark, k, lag);
  const head = Array.from(usable.subarray(Math.max(0, span[0].first - size), span[0].last + 1));
  const tail = Array.from(usable.subarray(span[span.length - 1].first, Math.min(usable.length, span[span.length - 1].last + size + 1)));
  const firstStep = bestStart(head, gain);
  const lastStep = bestEnd(tail, gain);
  const first = lowerIndex(usable, firstStep);
  const last = lowerIndex(usable, lastStep);
  const correlations = lagCorrelations(returns, benchmark, usable, first, last, { ...params, min_gain: -Infinity }, { fund: new Float64Array(0), bench: new Float64Array(0), correlations: new Float64Array(0) });
  return {
    firstStep: firstStep <= usable[0] ? 0 : firstStep,
    lastStep: lastStep >= usable[usable.length - 1] ? returns.count - 1 : lastStep,
    lag,
    correlationAsStamped: correlations[params.max_lag],
    correlationAtLag: correlations[lag + params.max_lag],
    observations: last - first + 1,
    windows: span.length,
  };
}

/** Position of step `k` in the ascending `usable` list. */
function lowerIndex(usable: Int32Array, k: number): number {
  let lo = 0, hi = usable.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (usable[mid] < k) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** How much better lag `lag` explains step k than the dates as stamped (positive: lag wins). */
function lagGain(returns: ResidualMoves, benchmark: SeriesSlice, k: number, lag: number): number {
  const p = returns.benchFrom[k];
  const q = returns.benchTo[k];
  if (p + lag < 0 || q + lag >= benchmark.values.length) return 0;
  const asStamped = returns.fund[k] - returns.beta * Math.log(benchmark.values[q] / benchmark.values[p]);
  const lagged = returns.fund[k] - returns.beta * Math.log(benchmark.values[q + lag] / benchmark.values[p + lag]);
  return asStamped * asStamped - lagged * lagged;
}

/** The step from which the summed gain to the end of `steps` is largest. */
function bestStart(steps: number[], gain: (k: number) => number): number {
  let total = 0, best = -Infinity, at = steps[0];
  for (let i = steps.length - 1; i >= 0; i--) {
    total += gain(steps[i]);
    if (total > best) [best, at] = [total, steps[i]];
  }
  return at;
}

/** The step up to which the summed gain from the start of `steps` is largest. */
function bestEnd(steps: number[], gain: (k: number) => number): number {
  let total = 0, best = -Infinity, at = steps[steps.length - 1];
  for (const k of steps) {
    total += gain(k);
    if (total > best) [best, at] = [total, k];
  }
  return at;
}

/** 0, then −max…max without 0: lag 0 comes first because its spread sets the clip limits for all. */
function lagsFromZero(maxLag: number): number[] {
  const lags = [0];
  for (let lag = -maxLag; lag <= maxLag; lag++) if (lag !== 0) lags.push(lag);
  return lags;
}

/** Limits 4 robust standard deviations from the median, so one wild day cannot make or break a correlation. */
function clipLimits(values: Float64Array): [number, number] {
  const centre = median(values);
  const limit = 4 * robustScale(values, centre);
  return [centre - limit, centre + limit];
}

function clipInPlace(values: Float64Array, [low, high]: [number, number]): void {
  for (let i = 0; i < values.length; i++) values[i] = values[i] < low ? low : values[i] > high ? high : values[i];
}

/** Runs of consecutive windows with the same non-zero lag. */
function shiftedSpans(verdicts: WindowVerdict[]): WindowVerdict[][] {
  const spans: WindowVerdict[][] = [];
  let previous: WindowVerdict | undefined;
  for (const verdict of verdicts) {
    if (verdict.lag !== 0) {
      if (previous && previous.lag === verdict.lag) spans[spans.length - 1].push(verdict);
      else spans.push([verdict]);
    }
    previous = verdict;
  }
  return spans;
}

function describe(series: SeriesSlice, returns: ResidualMoves, shift: Shift, benchmarkId: string) {
  const first = returns.to[shift.firstStep];
  const last = returns.to[shift.lastStep];
  const lateBy = -shift.lag;
  const days = Math.abs(lateBy);
  const plural = days > 1 ? 's' : '';
  return makeFinding({
    check: 'date_shift',
    severity: 'error',
    seriesId: series.id,
    start: series.dates[first],
    end: series.dates[last],
    message: `From ${isoDate(series.dates[first])} to ${isoDate(series.dates[last])}, ${series.id}'s returns match ${benchmarkId}'s returns ${days} business day${plural} ${lateBy > 0 ? 'earlier' : 'later'}; the NAVs look stamped ${days} business day${plural} ${lateBy > 0 ? 'after' : 'before'} their valuation date.`,
    evidence: {
      stamped_late_by_business_days: lateBy,
      benchmark_id: benchmarkId,
      correlation_as_stamped: round(shift.correlationAsStamped, 3),
      correlation_at_lag: round(shift.correlationAtLag, 3),
      observations: shift.observations,
      windows: shift.windows,
      first_line: series.lines[first],
      last_line: series.lines[last],
    },
    identity: [lateBy, isoDate(series.dates[first])],
  });
}

function describeConstant(series: SeriesSlice, returns: ResidualMoves, shift: Shift, benchmarkId: string) {
  const first = returns.to[0];
  const last = returns.to[returns.count - 1];
  const days = Math.abs(shift.lag);
  const plural = days > 1 ? 's' : '';
  const later = shift.lag < 0;
  return makeFinding({
    check: 'date_shift',
    severity: 'info',
    seriesId: series.id,
    start: series.dates[first],
    end: series.dates[last],
    message: `Throughout its history, ${series.id}'s returns match ${benchmarkId}'s returns ${days} business day${plural} ${later ? 'earlier' : 'later'} (correlation ${round(shift.correlationAtLag, 2)} against ${round(shift.correlationAsStamped, 2)} as stamped): most likely the fund is valued at a different point than the benchmark's close, a constant lag and not a fault; if its NAVs carry publication dates instead, every date is ${days} business day${plural} ${later ? 'late' : 'early'}. Daily figures against this benchmark understate the fit.`,
    evidence: {
      lag_business_days: -shift.lag,
      benchmark_id: benchmarkId,
      correlation_as_stamped: round(shift.correlationAsStamped, 3),
      correlation_at_lag: round(shift.correlationAtLag, 3),
      observations: shift.observations,
      windows: shift.windows,
    },
    identity: ['constant', -shift.lag],
  });
}
