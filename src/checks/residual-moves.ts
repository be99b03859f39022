/**
 * The residual model of one series' moves that the move-based checks (split-like jumps, spike
 * reversals, outliers, date shifts, benchmark fit, stale values) share. The check runner builds
 * it once per series and hands it to every check in the series' context
 * (`src/checks/move-analysis.ts`); nothing here keeps state between calls.
 *
 * A step joins two consecutive *anchors*: usable observations (first row of a date, positive,
 * not after the as-of) whose value differs from the previous one. Repeated values are folded
 * into the next step, so a stale run and its catch-up read as one honest multi-day move
 * instead of flat days followed by a jump. Each step carries the fund's log return (raw, and
 * adjusted for announced splits and distributions), the benchmark's log return over exactly
 * the same two dates (NaN when the benchmark lacks either date), the business days it spans
 * and its residual against the benchmark in robust standard units.
 */
import type { SeriesContext } from './check.js';
import type { CorporateActionRecord } from '../ingest/records.js';
import type { SeriesFrame, SeriesSlice } from '../series/frame.js';
import { calendarOf, exactPosition, median, robustScale } from './support.js';
import { topRanks } from './selection.js';
import { benchmarkStepMoves } from './series-tables.js';

export interface ResidualMoves {
  readonly count: number;
  /** Slice rows where each step starts and ends. */
  readonly from: Int32Array;
  readonly to: Int32Array;
  /** ln(v_to / v_from) as published. */
  readonly raw: Float64Array;
  /** `raw` corrected for announced corporate actions with an ex-date inside the step. */
  readonly fund: Float64Array;
  /** The assigned benchmark's log return over the same dates; NaN when unknown. */
  readonly bench: Float64Array;
  /** Positions in the benchmark slice of the step's two dates (-1 when absent). */
  readonly benchFrom: Int32Array;
  readonly benchTo: Int32Array;
  /** Business days the step spans (1 for consecutive business days). */
  readonly span: Float64Array;
  /** fund − intercept − beta·bench; − the typical drift alone when the benchmark cannot price the step. */
  readonly residual: Float64Array;
  /** residual / (scale·√span): the step in robust standard units of this series. */
  readonly z: Float64Array;
  readonly beta: number;
  /** Per-business-day drift of the fit against the benchmark (of the series alone without one). */
  readonly intercept: number;
  /** Robust standard deviation of a one-business-day residual. */
  readonly scale: number;
  readonly hasBenchmark: boolean;
  /**
   * The 99th percentile of |z| over the series' steps: about 2.6 for normal residuals, higher
   * for fat-tailed ones (2.576 below 50 steps). Outlier bars scale with it, so a series whose
   * ordinary days are wild needs a wilder day to stand out.
   */
  readonly extreme: number;
  /** The largest |z| values, ascending, for the tail estimate (see `tailBar`). */
  readonly tail: TopMagnitudes;
}

/**
 * The upper end of the series' finite |z| values, sorted: ranks `from` … `count − 1` of all
 * `count` of them. Found by selection, then a sort of the top few per cent only.
 */
export interface TopMagnitudes {
  readonly count: number;
  readonly from: number;
  readonly values: Float64Array;
}

/** Steps whose robust z exceeds this are gross errors, left out of every fitted statistic. */
export const GROSS_Z = 8;

/**
 * The residual model of the series' moves, built from scratch (the runner calls it once per series).
 * With `scratch`, the model's arrays are views of the scratch's buffers: valid only until the
 * next model built with the same scratch (see `MoveScratch`). Without it, fresh arrays.
 */
export function residualMoves(series: SeriesSlice, context: SeriesContext, scratch?: MoveScratch): ResidualMoves {
  return computeMoves(series, context, scratch);
}

/**
 * Buffers for the arrays of one series' model at a time, reused from series to series instead of
 * ten fresh typed arrays per series (each zeroed, tracked and swept by the garbage collector).
 * The series runner owns one and builds each series' model in it; the model never outlives its
 * series there, and nothing a check returns keeps a reference to the model's arrays. Grown when a
 * longer series comes.
 */
export class MoveScratch {
  private capacity = 0;
  private ints = new Int32Array(0);
  private floats = new Float64Array(0);

  /** The model's arrays of `count` elements each, as views of the buffers; contents left from earlier series. */
  take(count: number): MoveArrays {
    if (this.capacity < count) {
      this.capacity = Math.max(count, 2 * this.capacity);
      this.ints = new Int32Array(4 * this.capacity);
      this.floats = new Float64Array(6 * this.capacity);
    }
    const int = (i: number) => this.ints.subarray(i * this.capacity, i * this.capacity + count);
    const float = (i: number) => this.floats.subarray(i * this.capacity, i * this.capacity + count);
    return { from: int(0), to: int(1), benchFrom: int(2), benchTo: int(3), raw: float(0), fund: float(1), bench: float(2), span: float(3), residual: float(4), z: float(5) };
  }
}

interface MoveArrays {
  from: Int32Array;
  to: Int32Array;
  benchFrom: Int32Array;
  benchTo: Int32Array;
  raw: Float64Array;
  fund: Float64Array;
  bench: Float64Array;
  span: Float64Array;
  residual: Float64Array;
  z: Float64Array;
}

function freshArrays(count: number): MoveArrays {
  return {
    from: new Int32Array(count),
    to: new Int32Array(count),
    benchFrom: new Int32Array(count),
    benchTo: new Int32Array(count),
    raw: new Float64Array(count),
    fund: new Float64Array(count),
    bench: new Float64Array(count),
    span: new Float64Array(count),
    residual: new Float64Array(count),
    z: new Float64Array(count),
  };
}

/**
 * The anchor rows of the series (see the top of this file), in a working array reused from
 * model to model instead of a list grown step by step per series: a view valid until the next model.
 */
function anchorRows(series: SeriesSlice, asOf: number): Int32Array {
  const dates = series.dates;
  const values = series.values;
  const anchors = (anchorBuffer = atLeast(anchorBuffer, dates.length));
  let count = 0;
  let previousValue = NaN;
  for (let i = 0; i < dates.length; i++) {
    const day = dates[i];
    const value = values[i];
    if (day > asOf) break;
    if (i > 0 && day === dates[i - 1]) continue;
    if (!(value > 0) || !Number.isFinite(value) || value === previousValue) continue;
    anchors[count++] = i;
    previousValue = value;
  }
  return anchors.subarray(0, count);
}

/** Working arrays of the anchors and their benchmark positions, reused from model to model. */
let anchorBuffer: Int32Array = new Int32Array(0);
let positionBuffer: Int32Array = new Int32Array(0);

function atLeast(buffer: Int32Array, n: number): Int32Array {
  return buffer.length >= n ? buffer : new Int32Array(Math.max(n, 2 * buffer.length));
}

function computeMoves(series: SeriesSlice, context: SeriesContext, scratch: MoveScratch | undefined): ResidualMoves {
  const anchors = anchorRows(series, context.asOf);
  const count = Math.max(0, anchors.length - 1);
  const { from, to, raw, fund, bench, benchFrom, benchTo, span, residual, z } = scratch ? scratch.take(count) : freshArrays(count);
  // Every element of from, to, raw, fund, span, residual and z is written below; these three are filled first.
  bench.fill(NaN);
  benchFrom.fill(-1);
  benchTo.fill(-1);
  const calendar = calendarOf(context);
  const benchmark = context.benchmark;
  const benchPositions = benchmark ? positionsInBenchmark(series, anchors, benchmark) : undefined;
  // Day-to-day benchmark moves are the same for every fund of that benchmark: computed once.
  const benchMoves = benchmark ? benchmarkStepMoves(context, benchmark) : undefined;
  let actionCursor = 0;

  for (let k = 0; k < count; k++) {
    const a = anchors[k];
    const b = anchors[k + 1];
    from[k] = a;
    to[k] = b;
    raw[k] = Math.log(series.values[b] / series.values[a]);
    while (actionCursor < context.actions.length && context.actions[actionCursor].ex_date <= series.dates[a]) actionCursor++;
    const adjusted = valueBeforeActions(series, b, context.actions, actionCursor);
    fund[k] = adjusted === series.values[b] ? raw[k] : Math.log(adjusted / series.values[a]);
    span[k] = series.dates[b] - series.dates[a] === 1 ? 1 : Math.max(1, context.calendars.businessDayDistance(calendar, series.dates[a], series.dates[b]));
    if (benchmark && benchPositions) {
      const p = benchPositions[k];
      const q = benchPositions[k + 1];
      benchFrom[k] = p;
      benchTo[k] = q;
      if (p >= 0 && q >= 0) {
        bench[k] = q === p + 1 && benchMoves ? benchMoves[p] : Math.log(benchmark.values[q] / benchmark.values[p]);
        // Markets move on the fund's holidays too: its next NAV carries those days' noise.
        span[k] = Math.max(span[k], q - p);
      }
    }
  }
  const hasBenchmark = benchmark !== undefined;
  // The series' fit alone judges only the steps the benchmark cannot price: a benchmark that
  // prices every step (as for most funds) leaves it unread, so it is not made.
  const alone = hasBenchmark && pricesEveryStep(bench) ? undefined : fitAlone(fund, span);
  const fit = hasBenchmark || alone === undefined ? fitAgainstBenchmark(fund, bench, span) : alone;
  for (let k = 0; k < count; k++) {
    // A step the benchmark cannot price is judged against the series' own typical move.
    const own = !hasBenchmark || !Number.isFinite(bench[k]);
    if (own && alone) {
      residual[k] = fund[k] - alone.intercept * span[k];
      z[k] = residual[k] / (alone.scale * Math.sqrt(span[k]));
    } else {
      residual[k] = fund[k] - fit.intercept * span[k] - fit.beta * bench[k];
      z[k] = residual[k] / (fit.scale * Math.sqrt(span[k]));
    }
  }
  const tail = topMagnitudes(z);
  const extreme = tail.count >= 50 ? rankOf(tail, Math.floor(0.99 * (tail.count - 1))) : 2.576;
  return { count, from, to, raw, fund, bench, benchFrom, benchTo, span, residual, z, hasBenchmark, ...fit, extreme, tail };
}

/** True when every step has the benchmark's move (none is NaN or infinite). */
function pricesEveryStep(bench: Float64Array): boolean {
  for (let k = 0; k < bench.length; k++) if (!Number.isFinite(bench[k])) return false;
  return true;
}

/**
 * The value at row `b` as it would have been without the actions whose ex-date falls on or
 * before its date (from `first` on): a split multiplies back, a distribution adds back.
 */
function valueBeforeActions(series: SeriesSlice, b: number, actions: readonly CorporateActionRecord[], first: number): number {
  let value = series.values[b];
  for (let j = first; j < actions.length && actions[j].ex_date <= series.dates[b]; j++) {
    value = actions[j].kind === 'split' ? value * actions[j].value : value + actions[j].value;
  }
  return value;
}

/**
 * For each anchor, the position of a benchmark level stamped on exactly that date (or -1), by a
 * merge walk (both are ascending), in a working array: a view valid until the next model.
 */
function positionsInBenchmark(series: SeriesSlice, anchors: Int32Array, benchmark: SeriesSlice): Int32Array {
  const positions = (positionBuffer = atLeast(positionBuffer, anchors.length)).subarray(0, anchors.length);
  const dates = benchmark.dates;
  const levels = benchmark.values;
  let p = 0;
  for (let k = 0; k < anchors.length; k++) {
    const day = series.dates[anchors[k]];
    while (p < dates.length && dates[p] < day) p++;
    positions[k] = p < dates.length && dates[p] === day && levels[p] > 0 ? p : -1;
  }
  return positions;
}

export interface Fit {
  intercept: number;
  beta: number;
  scale: number;
}

/**
 * Least squares of fund on benchmark returns, refitted without the gross errors the first fit
 * finds (a split of ln 2 among daily moves of 0.01 would otherwise bend the line).
 */
export function fitAgainstBenchmark(fund: Float64Array, bench: Float64Array, span: Float64Array): Fit {
  // No step is gross against an infinite scale: the first fit is over every step with a benchmark move.
  const first = leastSquares(fund, bench, span, { intercept: 0, beta: 1, scale: Infinity });
  return leastSquares(fund, bench, span, first.fit, first.used).fit;
}

/**
 * Least squares over the steps the previous fit does not call gross, with the robust scale of
 * the result, and the number of steps used. When `previous` was fitted over `previousUsed`
 * steps, all of which this pass keeps too (it calls none gross, as for nearly every series),
 * this fit's sums, line and scale are the previous one's very numbers, computed in the same
 * order: it is returned as it is instead of selecting the scale's two medians again.
 */
function leastSquares(fund: Float64Array, bench: Float64Array, span: Float64Array, previous: Fit, previousUsed = -1): { fit: Fit; used: number } {
  let n = 0, sx = 0, sy = 0, sxx = 0, sxy = 0;
  // Against an infinite scale no step is gross (the bar is infinite): the test is left out.
  const testsGross = previous.scale !== Infinity;
  const { intercept: previousIntercept, beta: previousBeta } = previous;
  const bar = GROSS_Z * previous.scale;
  for (let k = 0; k < fund.length; k++) {
    const x = bench[k];
    const y = fund[k];
    if (!Number.isFinite(x)) continue;
    if (testsGross && Math.abs(y - previousIntercept * span[k] - previousBeta * x) > bar * Math.sqrt(span[k])) continue;
    n++;
    sx += x;
    sy += y;
    sxx += x * x;
    sxy += x * y;
  }
  // This pass keeps a subset of the previous one's steps (every step with a benchmark move): the same count is the same set.
  if (n === previousUsed) return { fit: previous, used: n };
  const varX = sxx - (sx * sx) / n;
  const beta = n >= 3 && varX > 0 ? (sxy - (sx * sy) / n) / varX : previous.beta;
  const intercept = n >= 3 ? (sy - beta * sx) / n : 0;
  return { fit: { intercept, beta, scale: residualScale(fund, bench, span, intercept, beta) }, used: n };
}

function residualScale(fund: Float64Array, bench: Float64Array, span: Float64Array, intercept: number, beta: number): number {
  const perDay = workArray(fund.length);
  let n = 0;
  for (let k = 0; k < fund.length; k++) {
    if (Number.isFinite(bench[k])) perDay[n++] = (fund[k] - intercept * span[k] - beta * bench[k]) / Math.sqrt(span[k]);
  }
  return floorScale(robustScale(perDay.subarray(0, n)));
}

function fitAlone(fund: Float64Array, span: Float64Array): Fit {
  const perDay = workArray(fund.length);
  for (let k = 0; k < fund.length; k++) perDay[k] = fund[k] / span[k];
  const drift = fund.length > 0 ? median(perDay) : 0;
  for (let k = 0; k < fund.length; k++) perDay[k] = (fund[k] - drift * span[k]) / Math.sqrt(span[k]);
  return { intercept: drift, beta: 0, scale: floorScale(robustScale(perDay, 0)) };
}

/**
 * One working array for the fits' per-day moves and the top |z| selection, reused from series
 * to series instead of three fresh ones per series: a view of `n` values, valid until the next call.
 */
let work = new Float64Array(0);

function workArray(n: number): Float64Array {
  if (work.length < n) work = new Float64Array(Math.max(n, 2 * work.length));
  return work.subarray(0, n);
}

/** A flat or perfectly smooth series has zero spread; a tiny floor keeps z finite. */
function floorScale(scale: number): number {
  return Number.isFinite(scale) && scale > 1e-7 ? scale : 1e-7;
}

/**
 * The top of the series' finite |z| values: enough ranks for the 99th percentile and the Hill
 * estimate's largest 5 %, with or without one step left out (ranks from n − ⌊0.05 n⌋ − 3).
 */
function topMagnitudes(z: Float64Array): TopMagnitudes {
  const magnitudes = workArray(z.length);
  let count = 0;
  for (let k = 0; k < z.length; k++) {
    const magnitude = Math.abs(z[k]);
    if (Number.isFinite(magnitude)) magnitudes[count++] = magnitude;
  }
  const from = Math.max(0, count - Math.floor(0.05 * count) - 3);
  // The top ranks are kept with the model: a fresh array, not a view of the working one.
  return { count, from, values: topRanks(magnitudes.subarray(0, count), from) };
}

function rankOf(top: TopMagnitudes, rank: number): number {
  return top.values[rank - top.from];
}

/**
 * True when some benchmark in the feed made the same move as the series over exactly the same
 * dates, step after step: a big market day (a crash, a rebound) that hit every fund, not a
 * price error. "The same move" means the same direction and at least `share` of the fund's
 * move, and at least `min_market_move`: ordinary market days never excuse a fund's jump. Used
 * by the move checks for steps their own benchmark could not explain (it lacks the dates, it
 * has no levels, or it is not the fund's market at all).
 */
export function sharedWithMarket(series: SeriesSlice, returns: ResidualMoves, benchmarks: SeriesFrame | undefined, steps: readonly number[], share = 0.6, minMarketMove = 0.02): boolean {
  if (!benchmarks) return false;
  for (let b = 0; b < benchmarks.ids.length; b++) {
    const start = benchmarks.offsets[b];
    const dates = benchmarks.dates.subarray(start, benchmarks.offsets[b + 1]);
    let all = true;
    for (const k of steps) {
      const p = exactPosition(dates, series.dates[returns.from[k]]);
      const q = exactPosition(dates, series.dates[returns.to[k]]);
      const move = p >= 0 && q > p ? Math.log(benchmarks.values[start + q] / benchmarks.values[start + p]) : NaN;
      const fund = returns.raw[k];
      if (!(Math.sign(move) === Math.sign(fund) && Math.abs(move) >= Math.max(minMarketMove, share * Math.abs(fund)))) {
        all = false;
        break;
      }
    }
    if (all) return true;
  }
  return false;
}

/**
 * True when the series has two or more rows with different values on a date step `k` starts
 * or ends on: which row is right is `duplicate_conflict`'s question, and a move measured from
 * the wrong one is not a second fault.
 */
export function endsOnConflict(series: SeriesSlice, returns: ResidualMoves, k: number): boolean {
  return conflictAt(series, returns.to[k]) || conflictAt(series, returns.from[k]);
}

function conflictAt(series: SeriesSlice, row: number): boolean {
  const day = series.dates[row];
  for (let i = row + 1; i < series.dates.length && series.dates[i] === day; i++) if (series.values[i] !== series.values[row]) return true;
  return false;
}

/**
 * The |z| that the series' own ordinary days would exceed with a total chance of `chance`
 * over its whole history, extrapolated from its tail. The largest 5 % of |z| give a Hill
 * estimate of the tail index α (P(|z| > x) ≈ 0.01 · (x / p99)^−α beyond the 99th percentile),
 * so the bar is p99 · (n / (100 · chance))^(1/α). Normal residuals give a large α and a bar
 * below the fixed floors; Student-t(4–5) residuals give α near 4 and a bar of 15–20 robust
 * standard deviations, where their genuine extreme days end. Steps beyond 3 × the gross-error
 * bar are candidate faults, not the tail being measured, and are left out of the estimate.
 *
 * With `leaveOut`, the tail is estimated without that step, as an externally studentised
 * residual is: a step is judged against the behaviour of the other days, so a fault inside
 * the tail region cannot widen the bar that judges it.
 */
export function tailBar(moves: ResidualMoves, chance: number, leaveOut?: number): number {
  const top = leaveOut !== undefined && Number.isFinite(moves.z[leaveOut]) ? withoutOne(moves.tail, Math.abs(moves.z[leaveOut])) : moves.tail;
  const tail = hillTail(top);
  return Number.isFinite(tail.alpha) ? tail.p99 * Math.pow(tail.n / (100 * chance), 1 / tail.alpha) : 0;
}

/**
 * The chance that one step's |z| exceeds `x`, the density of one side of |z| at `x` (per
 * unit of z) and the tail index α, from the same Hill tail as `tailBar`: P(|z| > x) ≈ 0.01 · (x / p99)^−α beyond
 * the 99th percentile, half of it on each side. Undefined when the tail cannot be estimated
 * (fewer than 100 steps) or `x` is not beyond the 99th percentile. With `leaveOut`, the tail is
 * estimated without those steps (see `tailBar`).
 */
export function tailAt(moves: ResidualMoves, x: number, leaveOut: readonly number[] = []): { exceed: number; density: number; alpha: number } | undefined {
  let top = moves.tail;
  for (const k of leaveOut) if (Number.isFinite(moves.z[k])) top = withoutOne(top, Math.abs(moves.z[k]));
  const tail = hillTail(top);
  if (!Number.isFinite(tail.alpha) || !(tail.p99 > 0) || x <= tail.p99) return undefined;
  const exceed = 0.01 * Math.pow(x / tail.p99, -tail.alpha);
  return { exceed, density: (0.5 * tail.alpha * exceed) / x, alpha: tail.alpha };
}

/** One side's density of the series' |z| at `x`, the tail fitted without the steps `leaveOut` (see `tailAt`). */
export function tailDensity(moves: ResidualMoves, x: number, leaveOut: readonly number[] = []): number | undefined {
  return tailAt(moves, x, leaveOut)?.density;
}

/** The same top ranks with one occurrence of `magnitude` removed from the whole set. */
function withoutOne(top: TopMagnitudes, magnitude: number): TopMagnitudes {
  const values = top.values;
  // Below the stored ranks: every stored value moves down one rank.
  if (values.length === 0 || magnitude < values[0]) return { count: top.count - 1, from: top.from - 1, values };
  const at = lowerBound(values, magnitude);
  const rest = new Float64Array(values.length - 1);
  rest.set(values.subarray(0, at));
  rest.set(values.subarray(at + 1), at);
  return { count: top.count - 1, from: top.from, values: rest };
}

interface Tail {
  p99: number;
  alpha: number;
  n: number;
}

/** Hill estimate of the tail of the |z| values (see `tailBar`). */
function hillTail(top: TopMagnitudes): Tail {
  const n = top.count;
  if (n < 100) return { p99: 0, alpha: Infinity, n };
  const k = Math.floor(0.05 * n);
  const threshold = rankOf(top, n - k - 1);
  let sum = 0, used = 0;
  for (let i = n - k; i < n; i++) {
    const magnitude = rankOf(top, i);
    if (magnitude >= 3 * GROSS_Z) continue;
    sum += Math.log(magnitude / threshold);
    used++;
  }
  return { p99: rankOf(top, Math.floor(0.99 * (n - 1))), alpha: used >= 10 && sum > 0 ? used / sum : Infinity, n };
}

/** First index of an ascending array whose value is ≥ `x`. */
function lowerBound(values: Float64Array, x: number): number {
  let lo = 0, hi = values.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (values[mid] < x) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** A run of steps judged as one move against the benchmark (see `bridgedStep`). */
export interface Bridge {
  /** First and last step of the window. */
  readonly first: number;
  readonly last: number;
  /** The benchmark's log return over the window's two end dates. */
  readonly bench: number;
  /** The fund's residual over the window and its robust z. */
  readonly residual: number;
  readonly z: number;
}

/**
 * For a step its benchmark cannot price (the benchmark has no level on one of its two dates,
 * typically a benchmark holiday), the shortest window of steps around it whose end dates the
 * benchmark does price, reaching at most `maxSteps` steps back and forward, with the fund's
 * residual over the whole window against beta × the benchmark's move over it. Null when the
 * step is priced, the series has no benchmark, or no such window exists. The two ends are
 * independent (the back end needs a priced start date, the forward end a priced end date), so
 * the shortest window is the nearest priced date on each side.
 */
export function bridgedStep(returns: ResidualMoves, benchmark: SeriesSlice | undefined, k: number, maxSteps = 5): Bridge | null {
  if (!benchmark || !returns.hasBenchmark || Number.isFinite(returns.bench[k])) return null;
  let first = k;
  while (first > k - maxSteps && first > 0 && returns.benchFrom[first] < 0) first--;
  let last = k;
  while (last < k + maxSteps && last < returns.count - 1 && returns.benchTo[last] < 0) last++;
  const p = returns.benchFrom[first];
  const q = returns.benchTo[last];
  if (p < 0 || q <= p) return null;
  const bench = Math.log(benchmark.values[q] / benchmark.values[p]);
  let fund = 0, span = 0;
  for (let j = first; j <= last; j++) {
    fund += returns.fund[j];
    span += returns.span[j];
  }
  span = Math.max(span, q - p);
  const residual = fund - returns.intercept * span - returns.beta * bench;
  return { first, last, bench, residual, z: residual / (returns.scale * Math.sqrt(span)) };
}
